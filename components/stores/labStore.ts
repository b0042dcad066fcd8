import { create } from 'zustand';
import { createJSONStorage, persist } from 'zustand/middleware';
import { persistStorage } from './persistStorage';

type LabState = {
  /** The lab the user is working in; the labs themselves come from the API. */
  currentLabId: string | null;
};

export const useLabStore = create<LabState>()(
  persist<LabState>(() => ({ currentLabId: null }), {
    name: 'sinterstack.current-lab',
    storage: createJSONStorage(() => persistStorage),
  }),
);

export const useCurrentLabId = () => useLabStore((s) => s.currentLabId);

export function setCurrentLabId(labId: string | null): void {
  useLabStore.setState({ currentLabId: labId });
}
