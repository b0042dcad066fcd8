import type { QueueItemView, QueueView } from '../../shared/schemas/runs';
import type { LabRequest } from '../queries/requests';

/** Why a request is late: a build predicted to finish after its due date, or the date has passed unprinted. */
export type LateReason =
  | { kind: 'predicted'; planId: string; planName: string; machineId: string; machineName: string; finishAt: string; lateByHours: number }
  | { kind: 'past_due'; printed: number; quantity: number };

export type LateRequest = { requestId: string; title: string; dueDate: string; reasons: LateReason[] };

/**
 * A request is due by the end of its due date in UTC, the same boundary the
 * server's schedule uses for its late flags.
 */
export function dueEndMs(dueDate: string): number {
  return Date.parse(`${dueDate}T23:59:59.999Z`);
}

/**
 * Late requests from the machines' predicted times and the open requests.
 * A build's finish is the end of its breakout (the parts are out of the
 * cake); each request of a late build is checked against its own due date,
 * since a build is flagged by its earliest one only.
 */
export function findLateRequests(queues: readonly QueueView[], openRequests: readonly LabRequest[], nowMs: number): LateRequest[] {
  const byId = new Map<string, LateRequest>();
  const entry = (id: string, title: string, dueDate: string) => {
    let e = byId.get(id);
    if (!e) {
      e = { requestId: id, title, dueDate, reasons: [] };
      byId.set(id, e);
    }
    return e;
  };

  for (const q of queues) {
    const items: QueueItemView[] = [...(q.active ?? []), ...q.plans];
    if (q.current && !items.some((i) => i.planId === q.current!.planId)) items.push(q.current);
    for (const item of items) {
      const finishMs = Date.parse(item.breakoutDoneAt);
      if (!Number.isFinite(finishMs)) continue;
      for (const r of item.requests) {
        const dueMs = dueEndMs(r.dueDate);
        if (finishMs <= dueMs) continue;
        entry(r.id, r.title, r.dueDate).reasons.push({
          kind: 'predicted',
          planId: item.planId,
          planName: item.name,
          machineId: q.machine.id,
          machineName: q.machine.name,
          finishAt: item.breakoutDoneAt,
          lateByHours: (finishMs - dueMs) / 3_600_000,
        });
      }
    }
  }

  for (const r of openRequests) {
    if (r.status !== 'open' || nowMs <= dueEndMs(r.dueDate) || r.totals.printed >= r.totals.quantity) continue;
    entry(r.id, r.title, r.dueDate).reasons.push({ kind: 'past_due', printed: r.totals.printed, quantity: r.totals.quantity });
  }

  return [...byId.values()].sort((a, b) => a.dueDate.localeCompare(b.dueDate) || a.title.localeCompare(b.title));
}
