import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db';
import { AppError, badRequest, conflict } from '../errors';
import { parseOrThrow } from '../validation';
import { applyTransition, checkPlanId, lockPlan, planLines, profileRow, type Actor, type LineRow, type PlanRow } from './plans';
import { allowedNext, canTransition, STATUS_LABELS, type PlanStatus } from '../../shared/plans/status';
import { coolingTimer, enoughPowder, printTimer, stageCard, type CoolingTimer, type TemperatureReading } from '../../shared/floor';
import {
  ADVANCE_SCHEMAS,
  advanceTargetSchema,
  readingSchema,
  type CountsInput,
  type DoneInput,
  type RunView,
  type StartRunInput,
} from '../../shared/schemas/runs';

const MS_PER_HOUR = 3_600_000;
/** A time sent with a step may run ahead of the server's clock by this much (phones' clocks drift). */
const FUTURE_SLACK_MS = 2 * 60_000;

export type RunRow = {
  id: string;
  plan_id: string;
  machine_id: string;
  layout_id: string | null;
  checklist: { chamberInPlace: boolean; opticalWindowClean: boolean };
  fresh_powder_loaded_kg: number;
  reused_powder_loaded_kg: number;
  started_at: Date;
  started_by: string | null;
  started_by_name?: string | null;
  print_ended_at: Date | null;
  left_machine_at: Date | null;
  breakout_at: Date | null;
  finishing_at: Date | null;
  done_at: Date | null;
  aborted_at: Date | null;
  abort_reason: string | null;
  finishing_checklist: { powderRemoved: boolean; blasted: boolean; inspected: boolean } | null;
  estimated_print_hours: number;
  estimated_cooling_hours: number;
  print_time_scale_used: number;
  cooling_scale_used: number;
  actual_print_hours: number | null;
  actual_cooling_hours: number | null;
  powder_used_kg: number | null;
};

/** The parts of a layout's estimate a run needs. */
export type RunEstimate = {
  print: { preheatSeconds: number; layersSeconds: number; printSeconds: number };
  cooling: { inMachineSeconds: number; outsideSeconds: number; coolingSeconds: number; inMachinePerHour: number; outsidePerHour: number };
  powder: { freshPowderKg: number; reusedPowderKg: number; cakeMassKg: number };
  calibration?: { printTimeScale: number; coolingScale: number };
};

type ReadingRow = { id: string; temp_c: number; place: 'machine' | 'outside'; taken_at: Date; user_id: string | null; user_name: string | null };
type RunLineRow = { plan_line_id: string; planned_count: number; good_count: number; failed_count: number };

const iso = (d: Date | string | null) => (d ? new Date(d).toISOString() : null);
const ms = (d: Date | string) => new Date(d).getTime();
const person = (id: string | null, name: string | null | undefined) => (id ? { id, name: name ?? '' } : null);

function duration(seconds: number): string {
  const minutes = Math.max(1, Math.round(seconds / 60));
  const h = Math.floor(minutes / 60);
  return h > 0 ? `${h} h ${minutes % 60} min` : `${minutes} min`;
}

/** Everything a run's view and its checks read, at one moment. */
type RunContext = {
  plan: PlanRow;
  machine: Record<string, any> & { id: string; name: string };
  material: Record<string, any> & { id: string; name: string };
  estimate: RunEstimate | null;
  run: RunRow | null;
  readings: ReadingRow[];
  lines: LineRow[];
  runLines: RunLineRow[];
};

/**
 * A plan's run at the machine: starting it after the pre-print checks,
 * recording the print's end or an abort, temperature readings while it cools,
 * breakout counts, finishing and done. Every step is a transition of the
 * plan's status, made under the plan's row lock, so two operators pressing
 * the same button at once cannot both move it.
 */
