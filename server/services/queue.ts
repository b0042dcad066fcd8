import { QueryTypes } from 'sequelize';
import type { Database } from '../db';
import { AppError, notFound } from '../errors';
import type { z } from 'zod';
import type { Actor } from './planCommon';
import { undoUntil } from './takeBack';
import type { CalibrationService } from './calibration';
import type { RunEstimate } from './runs';
import { scheduleQueue, type CurrentRun, type PlanTimes, type QueuedPlan, type RunStage, type StageDurations } from '../../shared/schedule';
import type { queueOrderSchema, QueueItemView, QueueView } from '../../shared/schemas/runs';
import type { MachineProfile } from '../../shared/types/profiles';
import type { PlanStatus } from '../../shared/plans/status';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const MS_PER_HOUR = 3_600_000;

/** In-progress statuses that still hold the machine or a chamber (finishing happens away from both). */
const ON_MACHINE: readonly PlanStatus[] = ['printing', 'cooling', 'breakout'];

type Row = {
  id: string;
  name: string;
  status: PlanStatus;
  queue_position: number | null;
  material_id: string;
  material_name: string | null;
  estimate: RunEstimate | null;
  started_at: Date | null;
  print_ended_at: Date | null;
  left_machine_at: Date | null;
  breakout_at: Date | null;
};

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
  const started = new Date(row.started_at!).getTime();
  if (row.status === 'printing') {
    const layersFrom = started + d.preheatSeconds * 1000;
    return nowMs < layersFrom ? { stage: 'preheating', stageStartedAtMs: started } : { stage: 'printing', stageStartedAtMs: layersFrom };
  }
  if (row.status === 'cooling') {
    const ended = new Date(row.print_ended_at!).getTime();
    if (row.left_machine_at) return { stage: 'cooling_outside', stageStartedAtMs: new Date(row.left_machine_at).getTime() };
    // Nobody said it left: presume it did when its in-machine time ran out.
    const presumedOut = ended + d.inMachineCoolingSeconds * 1000;
    return nowMs < presumedOut ? { stage: 'cooling_in_machine', stageStartedAtMs: ended } : { stage: 'cooling_outside', stageStartedAtMs: presumedOut };
  }
  return { stage: 'breakout', stageStartedAtMs: new Date(row.breakout_at!).getTime() };
}

/** A machine's queue with predicted times, and the lead's reordering of it. */
export function queueService(db: Database, deps: { calibration: CalibrationService }) {
  const { sequelize } = db;

  async function machineRow(labId: string, machineId: string) {
    if (!UUID.test(machineId)) throw notFound('That machine');
    const [row] = await sequelize.query<{ id: string; name: string; profile: Partial<MachineProfile> }>(
      'SELECT id, name, profile FROM machines WHERE id = $1 AND lab_id = $2',
      { bind: [machineId, labId], type: QueryTypes.SELECT },
    );
    if (!row) throw notFound('That machine');
    return row;
  }

  /** `asQueued`: a plan not yet queued, counted as if approved now (at the end of the queue), for review's forecast. */
  async function get(labId: string, machineId: string, nowMs = Date.now(), opts: { asQueued?: string } = {}): Promise<QueueView> {
    const machine = await machineRow(labId, machineId);
    const calibration = await deps.calibration.forMachine(machine.id);
    const rows = await sequelize.query<Row>(
      `SELECT p.id, p.name, p.status, p.queue_position, p.material_id, mt.name AS material_name, l.estimate - 'areaPerLayerMm2' AS estimate,
              r.started_at, r.print_ended_at, r.left_machine_at, r.breakout_at
         FROM plans p LEFT JOIN layouts l ON l.id = p.chosen_layout_id LEFT JOIN runs r ON r.plan_id = p.id
         LEFT JOIN materials mt ON mt.id = p.material_id
        WHERE p.machine_id = $1 AND p.lab_id = $2 AND (p.status = 'queued' OR p.status = ANY($3::text[]) OR p.id = $4::uuid)
        ORDER BY p.queue_position NULLS LAST, r.started_at DESC NULLS LAST, p.created_at`,
      { bind: [machine.id, labId, ON_MACHINE, opts.asQueued ?? null], type: QueryTypes.SELECT },
    );
    const requests = await sequelize.query<{ plan_id: string; id: string; title: string; due_date: string }>(
      `SELECT DISTINCT pl.plan_id, r.id, r.title, to_char(r.due_date, 'YYYY-MM-DD') AS due_date
         FROM plan_lines pl JOIN request_lines rl ON rl.id = pl.request_line_id JOIN requests r ON r.id = rl.request_id
        WHERE pl.plan_id = ANY($1::uuid[]) ORDER BY due_date, r.title`,
      { bind: [rows.map((r) => r.id)], type: QueryTypes.SELECT },
    );
    const requestsOf = new Map<string, Array<{ id: string; title: string; dueDate: string }>>();
    for (const r of requests) {
      const list = requestsOf.get(r.plan_id) ?? [];
      list.push({ id: r.id, title: r.title, dueDate: r.due_date });
      requestsOf.set(r.plan_id, list);
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
        queuePosition: row.queue_position,
        material: { id: row.material_id, name: row.material_name ?? '' },
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
        prev && prev.material_id !== row.material_id
          ? { previousPlanId: prev.id, previousPlanName: prev.name, previousMaterial: { id: prev.material_id, name: prev.material_name ?? '' } }
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
        // The same lock approval takes, so a plan approved meanwhile is either in the list read here or after it.
        await sequelize.query('SELECT id FROM machines WHERE id = $1 FOR UPDATE', { bind: [machine.id], transaction });
        const rows = await sequelize.query<{ id: string; name: string }>(
          `SELECT id, name FROM plans WHERE machine_id = $1 AND lab_id = $2 AND status = 'queued' ORDER BY queue_position FOR UPDATE`,
          { bind: [machine.id, labId], type: QueryTypes.SELECT, transaction },
        );
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
        if (input.planIds.length > 0) {
          await sequelize.query(
            `UPDATE plans p SET queue_position = o.pos, updated_at = now()
               FROM unnest($1::uuid[]) WITH ORDINALITY AS o(id, pos) WHERE p.id = o.id`,
            { bind: [input.planIds], transaction },
          );
        }
        // Kept with the order before it, so the lead can undo it for a short while (and the audit log shows it).
        const [kept] = await sequelize.query<{ id: string; created_at: Date }>(
          `INSERT INTO queue_moves (lab_id, machine_id, user_id, before_ids, after_ids) VALUES ($1, $2, $3, $4::uuid[], $5::uuid[]) RETURNING id, created_at`,
          { bind: [labId, machine.id, user.id, rows.map((r) => r.id), input.planIds], type: QueryTypes.SELECT, transaction },
        );
        return kept;
      });
      return { ...(await get(labId, machineId)), move: { id: move.id, undoUntil: undoUntil(move.created_at) } };
    },
  };
}
export type QueueService = ReturnType<typeof queueService>;
