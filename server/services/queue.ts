import type { Database } from '../db';
import { queueRepository, type QueueRow } from '../db/repositories/queue';
import { AppError, notFound } from '../errors';
import type { z } from 'zod';
import type { Actor } from './planCommon';
import { undoUntil } from './takeBack';
import type { CalibrationService } from './calibration';
import type { RunEstimate } from './runs';
import { scheduleQueue, type CurrentRun, type PlanTimes, type QueuedPlan, type RunStage, type StageDurations } from '../../shared/schedule';
import type { queueOrderSchema, QueueItemView, QueueView } from '../../shared/schemas/runs';
import type { PlanStatus } from '../../shared/plans/status';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const MS_PER_HOUR = 3_600_000;

/** In-progress statuses that still hold the machine or a chamber (finishing happens away from both). */
const ON_MACHINE: readonly PlanStatus[] = ['printing', 'cooling', 'breakout'];

type Row = QueueRow<RunEstimate>;

/** A request is due by the end of its due day (UTC): parts out of the powder that day are in time. */
export function dueEndMs(dueDate: string): number {
  return Date.parse(`${dueDate}T23:59:59.999Z`);
}

/**
 * A layout's estimate rescaled to the machine's current factors: print times
 * scale with the print-time factor, cooling times with 1 / the cooling factor
 * (it divides every time of the conduction model). The estimate says which factors it was made with.
 */
export function durationsFor(estimate: RunEstimate, factors: { printTimeScale: number; coolingScale: number }, breakoutSeconds: number): StageDurations {
  const printRatio = factors.printTimeScale / (estimate.calibration?.printTimeScale ?? 1);
  const coolingRatio = (estimate.calibration?.coolingScale ?? 1) / factors.coolingScale;
  return {
    preheatSeconds: estimate.print.preheatSeconds * printRatio,
    layersSeconds: estimate.print.layersSeconds * printRatio,
    inMachineCoolingSeconds: estimate.cooling.inMachineSeconds * coolingRatio,
    outsideCoolingSeconds: estimate.cooling.outsideSeconds * coolingRatio,
    breakoutSeconds,
  };
}

/** Where a started run is, as the schedule counts stages. */
function stageOf(row: Row, d: StageDurations, nowMs: number): { stage: RunStage; stageStartedAtMs: number } {
  const started = new Date(row.startedAt!).getTime();
  if (row.status === 'printing') {
    const layersFrom = started + d.preheatSeconds * 1000;
    return nowMs < layersFrom ? { stage: 'preheating', stageStartedAtMs: started } : { stage: 'printing', stageStartedAtMs: layersFrom };
  }
  if (row.status === 'cooling') {
    const ended = new Date(row.printEndedAt!).getTime();
    if (row.leftMachineAt) return { stage: 'cooling_outside', stageStartedAtMs: new Date(row.leftMachineAt).getTime() };
    // Nobody said it left: presume it did when its in-machine time ran out.
    const presumedOut = ended + d.inMachineCoolingSeconds * 1000;
    return nowMs < presumedOut ? { stage: 'cooling_in_machine', stageStartedAtMs: ended } : { stage: 'cooling_outside', stageStartedAtMs: presumedOut };
  }
  return { stage: 'breakout', stageStartedAtMs: new Date(row.breakoutAt!).getTime() };
}

