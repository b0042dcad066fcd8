import type { Database } from '../db';
import { reviewRepository, type FlaggedPlanRow } from '../db/repositories/review';
import { checkPlanId, planLines } from './planCommon';
import { dueEndMs, type QueueService } from './queue';
import type { LabsService } from './labs';
import { notFound } from '../errors';
import { isBeforePrinting } from '../../shared/plans/status';
import type { PlanFlag, PlanFlagsView } from '../../shared/schemas/review';
import type { QueueItemView } from '../../shared/schemas/runs';

const MS_PER_HOUR = 3_600_000;

/** "4 Dec 10:00 UTC": the server speaks in UTC and says so. */
function utcTime(iso: string): string {
  const d = new Date(iso);
  const month = d.toLocaleString('en-GB', { month: 'short', timeZone: 'UTC' });
  const hm = d.toISOString().slice(11, 16);
  return `${d.getUTCDate()} ${month} ${hm} UTC`;
}

const pct = (fraction: number) => `${(fraction * 100).toFixed(1)} %`;

type PlanRow = FlaggedPlanRow;

/**
 * Points a lead should see before approving a plan, worked out on the server
 * from the plan, its chosen layout, the parts' measured meshes, the lab's
 * rules and the machine's queue:
 * - the chosen layout packs less densely than the lab's minimum;
 * - the build before it on the machine (in the queue, or the last run) is in another material, so the powder must be changed;
 * - the queue's own time estimates have the build out of the powder after a request's due date;
 * - a part's mesh is not closed (open edges), so its volume, cost and the build file may be wrong.
 */
export function reviewFlagsService(db: Database, deps: { labs: LabsService; queue: QueueService }) {
  const repo = reviewRepository(db);

  /** The build that runs on the machine before the plan: the one before it in the queue, else the last started there. */
  async function buildBefore(plan: PlanRow, queue: QueueItemView[]): Promise<{ id: string; name: string; materialId: string; materialName: string } | null> {
    const at = queue.findIndex((p) => p.planId === plan.id);
    if (at > 0) {
      const prev = queue[at - 1];
      return { id: prev.planId, name: prev.name, materialId: prev.material.id, materialName: prev.material.name };
    }
    const last = await repo.lastRunPlan(plan.machine_id, plan.id);
    return last ? { id: last.id, name: last.name, materialId: last.material_id, materialName: last.material_name } : null;
  }

  return {
    async forPlan(labId: string, planId: string, nowMs = Date.now()): Promise<PlanFlagsView> {
      const plan = await repo.flaggedPlan(labId, checkPlanId(planId));
      if (!plan) throw notFound('That plan');
      const flags: PlanFlag[] = [];

      const settings = await deps.labs.settings(labId);
      const minimum = settings.minPackingDensityPercent / 100;
      if (plan.density != null && minimum > 0 && plan.density < minimum) {
        flags.push({
          kind: 'low_density',
          title: 'Low packing density',
          message:
            `The chosen layout fills ${pct(plan.density)} of the powder cake with parts, below this lab's minimum of ${pct(minimum)}: ` +
            'the build uses much powder and machine time for what it makes. Add parts or choose a denser layout.',
          details: { density: plan.density, minimum },
        });
      }

      if (isBeforePrinting(plan.status) && plan.status !== 'cancelled') {
        // The machine's queue with this plan in it: where it is if queued, else at the end where approval puts it.
        const queue = await deps.queue.get(labId, plan.machine_id, nowMs, { asQueued: plan.id });
        const before = await buildBefore(plan, queue.plans);
        if (before && before.materialId !== plan.material_id) {
          flags.push({
            kind: 'material_change',
            title: 'Material change on the machine',
            message:
              `The build before this one on ${plan.machine_name}, "${before.name}", is in ${before.materialName} and this one is in ${plan.material_name}: ` +
              'the powder must be changed and the hopper, feed and overflow emptied and cleaned between them.',
            details: { previousPlanId: before.id, previousPlanName: before.name, previousMaterial: before.materialName, material: plan.material_name },
          });
        }
        const mine = queue.plans.find((p) => p.planId === plan.id);
        if (mine) {
          const readyMs = Date.parse(mine.breakoutDoneAt);
          for (const r of mine.requests) {
            const dueMs = dueEndMs(r.dueDate);
            if (dueMs >= readyMs) continue;
            const hours = (readyMs - dueMs) / MS_PER_HOUR;
            flags.push({
              kind: 'late_due_date',
              title: 'Due date missed',
              message:
                `Request "${r.title}" is due ${r.dueDate}, but from the queue of ${plan.machine_name} this build is expected out of the powder ` +
                `on ${utcTime(mine.breakoutDoneAt)}, ${hours < 48 ? `${Math.ceil(hours)} h` : `${Math.ceil(hours / 24)} days`} late. ` +
                'Move it up the queue, split the request, or agree a later date.',
              details: { requestId: r.id, requestTitle: r.title, dueDate: r.dueDate, readyAt: mine.breakoutDoneAt, lateByHours: hours },
            });
          }
        }
      }

      const lines = await planLines(db, plan.id);
      const partIds = [...new Set(lines.map((l) => l.part_id))];
      const open = await repo.unclosedParts(partIds);
      for (const part of open) {
        flags.push({
          kind: 'not_watertight',
          title: 'Part not watertight',
          message:
            `The mesh of "${part.name}" is not closed${part.open_edges ? ` (${part.open_edges} open edges)` : ''}: ` +
            'its volume, weight and cost may be wrong and the build file may print it with holes. Ask the designer for a repaired file.',
          details: { partId: part.id, partName: part.name, openEdges: part.open_edges },
        });
      }
      return { planId: plan.id, flags };
    },
  };
}
export type ReviewFlagsService = ReturnType<typeof reviewFlagsService>;
