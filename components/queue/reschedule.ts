import { scheduleQueue, type CurrentRun, type PlanTimes } from '../../shared/schedule';
import type { QueueItemView, QueueView } from '../../shared/schemas/runs';

/** A request is due by the end of its due day (UTC), as the server counts it. */
export function dueEndMs(dueDate: string): number {
  return Date.parse(`${dueDate}T23:59:59.999Z`);
}

const iso = (ms: number) => new Date(ms).toISOString();

function withTimes(item: QueueItemView, t: PlanTimes): QueueItemView {
  return {
    ...item,
    chamberIndex: t.chamberIndex,
    startAt: iso(t.startMs),
    printEndAt: iso(t.printEndMs),
    leavesMachineAt: iso(t.leavesMachineMs),
    cooledAt: iso(t.cooledMs),
    breakoutDoneAt: iso(t.breakoutDoneMs),
    late: t.late,
    lateByHours: t.lateByMs / 3_600_000,
  };
}

/**
 * The queue in a new order with its times worked out here, at once, by the
 * same schedule the server runs; the server's answer replaces it when it
 * comes. The build under way keeps the times the server gave it: it stands
 * in as a run whose remaining stages end when the server said they would.
 */
export function reorderQueue(view: QueueView, planIds: readonly string[], nowMs: number): QueueView {
  const byId = new Map(view.plans.map((p) => [p.planId, p]));
  const ordered = planIds.map((id) => byId.get(id)).filter((p): p is QueueItemView => !!p);
  let current: CurrentRun | undefined;
  if (view.current) {
    const c = view.current;
    const leaves = Math.max(nowMs, Date.parse(c.leavesMachineAt));
    const cooled = Math.max(leaves, Date.parse(c.cooledAt));
    const done = Math.max(cooled, Date.parse(c.breakoutDoneAt));
    current = {
      plan: {
        planId: c.planId,
        preheatSeconds: 0,
        layersSeconds: 0,
        inMachineCoolingSeconds: (leaves - nowMs) / 1000,
        outsideCoolingSeconds: (cooled - leaves) / 1000,
        breakoutSeconds: (done - cooled) / 1000,
        dueDatesMs: c.requests.map((r) => dueEndMs(r.dueDate)),
      },
      stage: 'preheating',
      stageStartedAtMs: nowMs,
    };
  }
  const schedule = scheduleQueue({
    startMs: nowMs,
    machine: { chamberCount: view.machine.chamberCount },
    plans: ordered.map((p) => ({ planId: p.planId, ...p.durations, dueDatesMs: p.requests.map((r) => dueEndMs(r.dueDate)) })),
    current,
  });
  return {
    ...view,
    plans: schedule.plans.map((t, i) => withTimes({ ...ordered[i], queuePosition: i + 1 }, t)),
  };
}

/** The order after moving the item at `from` to `to`. */
export function moved<T>(list: readonly T[], from: number, to: number): T[] {
  const out = [...list];
  if (from < 0 || from >= out.length || to < 0 || to >= out.length || from === to) return out;
  const [item] = out.splice(from, 1);
  out.splice(to, 0, item);
  return out;
}
