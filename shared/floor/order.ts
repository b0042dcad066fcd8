import type { PlanStatus } from '../plans/status';

/** The stages a run is under way in, at the machine or after it. */
export const UNDER_WAY: readonly PlanStatus[] = ['printing', 'cooling', 'breakout', 'finishing'];

export interface FloorPlan {
  id: string;
  status: PlanStatus;
  queuePosition: number | null;
}

/**
 * The order of a machine's cards on the floor, the queue's order: the builds under way in the order they started
 * (the one started first, furthest down the line, on top), then the next queued build. A card keeps its place
 * when its build moves from one stage to the next, so the card under a thumb is the one it was a moment ago.
 * A build under way whose start is not known yet goes after the known ones, by id, so the order never depends on
 * the order the server listed them in.
 */
export function floorOrder<P extends FloorPlan>(plans: readonly P[], startedAtMs: (id: string) => number | null | undefined): P[] {
  const key = (p: P) => startedAtMs(p.id) ?? Number.POSITIVE_INFINITY;
  const going = plans
    .filter((p) => UNDER_WAY.includes(p.status))
    .sort((a, b) => key(a) - key(b) || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
  const next = plans
    .filter((p) => p.status === 'queued')
    .sort((a, b) => (a.queuePosition ?? Number.MAX_SAFE_INTEGER) - (b.queuePosition ?? Number.MAX_SAFE_INTEGER))[0];
  return next ? [...going, next] : going;
}
