import { create } from 'zustand';

type LiveState = {
  /** Labs whose change stream is open: their screens need not poll. */
  live: Record<string, boolean>;
};

export const useLiveStore = create<LiveState>()(() => ({ live: {} }));

export const useIsLive = (labId: string | undefined) => useLiveStore((s) => (labId ? !!s.live[labId] : false));

export function setLive(labId: string, on: boolean): void {
  useLiveStore.setState((s) => (s.live[labId] === on ? s : { live: { ...s.live, [labId]: on } }));
}

/**
 * A react-query refetch interval that polls only while the lab's live
 * stream is down (polling is the fallback, not the way screens update).
 */
export function pollUnlessLive(labId: string | undefined, ms: number): () => number | false {
  return () => (labId && useLiveStore.getState().live[labId] ? false : ms);
}