/** What a start takes from the powder stock, in the start's transaction (it may refuse with a 409). */
export type RunHooks = {
  drawPowder?: (
    d: { labId: string; planId: string; runId: string; materialId: string; freshKg: number; reusedKg: number; lots?: StartRunInput['lots']; at: Date; userId: string },
    transaction: Transaction,
  ) => Promise<void>;
};

export function runsService(db: Database, hooks: RunHooks = {}) {
  const { sequelize } = db;

  async function load(labId: string, planId: string, plan: PlanRow | null, transaction?: Transaction): Promise<RunContext> {
    const q = <T extends object>(sql: string, bind: unknown[]) => sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT, transaction });
    if (!plan) {
      const [row] = await q<PlanRow>('SELECT * FROM plans WHERE id = $1 AND lab_id = $2', [checkPlanId(planId), labId]);
      if (!row) throw new AppError(404, 'not_found', 'That plan was not found.');
      plan = row;
    }
    // One after another: queries on one transaction share its connection, and
    // the driver does not allow them to run side by side there.
    const machine = await profileRow(db, 'machines', labId, plan.machine_id);
    const material = await profileRow(db, 'materials', labId, plan.material_id);
    const lines = await planLines(db, plan.id, transaction);
    const [layout] = plan.chosen_layout_id
      ? await q<{ estimate: RunEstimate }>(`SELECT estimate - 'areaPerLayerMm2' AS estimate FROM layouts WHERE id = $1`, [plan.chosen_layout_id])
      : [];
    const [run] = await q<RunRow>(`SELECT r.*, u.name AS started_by_name FROM runs r LEFT JOIN users u ON u.id = r.started_by WHERE r.plan_id = $1`, [plan.id]);
    const readings = run
      ? await q<ReadingRow>(
          `SELECT g.id, g.temp_c, g.place, g.taken_at, g.user_id, u.name AS user_name
             FROM run_readings g LEFT JOIN users u ON u.id = g.user_id WHERE g.run_id = $1 ORDER BY g.taken_at, g.created_at`,
          [run.id],
        )
      : [];
    const runLines = run ? await q<RunLineRow>('SELECT plan_line_id, planned_count, good_count, failed_count FROM run_lines WHERE run_id = $1', [run.id]) : [];
    return {
      plan,
      machine: machine ?? { id: plan.machine_id, name: '' },
      material: material ?? { id: plan.material_id, name: '' },
      estimate: layout?.estimate ?? null,
      run: run ?? null,
      readings,
      lines,
      runLines,
    };
  }

  function cooling(c: RunContext, nowMs: number): CoolingTimer | null {
    if (!c.run?.print_ended_at || !c.estimate) return null;
    const readings: TemperatureReading[] = c.readings.map((r) => ({ atMs: ms(r.taken_at), tempC: r.temp_c, place: r.place }));
    return coolingTimer({
      printEndedAtMs: ms(c.run.print_ended_at),
      leftMachineAtMs: c.run.left_machine_at ? ms(c.run.left_machine_at) : null,
      nowMs,
      startTempC: c.material.bedTempC,
      ambientTempC: c.machine.ambientTempC,
      removalTempC: c.machine.removalTempC,
      handlingTempC: c.machine.handlingTempC,
      inMachinePerHour: c.estimate.cooling.inMachinePerHour,
      outsidePerHour: c.estimate.cooling.outsidePerHour,
      readings,
    });
  }

  function view(c: RunContext, nowMs = Date.now()): RunView {
    const { plan, run, estimate } = c;
    const counted = new Map(c.runLines.map((l) => [l.plan_line_id, l]));
    const lines = c.lines.map((l) => {
      const rl = counted.get(l.id);
      return {
        requestLineId: l.request_line_id,
        planLineId: l.id,
        part: { id: l.part_id, name: l.part_name },
        request: { id: l.request_id, title: l.request_title, dueDate: l.due_date },
        plannedCount: rl?.planned_count ?? l.quantity,
        goodCount: rl?.good_count ?? null,
        failedCount: rl?.failed_count ?? null,
      };
    });
    const card = stageCard(plan.status, {
      freshPowderKg: estimate?.powder.freshPowderKg,
      reusedPowderKg: estimate?.powder.reusedPowderKg,
      lines: lines.map((l) => ({ requestLineId: l.requestLineId, partName: l.part.name, requestTitle: l.request.title, plannedCount: l.plannedCount })),
    });
    const print =
      plan.status === 'printing' && run && estimate
        ? printTimer({ startedAtMs: ms(run.started_at), nowMs, preheatSeconds: estimate.print.preheatSeconds, printSeconds: estimate.print.printSeconds })
        : null;
    return {
      planId: plan.id,
      planName: plan.name,
      status: plan.status,
      allowedTransitions: [...allowedNext(plan.status)],
      machine: { id: c.machine.id, name: c.machine.name },
      id: run?.id ?? null,
      checklist: run?.checklist ?? null,
      freshPowderLoadedKg: run?.fresh_powder_loaded_kg ?? null,
      reusedPowderLoadedKg: run?.reused_powder_loaded_kg ?? null,
      startedAt: iso(run?.started_at ?? null),
      startedBy: person(run?.started_by ?? null, run?.started_by_name),
      printEndedAt: iso(run?.print_ended_at ?? null),
      leftMachineAt: iso(run?.left_machine_at ?? null),
      breakoutAt: iso(run?.breakout_at ?? null),
      finishingAt: iso(run?.finishing_at ?? null),
      doneAt: iso(run?.done_at ?? null),
      abortedAt: iso(run?.aborted_at ?? null),
      abortReason: run?.abort_reason ?? null,
      finishingChecklist: run?.finishing_checklist ?? null,
      estimate: estimate
        ? {
            printSeconds: estimate.print.printSeconds,
            preheatSeconds: estimate.print.preheatSeconds,
            inMachineCoolingSeconds: estimate.cooling.inMachineSeconds,
            outsideCoolingSeconds: estimate.cooling.outsideSeconds,
            freshPowderKg: estimate.powder.freshPowderKg,
            reusedPowderKg: estimate.powder.reusedPowderKg,
            cakeMassKg: estimate.powder.cakeMassKg,
          }
        : null,
      estimatedPrintHours: run?.estimated_print_hours ?? null,
      estimatedCoolingHours: run?.estimated_cooling_hours ?? null,
      actualPrintHours: run?.actual_print_hours ?? null,
      actualCoolingHours: run?.actual_cooling_hours ?? null,
      powderUsedKg: run?.powder_used_kg ?? null,
      readings: c.readings.map((r) => ({ id: r.id, tempC: r.temp_c, where: r.place, at: iso(r.taken_at)!, by: person(r.user_id, r.user_name) })),
      lines,
      thresholds: {
        startTempC: c.material.bedTempC,
        ambientTempC: c.machine.ambientTempC,
        removalTempC: c.machine.removalTempC,
        handlingTempC: c.machine.handlingTempC,
      },
      timers: { print, cooling: plan.status === 'cooling' ? cooling(c, nowMs) : null },
      card,
      now: new Date(nowMs).toISOString(),
    };
  }

  /** When the step happened: the body's `at` (not in the future, not before the stage it ends) or now. */
  function stepTime(at: string | undefined, notBefore: Date | null, nowMs: number): Date {
    if (at === undefined) return new Date(Math.max(nowMs, notBefore ? ms(notBefore) : 0));
    const t = new Date(at);
    if (t.getTime() > nowMs + FUTURE_SLACK_MS) throw badRequest('at is in the future', 'at');
    if (notBefore && t.getTime() < ms(notBefore)) throw badRequest(`at is before the stage began (${notBefore.toISOString()})`, 'at');
    return t;
  }

  const setRun = (runId: string, sets: string, bind: unknown[], transaction: Transaction) =>
    sequelize.query(`UPDATE runs SET ${sets}, updated_at = now() WHERE id = $1`, { bind: [runId, ...bind], transaction });

  async function start(c: RunContext, user: Actor, input: StartRunInput, when: Date, transaction: Transaction) {
    const est = c.estimate;
    if (!est) throw conflict('no_chosen_layout', 'This plan has no chosen layout, so there is nothing to print.');
    for (const [field, loaded, needed, kind] of [
      ['freshPowderKg', input.freshPowderKg, est.powder.freshPowderKg, 'fresh'],
      ['reusedPowderKg', input.reusedPowderKg, est.powder.reusedPowderKg, 'reused'],
    ] as const) {
      if (!enoughPowder(loaded, needed)) {
        throw badRequest(`${field} is ${loaded} kg, but the build needs at least ${needed.toFixed(2)} kg of ${kind} powder: load more before starting`, field);
      }
    }
    const [inserted] = await sequelize.query<{ id: string }>(
      `INSERT INTO runs (id, plan_id, lab_id, machine_id, layout_id, checklist, fresh_powder_loaded_kg, reused_powder_loaded_kg,
                         started_at, started_by, estimated_print_hours, estimated_cooling_hours, print_time_scale_used,
                         cooling_scale_used, created_at, updated_at)
       VALUES (gen_random_uuid(), $1, $2, $3, $4, $5::jsonb, $6, $7, $8, $9, $10, $11, $12, $13, now(), now()) RETURNING id`,
      {
        type: QueryTypes.SELECT,
        bind: [
          c.plan.id,
          c.plan.lab_id,
          c.plan.machine_id,
          c.plan.chosen_layout_id,
          JSON.stringify(input.checklist),
          input.freshPowderKg,
          input.reusedPowderKg,
          when,
          user.id,
          est.print.printSeconds / 3600,
          est.cooling.coolingSeconds / 3600,
          est.calibration?.printTimeScale ?? 1,
          est.calibration?.coolingScale ?? 1,
        ],
        transaction,
      },
    );
    await hooks.drawPowder?.(
      { labId: c.plan.lab_id, planId: c.plan.id, runId: inserted.id, materialId: c.plan.material_id, freshKg: input.freshPowderKg, reusedKg: input.reusedPowderKg, lots: input.lots, at: when, userId: user.id },
      transaction,
    );
    // Started plans leave the queue; the queue's positions count only what waits.
    await sequelize.query('UPDATE plans SET queue_position = NULL WHERE id = $1', { bind: [c.plan.id], transaction });
  }

  async function counts(c: RunContext, input: CountsInput, transaction: Transaction) {
    const byLine = new Map(c.lines.map((l) => [l.request_line_id, l]));
    const seen = new Set<string>();
    input.counts.forEach((entry, i) => {
      const line = byLine.get(entry.requestLineId);
      if (!line) throw badRequest(`counts[${i}].requestLineId is not a line of this plan`, `counts[${i}].requestLineId`);
      if (seen.has(entry.requestLineId)) throw badRequest(`counts[${i}].requestLineId lists "${line.part_name}" a second time`, `counts[${i}].requestLineId`);
      seen.add(entry.requestLineId);
      if (entry.good + entry.failed > line.quantity) {
        throw badRequest(
          `counts[${i}] has ${entry.good} good and ${entry.failed} failed of "${line.part_name}" (request "${line.request_title}"), but the build held only ${line.quantity}`,
          `counts[${i}]`,
        );
      }
    });
    const missing = c.lines.find((l) => !seen.has(l.request_line_id));
    if (missing) throw badRequest(`counts has no entry for "${missing.part_name}" of request "${missing.request_title}" (${missing.request_line_id})`, 'counts');
    for (const entry of input.counts) {
      const line = byLine.get(entry.requestLineId)!;
      await sequelize.query(
        `INSERT INTO run_lines (run_id, plan_line_id, request_line_id, planned_count, good_count, failed_count) VALUES ($1, $2, $3, $4, $5, $6)`,
        { bind: [c.run!.id, line.id, line.request_line_id, line.quantity, entry.good, entry.failed], transaction },
      );
    }
    // Failed (and unaccounted) parts are open in their requests again; the plan keeps its own quantities as printed.
    await givePlannedBack(
      c.lines.map((l) => {
        const entry = input.counts.find((e) => e.requestLineId === l.request_line_id)!;
        return [l.request_line_id, l.quantity - entry.good] as const;
      }),
      transaction,
    );
  }

  /** Lowers request lines' planned counts by what a run gives back, in the caller's transaction. */
  async function givePlannedBack(back: ReadonlyArray<readonly [string, number]>, transaction: Transaction) {
    const changed = back.filter(([, n]) => n > 0);
    if (changed.length === 0) return;
    await sequelize.query(
      `UPDATE request_lines rl SET planned_count = GREATEST(rl.planned_count - d.n, 0), updated_at = now()
         FROM (SELECT unnest($1::uuid[]) AS id, unnest($2::int[]) AS n) d WHERE rl.id = d.id`,
      { bind: [changed.map(([id]) => id), changed.map(([, n]) => n)], transaction },
    );
  }

  async function finish(c: RunContext, input: DoneInput, when: Date, transaction: Transaction) {
    const powderUsedKg = input.powderUsedKg ?? c.estimate?.powder.freshPowderKg ?? null;
    await setRun(c.run!.id, 'done_at = $2, finishing_checklist = $3::jsonb, powder_used_kg = $4', [when, JSON.stringify(input.finishingChecklist), powderUsedKg], transaction);
    await sequelize.query(
      `UPDATE request_lines rl SET printed_count = rl.printed_count + x.good_count, updated_at = now()
         FROM run_lines x WHERE x.run_id = $1 AND x.request_line_id = rl.id`,
      { bind: [c.run!.id], transaction },
    );
  }

  async function get(labId: string, planId: string): Promise<RunView> {
    return view(await load(labId, planId, null));
  }

  return {
    get,

    async advance(labId: string, planId: string, user: Actor, body: unknown): Promise<RunView> {
      const { to } = parseOrThrow(advanceTargetSchema, body);
      try {
        await sequelize.transaction(async (transaction) => {
          const plan = await lockPlan(db, labId, planId, transaction);
          if (!canTransition(plan.status, to)) throw runConflict(plan.status, to);
          const schema = ADVANCE_SCHEMAS[to];
          if (!schema) throw badRequest(`to: a plan becomes ${STATUS_LABELS[to].toLowerCase()} through its own route, not at the machine`, 'to');
          const input = parseOrThrow(schema, body) as { at?: string } & Record<string, any>;
          const c = await load(labId, planId, plan, transaction);
          const nowMs = Date.now();
          const run = c.run;
          let comment: string | null = null;
          switch (to) {
            case 'printing': {
              await start(c, user, input as StartRunInput, stepTime(input.at, null, nowMs), transaction);
              break;
            }
            case 'cooling': {
              const when = stepTime(input.at, run!.started_at, nowMs);
              await setRun(run!.id, 'print_ended_at = $2, actual_print_hours = $3', [when, (when.getTime() - ms(run!.started_at)) / MS_PER_HOUR], transaction);
              break;
            }
            case 'aborted': {
              const when = stepTime(input.at, run!.started_at, nowMs);
              comment = input.reason as string;
              await setRun(run!.id, 'aborted_at = $2, abort_reason = $3', [when, comment], transaction);
              break;
            }
            case 'breakout': {
              const when = stepTime(input.at, run!.print_ended_at, nowMs);
              const timer = cooling(c, when.getTime())!;
              if (!timer.handlingReached) {
                const handling = c.machine.handlingTempC;
                throw conflict(
                  'still_hot',
                  `The cake is still cooling: about ${duration(timer.remainingToHandlingSeconds)} to the handling temperature of ${handling} °C ` +
                    `(about ${Math.round(timer.predictedTempC)} °C now by the cooling curve). Wait for the timer, or enter a reading at or below ${handling} °C.`,
                  undefined,
                  { remainingSeconds: timer.remainingToHandlingSeconds, predictedTempC: timer.predictedTempC, handlingTempC: handling },
                );
              }
              const leftMs = Math.min(when.getTime(), timer.outside.startMs);
              await setRun(
                run!.id,
                'breakout_at = $2, actual_cooling_hours = $3, left_machine_at = COALESCE(left_machine_at, $4)',
                [when, (when.getTime() - ms(run!.print_ended_at!)) / MS_PER_HOUR, new Date(leftMs)],
                transaction,
              );
              break;
            }
            case 'finishing': {
              const when = stepTime(input.at, run!.breakout_at, nowMs);
              await counts(c, input as CountsInput, transaction);
              await setRun(run!.id, 'finishing_at = $2', [when], transaction);
              break;
            }
            case 'done': {
              await finish(c, input as DoneInput, stepTime(input.at, run!.finishing_at, nowMs), transaction);
              break;
            }
          }
          await applyTransition(db, plan, to, user.id, comment, transaction);
          // An aborted plan holds nothing any more: its lines' quantities are open in their requests again.
          if (to === 'aborted') await givePlannedBack(c.lines.map((l) => [l.request_line_id, l.quantity] as const), transaction);
        });
      } catch (err) {
        // The other operator's press won: answer with the run as it is now.
        if (err instanceof AppError && err.code === 'invalid_transition' && err.details) {
          err.details.run = await get(labId, planId).catch(() => null);
        }
        throw err;
      }
      return get(labId, planId);
    },

    /** A temperature reading while the build cools; a reading outside the machine says the chamber has left it. */
    async addReading(labId: string, planId: string, user: Actor, body: unknown): Promise<RunView> {
      const input = parseOrThrow(readingSchema, body);
      await sequelize.transaction(async (transaction) => {
        const plan = await lockPlan(db, labId, planId, transaction);
        if (plan.status !== 'cooling') {
          throw conflict('not_cooling', `Readings are taken while the build cools; this plan is ${STATUS_LABELS[plan.status].toLowerCase()}.`, undefined, {
            status: plan.status,
          });
        }
        const [run] = await sequelize.query<RunRow>('SELECT * FROM runs WHERE plan_id = $1', { bind: [plan.id], type: QueryTypes.SELECT, transaction });
        const when = stepTime(input.at, run.print_ended_at, Date.now());
        await sequelize.query(
          `INSERT INTO run_readings (id, run_id, temp_c, place, taken_at, user_id, created_at) VALUES (gen_random_uuid(), $1, $2, $3, $4, $5, clock_timestamp())`,
          { bind: [run.id, input.tempC, input.where, when, user.id], transaction },
        );
        if (input.where === 'outside') {
          await setRun(run.id, 'left_machine_at = LEAST(COALESCE(left_machine_at, $2), $2)', [when], transaction);
        }
      });
      return get(labId, planId);
    },
  };
}
export type RunsService = ReturnType<typeof runsService>;

/** 409 with the statuses the run can move to and (filled in after the rollback) the run as it is now. */
function runConflict(from: PlanStatus, to: PlanStatus): AppError {
  const allowed = allowedNext(from).filter((s) => s !== 'cancelled');
  const can = allowed.length ? allowed.map((s) => STATUS_LABELS[s].toLowerCase()).join(', ') : 'nothing else';
  return conflict(
    'invalid_transition',
    `This build is ${STATUS_LABELS[from].toLowerCase()}, so it cannot become ${STATUS_LABELS[to].toLowerCase()}; from here it can become: ${can}.`,
    undefined,
    { status: from, allowed: [...allowedNext(from)] },
  );
}
