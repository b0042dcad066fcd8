// Over 450 lines: one run at the machine as one state machine (its view, start, counts, finish, readings), every step on the same loaded context inside one transaction.
import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db';
import { AppError, badRequest, conflict } from '../errors';
import { applyTransition, checkPlanId, lockPlan, planLines, profileRow, type Actor, type LineRow, type MachineRow, type MaterialRow, type PlanRow } from './planCommon';
import { allowedNext, canTransition, STATUS_LABELS, type PlanStatus } from '../../shared/plans/status';
import {
  checkReading,
  confirmedBy,
  coolingTimer,
  enoughPowder,
  printTimer,
  readingCounts,
  stageCard,
  CONFIRM_AFTER_MINUTES,
  type CoolingModel,
  type CoolingTimer,
  type ReadingCheckStatus,
  type TemperatureReading,
} from '../../shared/floor';
import type { CakeThermal } from '../../shared/estimate/conduction';
import type { Mailer } from '../mail/mailer';
import type { AcceptReadingInput, AdvanceInput, CountsInput, DoneInput, ReadingInput, RunView, StartRunInput } from '../../shared/schemas/runs';

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
  estimated_preheat_hours: number | null;
  estimated_layer_hours: number | null;
  estimated_scan_hours: number | null;
};

/** The parts of a layout's estimate a run needs. */
export type RunEstimate = {
  print: { preheatSeconds: number; layersSeconds: number; printSeconds: number; recoatSeconds?: number; scanSeconds?: number; contourSeconds?: number };
  cooling: { inMachineSeconds: number; outsideSeconds: number; coolingSeconds: number; inMachinePerHour: number; outsidePerHour: number };
  powder: { freshPowderKg: number; reusedPowderKg: number; cakeMassKg: number };
  calibration?: { printTimeScale: number; coolingScale: number; layerTimeScale?: number; scanTimeScale?: number };
  /** The powder cake x, y, z (mm); from the layer count and the chamber for estimates stored before it was kept. */
  cakeMm?: [number, number, number];
  layerCount?: number;
  layerHeightMm?: number;
};

type ReadingRow = {
  id: string;
  temp_c: number;
  place: 'machine' | 'outside';
  taken_at: Date;
  user_id: string | null;
  user_name: string | null;
  check_status: ReadingCheckStatus;
  coolest_c: number | null;
  confirmed_by_reading_id: string | null;
  accepted_by: string | null;
  accepted_by_name: string | null;
  accepted_reason: string | null;
  accepted_at: Date | null;
};
type RunLineRow = { plan_line_id: string; planned_count: number; good_count: number; failed_count: number };

/** An e-mail to send once the step is committed. */
type Notice = { to: string; subject: string; text: string };

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
  machine: MachineRow;
  material: MaterialRow;
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