/** A machine's queue with predicted times, and the lead's reordering of it. */
export function queueService(db: Database, deps: { calibration: CalibrationService }) {
  const { sequelize } = db;
  const repo = queueRepository(db);

  async function machineRow(labId: string, machineId: string) {
    if (!UUID.test(machineId)) throw notFound('That machine');
    const row = await repo.machine(labId, machineId);
    if (!row) throw notFound('That machine');
    return row;
  }

  /** `asQueued`: a plan not yet queued, counted as if approved now (at the end of the queue), for review's forecast. */
  async function get(labId: string, machineId: string, nowMs = Date.now(), opts: { asQueued?: string } = {}): Promise<QueueView> {
    const machine = await machineRow(labId, machineId);
    const calibration = await deps.calibration.forMachine(machine.id);
    const rows = await repo.plans<RunEstimate>(labId, machine.id, ON_MACHINE, opts.asQueued ?? null);
    const requests = await repo.requests(rows.map((r) => r.id));
    const requestsOf = new Map<string, Array<{ id: string; title: string; dueDate: string }>>();
    for (const r of requests) {
      const list = requestsOf.get(r.planId) ?? [];
      list.push({ id: r.id, title: r.title, dueDate: r.dueDate });
      requestsOf.set(r.planId, list);
    }
    // Breakout and cleaning: the machine's hands-on hours per build, the lab's own figure.
    const breakoutSeconds = (machine.profile.labourHoursPerBuild ?? 0) * 3600;
    const durations = new Map<string, StageDurations>();
    const queued: QueuedPlan[] = [];
    const started: Row[] = [];
    for (const row of rows) {
      if (!row.estimate) continue;
      const d = durationsFor(row.estimate, calibration, breakoutSeconds);
      durations.set(row.id, d);
      if (row.status === 'queued' || row.id === opts.asQueued) {
        queued.push({ planId: row.id, ...d, dueDatesMs: (requestsOf.get(row.id) ?? []).map((r) => dueEndMs(r.dueDate)) });
      } else {
        started.push(row);
      }
    }
    // The build in the machine, or else the latest started (a chamber cooling outside); the query put the latest first.
    const onMachine = started.find((r) => r.status === 'printing') ?? started[0];
    let current: CurrentRun | undefined;
    if (onMachine) {
      const d = durations.get(onMachine.id)!;
      current = {
        plan: { planId: onMachine.id, ...d, dueDatesMs: (requestsOf.get(onMachine.id) ?? []).map((r) => dueEndMs(r.dueDate)) },
        ...stageOf(onMachine, d, nowMs),
      };
    }
    const schedule = scheduleQueue({ startMs: nowMs, machine: { chamberCount: machine.profile.chamberCount ?? 1 }, plans: queued, current });
    const byId = new Map(rows.map((r) => [r.id, r]));
    const item = (t: PlanTimes): QueueItemView => {
      const row = byId.get(t.planId)!;
      const reqs = requestsOf.get(t.planId) ?? [];
      return {
        planId: t.planId,
        name: row.name,
        status: row.status,
        queuePosition: row.queuePosition,
        material: { id: row.materialId, name: row.materialName ?? '' },
        materialChange: null,
        chamberIndex: t.chamberIndex,
        startAt: new Date(t.startMs).toISOString(),
        printEndAt: new Date(t.printEndMs).toISOString(),
        leavesMachineAt: new Date(t.leavesMachineMs).toISOString(),
        cooledAt: new Date(t.cooledMs).toISOString(),
        breakoutDoneAt: new Date(t.breakoutDoneMs).toISOString(),
        requests: reqs,
        earliestDueDate: reqs.length ? reqs.map((r) => r.dueDate).sort()[0] : null,
        late: t.late,
        lateByHours: t.lateByMs / MS_PER_HOUR,
        durations: durations.get(t.planId)!,
      };
    };
    return {
      machine: { id: machine.id, name: machine.name, chamberCount: machine.profile.chamberCount ?? 1 },
      calibration: {
        printTimeScale: calibration.printTimeScale,
        coolingScale: calibration.coolingScale,
        runs: calibration.runs,
        calibrated: calibration.calibrated,
        printTimeClamped: calibration.printTimeClamped,
        coolingClamped: calibration.coolingClamped,
        coolingFrom: calibration.coolingFrom,
        coolingReadings: calibration.coolingReadings,
        perLayerScale: calibration.perLayerScale,
        scanScale: calibration.scanScale,
        separate: calibration.separate,
      },
      now: new Date(nowMs).toISOString(),
      current: schedule.current ? item(schedule.current) : null,
      // Every build still holding a chamber (a machine with spare chambers may have one cooling outside), each predicted on its own.
      active: started.map((row) => {
        const d = durations.get(row.id)!;
        const own = scheduleQueue({
          startMs: nowMs,
          machine: { chamberCount: 1 },
          plans: [],
          current: { plan: { planId: row.id, ...d, dueDatesMs: (requestsOf.get(row.id) ?? []).map((r) => dueEndMs(r.dueDate)) }, ...stageOf(row, d, nowMs) },
        });
        return item(own.current!);
      }),
      plans: withMaterialChanges(current ? byId.get(current.plan.planId)! : null, schedule.plans.map(item), byId),
    };
  }

  /**
   * Each queued build that runs in another material than the build before it on the machine (the one on it now
   * for the first) is flagged: the hopper, the feed and the overflow have to be emptied and cleaned between them.
   */
  function withMaterialChanges(onMachine: Row | null, plans: QueueItemView[], byId: Map<string, Row>): QueueItemView[] {
    let prev: Row | null = onMachine;
    return plans.map((p) => {
      const row = byId.get(p.planId)!;
      const change =
        prev && prev.materialId !== row.materialId
          ? { previousPlanId: prev.id, previousPlanName: prev.name, previousMaterial: { id: prev.materialId, name: prev.materialName ?? '' } }
          : null;
      prev = row;
      return { ...p, materialChange: change };
    });
  }

  return {
    get,

    /** When each waiting or under-way plan of a machine is expected out of the powder (breakout done), ISO. */
    async readyDates(labId: string, machineId: string): Promise<Map<string, string>> {
      const q = await get(labId, machineId);
      return new Map([...q.active, ...q.plans].map((p) => [p.planId, p.breakoutDoneAt]));
    },

    /** The lead's new order: exactly the machine's queued plans, each once. */
    async reorder(labId: string, machineId: string, user: Actor, input: z.infer<typeof queueOrderSchema>): Promise<QueueView> {
      const machine = await machineRow(labId, machineId);
      const move = await sequelize.transaction(async (transaction) => {
        const rows = await repo.lockQueued(labId, machine.id, transaction);
        const queuedIds = new Set(rows.map((r) => r.id));
        const seen = new Set<string>();
        input.planIds.forEach((id, i) => {
          if (!queuedIds.has(id)) throw new AppError(400, 'invalid_input', `planIds[${i}] is not a plan queued on this machine`, `planIds[${i}]`);
          if (seen.has(id)) throw new AppError(400, 'invalid_input', `planIds[${i}] is listed twice`, `planIds[${i}]`);
          seen.add(id);
        });
        const missing = rows.filter((r) => !seen.has(r.id));
        if (missing.length > 0) {
          throw new AppError(
            400,
            'invalid_input',
            `planIds must list every queued plan of this machine; missing: ${missing.map((m) => `"${m.name}"`).join(', ')}`,
            'planIds',
            { missing: missing.map((m) => m.id) },
          );
        }
        await repo.setOrder(input.planIds, transaction);
        // Kept with the order before it, so the lead can undo it for a short while (and the audit log shows it).
        return repo.recordMove({ labId, machineId: machine.id, userId: user.id, beforeIds: rows.map((r) => r.id), afterIds: input.planIds }, transaction);
      });
      return { ...(await get(labId, machineId)), move: { id: move.id, undoUntil: undoUntil(move.createdAt) } };
    },
  };
}
export type QueueService = ReturnType<typeof queueService>;