export function runsService(db: Database, hooks: RunHooks & { mailer?: Mailer; appUrl?: string; log?: (msg: string) => void } = {}) {
  const deps = hooks;
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
          `SELECT g.id, g.temp_c, g.place, g.taken_at, g.user_id, u.name AS user_name, g.check_status, g.coolest_c,
                  g.confirmed_by_reading_id, g.accepted_by, a.name AS accepted_by_name, g.accepted_reason, g.accepted_at
             FROM run_readings g LEFT JOIN users u ON u.id = g.user_id LEFT JOIN users a ON a.id = g.accepted_by
            WHERE g.run_id = $1 ORDER BY g.taken_at, g.created_at`,
          [run.id],
        )
      : [];
    const runLines = run ? await q<RunLineRow>('SELECT plan_line_id, planned_count, good_count, failed_count FROM run_lines WHERE run_id = $1', [run.id]) : [];
    // A plan's machine and material cannot be deleted while the plan exists.
    if (!machine || !material) throw new AppError(404, 'not_found', "That plan's machine or material was not found.");
    return {
      plan,
      machine,
      material,
      estimate: layout?.estimate ?? null,
      run: run ?? null,
      readings,
      lines,
      runLines,
    };
  }

  /** The run's cake as its estimate saw it, for the conduction model of its cooling; null without an estimate. */
  function cakeOf(c: RunContext): CakeThermal | null {
    const est = c.estimate;
    if (!est) return null;
    const chamber = c.machine.chamberMm as number[] | undefined;
    const sizeMm = est.cakeMm ?? (chamber && est.layerCount && est.layerHeightMm ? [chamber[0], chamber[1], est.layerCount * est.layerHeightMm] : null);
    if (!sizeMm) return null;
    return {
      sizeMm,
      conductivityWPerMK: c.material.powderConductivityWPerMK,
      densityGPerCm3: c.material.bulkDensityGPerCm3,
      heatCapacityJPerKgK: c.material.powderHeatCapacityJPerKgK,
      surfaceWPerM2K: c.machine.coolingSurfaceWPerM2K,
      startTempC: c.material.bedTempC,
      ambientTempC: c.machine.ambientTempC,
      coolingScale: est.calibration?.coolingScale ?? 1,
    };
  }

  /** The cooling model a reading is checked against; null before the print ended or without an estimate. */
  function coolingModel(c: RunContext, run: RunRow | null = c.run): CoolingModel | null {
    const cake = cakeOf(c);
    if (!run?.print_ended_at || !cake) return null;
    return { printEndedAtMs: ms(run.print_ended_at), cake };
  }

  function cooling(c: RunContext, nowMs: number): CoolingTimer | null {
    const cake = cakeOf(c);
    if (!c.run?.print_ended_at || !cake) return null;
    // A reading the model cannot explain moves no timer and unlocks nothing until it is confirmed or accepted.
    const readings: TemperatureReading[] = c.readings
      .filter((r) => readingCounts(r.check_status))
      .map((r) => ({ atMs: ms(r.taken_at), tempC: r.temp_c, place: r.place }));
    return coolingTimer({
      printEndedAtMs: ms(c.run.print_ended_at),
      leftMachineAtMs: c.run.left_machine_at ? ms(c.run.left_machine_at) : null,
      nowMs,
      cake,
      removalTempC: c.machine.removalTempC,
      handlingTempC: c.machine.handlingTempC,
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
      material: { id: c.material.id, name: c.material.name },
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
      readings: c.readings.map((r) => ({
        id: r.id,
        tempC: r.temp_c,
        where: r.place,
        at: iso(r.taken_at)!,
        by: person(r.user_id, r.user_name),
        check: {
          status: r.check_status,
          coolestC: r.coolest_c,
          confirmedBy: r.confirmed_by_reading_id,
          accepted: r.accepted_by ? { by: person(r.accepted_by, r.accepted_by_name)!, reason: r.accepted_reason ?? '', at: iso(r.accepted_at)! } : null,
        },
      })),
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

  /**
   * When the step happened: the body's `at` or now. Never in the future (beyond a phone clock's drift) and never
   * before `notBefore`: the start of the stage it ends, or for a start the plan's approval.
   */
  function stepTime(at: string | undefined, notBefore: Date | null, nowMs: number, what = 'the stage began'): Date {
    if (at === undefined) return new Date(Math.max(nowMs, notBefore ? ms(notBefore) : 0));
    const t = new Date(at);
    if (t.getTime() > nowMs + FUTURE_SLACK_MS) throw badRequest(`at (${t.toISOString()}) is in the future; the server's time is ${new Date(nowMs).toISOString()}`, 'at');
    if (notBefore && t.getTime() < ms(notBefore)) throw badRequest(`at (${t.toISOString()}) is before ${what} (${new Date(notBefore).toISOString()})`, 'at');
    return t;
  }

  /** When the plan was approved (its latest approval): no run of it can have started earlier. */
  async function approvedAt(planId: string, transaction: Transaction): Promise<Date | null> {
    const [row] = await sequelize.query<{ at: Date | null }>(
      `SELECT MAX(created_at) AS at FROM plan_events WHERE plan_id = $1 AND to_status = 'approved'`,
      { bind: [planId], type: QueryTypes.SELECT, transaction },
    );
    return row?.at ?? null;
  }

  /**
   * One build prints on a machine at a time. The caller holds the machine's row lock, so two starts on one
   * machine are checked one after the other. 409 naming the build that holds the machine, or (for a start
   * recorded late) the build that was printing at that time.
   */
  async function checkMachineFree(c: RunContext, when: Date, transaction: Transaction) {
    const [busy] = await sequelize.query<{ plan_id: string; name: string; started_at: Date }>(
      `SELECT r.plan_id, p.name, r.started_at FROM runs r JOIN plans p ON p.id = r.plan_id
        WHERE r.machine_id = $1 AND r.plan_id <> $2 AND r.print_ended_at IS NULL AND r.aborted_at IS NULL LIMIT 1`,
      { bind: [c.plan.machine_id, c.plan.id], type: QueryTypes.SELECT, transaction },
    );
    if (busy) {
      throw conflict(
        'machine_busy',
        `${c.machine.name || 'This machine'} is printing "${busy.name}" (started ${new Date(busy.started_at).toISOString()}): record its end or abort it before starting "${c.plan.name}".`,
        undefined,
        { planId: busy.plan_id, planName: busy.name },
      );
    }
    const [overlap] = await sequelize.query<{ plan_id: string; name: string; ended: Date }>(
      `SELECT r.plan_id, p.name, COALESCE(r.print_ended_at, r.aborted_at) AS ended FROM runs r JOIN plans p ON p.id = r.plan_id
        WHERE r.machine_id = $1 AND r.plan_id <> $2 AND COALESCE(r.print_ended_at, r.aborted_at) > $3
        ORDER BY ended DESC LIMIT 1`,
      { bind: [c.plan.machine_id, c.plan.id, when], type: QueryTypes.SELECT, transaction },
    );
    if (overlap) {
      throw conflict(
        'machine_busy',
        `at (${when.toISOString()}) is while "${overlap.name}" was still printing on ${c.machine.name || 'this machine'} (until ${new Date(overlap.ended).toISOString()}).`,
        'at',
        { planId: overlap.plan_id, planName: overlap.name },
      );
    }
  }

  /** Every step after the start names the run it acts on, so a card showing another build can never move this one. */
  function checkRunNamed(c: RunContext, runId: string | undefined) {
    if (!c.run) return;
    if (runId !== c.run.id) {
      throw conflict(
        'wrong_run',
        `runId names another run than "${c.plan.name}" has (${c.run.id}): reload the card and try again.`,
        'runId',
        { runId: c.run.id, planId: c.plan.id, planName: c.plan.name },
      );
    }
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
    const printScale = est.calibration?.printTimeScale ?? 1;
    // The estimate's parts before any calibration, for the separate fits of per-layer and scan time: the laser's
    // time (hatch and contours) under the scan factor, the rest (recoat, layer waits, preheat) under the layer factor.
    const layerScale = est.calibration?.layerTimeScale ?? printScale;
    const scanScale = est.calibration?.scanTimeScale ?? printScale;
    const laserSeconds = est.print.scanSeconds != null ? est.print.scanSeconds + (est.print.contourSeconds ?? 0) : null;
    const layerSeconds = laserSeconds !== null ? est.print.layersSeconds - laserSeconds : null;
    const [inserted] = await sequelize.query<{ id: string }>(
      `INSERT INTO runs (id, plan_id, lab_id, machine_id, layout_id, checklist, fresh_powder_loaded_kg, reused_powder_loaded_kg,
                         started_at, started_by, estimated_print_hours, estimated_cooling_hours, print_time_scale_used,
                         cooling_scale_used, estimated_preheat_hours, estimated_layer_hours, estimated_scan_hours, created_at, updated_at)
       VALUES (gen_random_uuid(), $1, $2, $3, $4, $5::jsonb, $6, $7, $8, $9, $10, $11, $12, $13, $14, $15, $16, now(), now()) RETURNING id`,
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
          printScale,
          est.calibration?.coolingScale ?? 1,
          est.print.preheatSeconds / layerScale / 3600,
          layerSeconds === null ? null : layerSeconds / layerScale / 3600,
          laserSeconds === null ? null : laserSeconds / scanScale / 3600,
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

  /** The designers (who filed the requests) of a run's lines, with their request's lines now. */
  async function requestsOf(c: RunContext, transaction: Transaction) {
    const ids = [...new Set(c.lines.map((l) => l.request_id))];
    const rows = await sequelize.query<{ id: string; title: string; status: string; email: string | null; quantity: number; printed: number }>(
      `SELECT r.id, r.title, r.status, u.email, SUM(rl.quantity)::int AS quantity, SUM(LEAST(rl.printed_count, rl.quantity))::int AS printed
         FROM requests r JOIN request_lines rl ON rl.request_id = r.id LEFT JOIN users u ON u.id = r.created_by
        WHERE r.id = ANY($1::uuid[]) GROUP BY r.id, u.email`,
      { bind: [ids], type: QueryTypes.SELECT, transaction },
    );
    return rows;
  }

  const requestLink = (requestId: string) => (deps.appUrl ? `\n\n${deps.appUrl}/requests/${requestId}` : '');

  /** After breakout: each designer whose parts failed hears which, and that they are open to plan again. */
  async function failedNotices(c: RunContext, input: CountsInput, transaction: Transaction): Promise<Notice[]> {
    const failedOf = new Map<string, string[]>();
    for (const entry of input.counts) {
      const line = c.lines.find((l) => l.request_line_id === entry.requestLineId)!;
      const notGood = line.quantity - entry.good;
      if (notGood <= 0) continue;
      const text = `${line.part_name}: ${entry.failed} failed${notGood > entry.failed ? `, ${notGood - entry.failed} not accounted for` : ''} of ${line.quantity}`;
      failedOf.set(line.request_id, [...(failedOf.get(line.request_id) ?? []), text]);
    }
    if (failedOf.size === 0) return [];
    const requests = await requestsOf(c, transaction);
    return requests
      .filter((r) => r.email && failedOf.has(r.id))
      .map((r) => ({
        to: r.email!,
        subject: `Parts failed in build ${c.plan.name}, request ${r.title}`,
        text:
          `The build "${c.plan.name}" on ${c.machine.name} was broken out and some of the parts of your request "${r.title}" did not come out good:\n\n` +
          failedOf.get(r.id)!.map((t) => `- ${t}`).join('\n') +
          `\n\nThey are open in the request again, so a planner can put them in a later build.` +
          requestLink(r.id),
      }));
  }

  /** After done: a request whose every part is now printed is done, and its designer hears so. */
  async function doneNotices(c: RunContext, transaction: Transaction): Promise<Notice[]> {
    const requests = await requestsOf(c, transaction);
    const complete = requests.filter((r) => r.status === 'open' && r.printed >= r.quantity);
    if (complete.length === 0) return [];
    await sequelize.query(`UPDATE requests SET status = 'done', updated_at = now() WHERE id = ANY($1::uuid[])`, {
      bind: [complete.map((r) => r.id)],
      transaction,
    });
    return complete
      .filter((r) => r.email)
      .map((r) => ({
        to: r.email!,
        subject: `Request done: ${r.title}`,
        text: `All ${r.quantity} parts of your request "${r.title}" are printed; the last of them came out of the build "${c.plan.name}" on ${c.machine.name}.` + requestLink(r.id),
      }));
  }

  async function send(mail: Notice[]) {
    for (const m of mail) {
      try {
        await deps.mailer?.send(m);
      } catch (err) {
        // The step stands; the request page shows the same counts.
        deps.log?.(`could not e-mail ${m.to}: ${(err as Error).message}`);
      }
    }
  }

  async function get(labId: string, planId: string): Promise<RunView> {
    return view(await load(labId, planId, null));
  }

  return {
    get,

    /**
     * Whether the plan may move to `to` now, answered (409, with the run as it
     * is) before the stage's fields are checked: a screen that is behind learns
     * the build's state rather than a complaint about a form it no longer shows.
     */
    async checkAdvance(labId: string, planId: string, to: PlanStatus): Promise<void> {
      try {
        await sequelize.transaction(async (transaction) => {
          const plan = await lockPlan(db, labId, planId, transaction);
          if (!canTransition(plan.status, to)) throw runConflict(plan.status, to);
        });
      } catch (err) {
        if (err instanceof AppError && err.code === 'invalid_transition' && err.details) {
          err.details.run = await get(labId, planId).catch(() => null);
        }
        throw err;
      }
    },

    async advance(labId: string, planId: string, user: Actor, input: AdvanceInput): Promise<RunView> {
      const { to } = input;
      let mail: Notice[] = [];
      try {
        await sequelize.transaction(async (transaction) => {
          if (to === 'printing') {
            // The machine's row first (as approvals and the queue's reorder take it), then the plan's: two starts on
            // one machine, of the same plan or of two, are checked one after the other.
            const [row] = await sequelize.query<{ machine_id: string }>('SELECT machine_id FROM plans WHERE id = $1 AND lab_id = $2', {
              bind: [checkPlanId(planId), labId],
              type: QueryTypes.SELECT,
              transaction,
            });
            if (row) await sequelize.query('SELECT id FROM machines WHERE id = $1 FOR UPDATE', { bind: [row.machine_id], transaction });
          }
          const plan = await lockPlan(db, labId, planId, transaction);
          // Checked again under the lock: the other operator's press may have come first.
          if (!canTransition(plan.status, to)) throw runConflict(plan.status, to);
          const c = await load(labId, planId, plan, transaction);
          checkRunNamed(c, 'runId' in input ? input.runId : undefined);
          const nowMs = Date.now();
          const run = c.run;
          let comment: string | null = null;
          switch (to) {
            case 'printing': {
              const when = stepTime(input.at, await approvedAt(plan.id, transaction), nowMs, 'the plan was approved');
              await checkMachineFree(c, when, transaction);
              await start(c, user, input as StartRunInput, when, transaction);
              break;
            }
            case 'cooling': {
              const when = stepTime(input.at, run!.started_at, nowMs);
              await setRun(run!.id, 'print_ended_at = $2, actual_print_hours = $3', [when, (when.getTime() - ms(run!.started_at)) / MS_PER_HOUR], transaction);
              break;
            }
            case 'aborted': {
              const when = stepTime(input.at, run!.started_at, nowMs);
              comment = input.to === 'aborted' ? input.reason : null;
              // The hours it printed are kept for the record; an aborted run never counts toward calibration.
              await setRun(run!.id, 'aborted_at = $2, abort_reason = $3, actual_print_hours = $4', [when, comment, (when.getTime() - ms(run!.started_at)) / MS_PER_HOUR], transaction);
              break;
            }
            case 'breakout': {
              const when = stepTime(input.at, run!.print_ended_at, nowMs);
              const timer = cooling(c, when.getTime())!;
              if (!timer.handlingReached) {
                const handling = c.machine.handlingTempC;
                const doubted = c.readings.filter((r) => r.check_status === 'unexplained' && r.temp_c <= handling);
                const doubt = doubted.length
                  ? ` The reading of ${doubted[doubted.length - 1].temp_c} °C is colder than the cake can cool by then ` +
                    `(at least ${Math.round(doubted[doubted.length - 1].coolest_c ?? handling)} °C by the cooling model): take a second reading at least ` +
                    `${CONFIRM_AFTER_MINUTES} minutes after it, or ask a lead to accept it with a reason.`
                  : '';
                throw conflict(
                  'still_hot',
                  `The cake is still cooling: about ${duration(timer.remainingToHandlingSeconds)} to the handling temperature of ${handling} °C ` +
                    `(about ${Math.round(timer.predictedTempC)} °C now by the cooling curve). Wait for the timer, or enter a reading at or below ${handling} °C.` +
                    doubt,
                  undefined,
                  {
                    remainingSeconds: timer.remainingToHandlingSeconds,
                    predictedTempC: timer.predictedTempC,
                    handlingTempC: handling,
                    unexplainedReadings: doubted.map((r) => r.id),
                  },
                );
              }
              const leftMs = Math.min(when.getTime(), timer.outsideStartMs);
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
              mail = await failedNotices(c, input as CountsInput, transaction);
              break;
            }
            case 'done': {
              await finish(c, input as DoneInput, stepTime(input.at, run!.finishing_at, nowMs), transaction);
              mail = await doneNotices(c, transaction);
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
      await send(mail);
      return get(labId, planId);
    },

    /** A temperature reading while the build cools; a reading outside the machine says the chamber has left it. */
    async addReading(labId: string, planId: string, user: Actor, input: ReadingInput): Promise<RunView> {
      await sequelize.transaction(async (transaction) => {
        const plan = await lockPlan(db, labId, planId, transaction);
        if (plan.status !== 'cooling') {
          throw conflict('not_cooling', `Readings are taken while the build cools; this plan is ${STATUS_LABELS[plan.status].toLowerCase()}.`, undefined, {
            status: plan.status,
          });
        }
        const c = await load(labId, planId, plan, transaction);
        checkRunNamed(c, input.runId);
        const run = c.run!;
        const when = stepTime(input.at, run.print_ended_at, Date.now(), 'the print ended');
        if (input.where === 'outside') {
          await setRun(run.id, 'left_machine_at = LEAST(COALESCE(left_machine_at, $2), $2)', [when], transaction);
          run.left_machine_at = run.left_machine_at && ms(run.left_machine_at) < when.getTime() ? run.left_machine_at : when;
        }
        // Checked against the cooling model: a reading colder than the cake can be is held until a second one agrees.
        const model = coolingModel(c, run);
        const check = model ? checkReading(model, { atMs: when.getTime(), tempC: input.tempC }) : null;
        const earlier = c.readings.map((r) => ({ id: r.id, atMs: ms(r.taken_at), tempC: r.temp_c, status: r.check_status }));
        const confirms = check && !check.explained ? confirmedBy(earlier, { atMs: when.getTime(), tempC: input.tempC }) : null;
        const status: ReadingCheckStatus = !check || check.explained ? 'explained' : confirms ? 'confirmed' : 'unexplained';
        const [[inserted]] = (await sequelize.query(
          `INSERT INTO run_readings (id, run_id, temp_c, place, taken_at, user_id, check_status, coolest_c, created_at)
           VALUES (gen_random_uuid(), $1, $2, $3, $4, $5, $6, $7, clock_timestamp()) RETURNING id`,
          { bind: [run.id, input.tempC, input.where, when, user.id, status, check?.coolestC ?? null], transaction },
        )) as [Array<{ id: string }>, unknown];
        if (confirms) {
          await sequelize.query(`UPDATE run_readings SET check_status = 'confirmed', confirmed_by_reading_id = $2 WHERE id = $1`, {
            bind: [confirms.id, inserted.id],
            transaction,
          });
        }
      });
      return get(labId, planId);
    },

    /** A lead accepts a reading the cooling model cannot explain, with the reason; it then counts like any other. */
    async acceptReading(labId: string, planId: string, readingId: string, user: Actor, input: AcceptReadingInput): Promise<RunView> {
      await sequelize.transaction(async (transaction) => {
        const plan = await lockPlan(db, labId, planId, transaction);
        if (plan.status !== 'cooling') {
          throw conflict('not_cooling', `Readings are accepted while the build cools; this plan is ${STATUS_LABELS[plan.status].toLowerCase()}.`, undefined, {
            status: plan.status,
          });
        }
        const c = await load(labId, planId, plan, transaction);
        checkRunNamed(c, input.runId);
        const reading = c.readings.find((r) => r.id === readingId);
        if (!reading) throw new AppError(404, 'not_found', 'That reading was not found on this run.');
        if (reading.check_status !== 'unexplained') {
          throw conflict('reading_not_doubted', `The reading of ${reading.temp_c} °C is ${reading.check_status}: there is nothing to accept.`, undefined, {
            checkStatus: reading.check_status,
          });
        }
        await sequelize.query(
          `UPDATE run_readings SET check_status = 'accepted', accepted_by = $2, accepted_reason = $3, accepted_at = now() WHERE id = $1`,
          { bind: [reading.id, user.id, input.reason], transaction },
        );
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
