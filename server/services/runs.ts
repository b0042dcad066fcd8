// Over 450 lines: one run at the machine as one state machine (its view, start, counts, finish, readings), every step on the same loaded context inside one transaction.
import type { Transaction } from 'sequelize';
import type { Database } from '../db';
import { plansRepository, type PlanHead } from '../db/repositories/plans';
import { runsRepository, type ReadingRecord, type RunLineRecord, type RunRecord } from '../db/repositories/runs';
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
  plan: PlanHead;
  machine: MachineRow;
  material: MaterialRow;
  estimate: RunEstimate | null;
  run: RunRecord | null;
  readings: ReadingRecord[];
  lines: LineRow[];
  runLines: RunLineRecord[];
};

/** The locked plan row as the run's context reads it. */
const headOf = (p: PlanRow): PlanHead => ({
  id: p.id,
  labId: p.lab_id,
  name: p.name,
  status: p.status,
  machineId: p.machine_id,
  materialId: p.material_id,
  chosenLayoutId: p.chosen_layout_id,
  queuePosition: p.queue_position,
  version: p.version,
});

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
  const repo = runsRepository(db);
  const plans = plansRepository(db);

  async function load(labId: string, planId: string, locked: PlanRow | null, transaction?: Transaction): Promise<RunContext> {
    const plan = locked ? headOf(locked) : await plans.head(labId, checkPlanId(planId), transaction);
    if (!plan) throw new AppError(404, 'not_found', 'That plan was not found.');
    // One after another: queries on one transaction share its connection, and
    // the driver does not allow them to run side by side there.
    const machine = await profileRow(db, 'machines', labId, plan.machineId);
    const material = await profileRow(db, 'materials', labId, plan.materialId);
    const lines = await planLines(db, plan.id, transaction);
    const estimate = plan.chosenLayoutId ? await repo.estimate<RunEstimate>(plan.chosenLayoutId, transaction) : null;
    const run = await repo.runOfPlan(plan.id, transaction);
    const readings = run ? await repo.readings(run.id, transaction) : [];
    const runLines = run ? await repo.lines(run.id, transaction) : [];
    // A plan's machine and material cannot be deleted while the plan exists.
    if (!machine || !material) throw new AppError(404, 'not_found', "That plan's machine or material was not found.");
    return {
      plan,
      machine,
      material,
      estimate,
      run,
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
  function coolingModel(c: RunContext, run: RunRecord | null = c.run): CoolingModel | null {
    const cake = cakeOf(c);
    if (!run?.printEndedAt || !cake) return null;
    return { printEndedAtMs: ms(run.printEndedAt), cake };
  }

  function cooling(c: RunContext, nowMs: number): CoolingTimer | null {
    const cake = cakeOf(c);
    if (!c.run?.printEndedAt || !cake) return null;
    // A reading the model cannot explain moves no timer and unlocks nothing until it is confirmed or accepted.
    const readings: TemperatureReading[] = c.readings
      .filter((r) => readingCounts(r.checkStatus))
      .map((r) => ({ atMs: ms(r.takenAt), tempC: r.tempC, place: r.place }));
    return coolingTimer({
      printEndedAtMs: ms(c.run.printEndedAt),
      leftMachineAtMs: c.run.leftMachineAt ? ms(c.run.leftMachineAt) : null,
      nowMs,
      cake,
      removalTempC: c.machine.removalTempC,
      handlingTempC: c.machine.handlingTempC,
      readings,
    });
  }

  function view(c: RunContext, nowMs = Date.now()): RunView {
    const { plan, run, estimate } = c;
    const counted = new Map(c.runLines.map((l) => [l.planLineId, l]));
    const lines = c.lines.map((l) => {
      const rl = counted.get(l.id);
      return {
        requestLineId: l.request_line_id,
        planLineId: l.id,
        part: { id: l.part_id, name: l.part_name },
        request: { id: l.request_id, title: l.request_title, dueDate: l.due_date },
        plannedCount: rl?.plannedCount ?? l.quantity,
        goodCount: rl?.goodCount ?? null,
        failedCount: rl?.failedCount ?? null,
      };
    });
    const card = stageCard(plan.status, {
      freshPowderKg: estimate?.powder.freshPowderKg,
      reusedPowderKg: estimate?.powder.reusedPowderKg,
      lines: lines.map((l) => ({ requestLineId: l.requestLineId, partName: l.part.name, requestTitle: l.request.title, plannedCount: l.plannedCount })),
    });
    const print =
      plan.status === 'printing' && run && estimate
        ? printTimer({ startedAtMs: ms(run.startedAt), nowMs, preheatSeconds: estimate.print.preheatSeconds, printSeconds: estimate.print.printSeconds })
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
      freshPowderLoadedKg: run?.freshPowderLoadedKg ?? null,
      reusedPowderLoadedKg: run?.reusedPowderLoadedKg ?? null,
      startedAt: iso(run?.startedAt ?? null),
      startedBy: person(run?.startedBy ?? null, run?.startedByName),
      printEndedAt: iso(run?.printEndedAt ?? null),
      leftMachineAt: iso(run?.leftMachineAt ?? null),
      breakoutAt: iso(run?.breakoutAt ?? null),
      finishingAt: iso(run?.finishingAt ?? null),
      doneAt: iso(run?.doneAt ?? null),
      abortedAt: iso(run?.abortedAt ?? null),
      abortReason: run?.abortReason ?? null,
      finishingChecklist: run?.finishingChecklist ?? null,
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
      estimatedPrintHours: run?.estimatedPrintHours ?? null,
      estimatedCoolingHours: run?.estimatedCoolingHours ?? null,
      actualPrintHours: run?.actualPrintHours ?? null,
      actualCoolingHours: run?.actualCoolingHours ?? null,
      powderUsedKg: run?.powderUsedKg ?? null,
      readings: c.readings.map((r) => ({
        id: r.id,
        tempC: r.tempC,
        where: r.place,
        at: iso(r.takenAt)!,
        by: person(r.userId, r.userName),
        check: {
          status: r.checkStatus,
          coolestC: r.coolestC,
          confirmedBy: r.confirmedByReadingId,
          accepted: r.acceptedBy ? { by: person(r.acceptedBy, r.acceptedByName)!, reason: r.acceptedReason ?? '', at: iso(r.acceptedAt)! } : null,
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

  /**
   * One build prints on a machine at a time. The caller holds the machine's row lock, so two starts on one
   * machine are checked one after the other. 409 naming the build that holds the machine, or (for a start
   * recorded late) the build that was printing at that time.
   */
  async function checkMachineFree(c: RunContext, when: Date, transaction: Transaction) {
    const busy = await repo.printingOn(c.plan.machineId, c.plan.id, transaction);
    if (busy) {
      throw conflict(
        'machine_busy',
        `${c.machine.name || 'This machine'} is printing "${busy.name}" (started ${new Date(busy.at).toISOString()}): record its end or abort it before starting "${c.plan.name}".`,
        undefined,
        { planId: busy.planId, planName: busy.name },
      );
    }
    const overlap = await repo.printedAfter(c.plan.machineId, c.plan.id, when, transaction);
    if (overlap) {
      throw conflict(
        'machine_busy',
        `at (${when.toISOString()}) is while "${overlap.name}" was still printing on ${c.machine.name || 'this machine'} (until ${new Date(overlap.at).toISOString()}).`,
        'at',
        { planId: overlap.planId, planName: overlap.name },
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
    const runId = await repo.create(
      {
        planId: c.plan.id,
        labId: c.plan.labId,
        machineId: c.plan.machineId,
        layoutId: c.plan.chosenLayoutId,
        checklist: input.checklist,
        freshPowderLoadedKg: input.freshPowderKg,
        reusedPowderLoadedKg: input.reusedPowderKg,
        startedAt: when,
        startedBy: user.id,
        estimatedPrintHours: est.print.printSeconds / 3600,
        estimatedCoolingHours: est.cooling.coolingSeconds / 3600,
        printTimeScaleUsed: printScale,
        coolingScaleUsed: est.calibration?.coolingScale ?? 1,
        estimatedPreheatHours: est.print.preheatSeconds / layerScale / 3600,
        estimatedLayerHours: layerSeconds === null ? null : layerSeconds / layerScale / 3600,
        estimatedScanHours: laserSeconds === null ? null : laserSeconds / scanScale / 3600,
      },
      transaction,
    );
    await hooks.drawPowder?.(
      { labId: c.plan.labId, planId: c.plan.id, runId, materialId: c.plan.materialId, freshKg: input.freshPowderKg, reusedKg: input.reusedPowderKg, lots: input.lots, at: when, userId: user.id },
      transaction,
    );
    // Started plans leave the queue; the queue's positions count only what waits.
    await repo.leaveQueue(c.plan.id, transaction);
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
    await repo.addCounts(
      c.run!.id,
      input.counts.map((entry) => {
        const line = byLine.get(entry.requestLineId)!;
        return { planLineId: line.id, requestLineId: line.request_line_id, plannedCount: line.quantity, goodCount: entry.good, failedCount: entry.failed };
      }),
      transaction,
    );
    // Failed (and unaccounted) parts are open in their requests again; the plan keeps its own quantities as printed.
    await repo.givePlannedBack(
      c.lines.map((l) => {
        const entry = input.counts.find((e) => e.requestLineId === l.request_line_id)!;
        return [l.request_line_id, l.quantity - entry.good] as const;
      }),
      transaction,
    );
  }

  async function finish(c: RunContext, input: DoneInput, when: Date, transaction: Transaction) {
    const powderUsedKg = input.powderUsedKg ?? c.estimate?.powder.freshPowderKg ?? null;
    await repo.update(c.run!.id, { doneAt: when, finishingChecklist: input.finishingChecklist, powderUsedKg }, transaction);
    await repo.addPrinted(c.run!.id, transaction);
  }

  /** The designers (who filed the requests) of a run's lines, with their request's lines now. */
  async function requestsOf(c: RunContext, transaction: Transaction) {
    return repo.requests([...new Set(c.lines.map((l) => l.request_id))], transaction);
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
    await repo.markRequestsDone(
      complete.map((r) => r.id),
      transaction,
    );
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
            await repo.lockMachineOfPlan(labId, checkPlanId(planId), transaction);
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
              const when = stepTime(input.at, await repo.approvedAt(plan.id, transaction), nowMs, 'the plan was approved');
              await checkMachineFree(c, when, transaction);
              await start(c, user, input as StartRunInput, when, transaction);
              break;
            }
            case 'cooling': {
              const when = stepTime(input.at, run!.startedAt, nowMs);
              await repo.update(run!.id, { printEndedAt: when, actualPrintHours: (when.getTime() - ms(run!.startedAt)) / MS_PER_HOUR }, transaction);
              break;
            }
            case 'aborted': {
              const when = stepTime(input.at, run!.startedAt, nowMs);
              comment = input.to === 'aborted' ? input.reason : null;
              // The hours it printed are kept for the record; an aborted run never counts toward calibration.
              await repo.update(run!.id, { abortedAt: when, abortReason: comment, actualPrintHours: (when.getTime() - ms(run!.startedAt)) / MS_PER_HOUR }, transaction);
              break;
            }
            case 'breakout': {
              const when = stepTime(input.at, run!.printEndedAt, nowMs);
              const timer = cooling(c, when.getTime())!;
              if (!timer.handlingReached) {
                const handling = c.machine.handlingTempC;
                const doubted = c.readings.filter((r) => r.checkStatus === 'unexplained' && r.tempC <= handling);
                const doubt = doubted.length
                  ? ` The reading of ${doubted[doubted.length - 1].tempC} °C is colder than the cake can cool by then ` +
                    `(at least ${Math.round(doubted[doubted.length - 1].coolestC ?? handling)} °C by the cooling model): take a second reading at least ` +
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
              await repo.update(
                run!.id,
                { breakoutAt: when, actualCoolingHours: (when.getTime() - ms(run!.printEndedAt!)) / MS_PER_HOUR, leftMachineAt: run!.leftMachineAt ?? new Date(leftMs) },
                transaction,
              );
              break;
            }
            case 'finishing': {
              const when = stepTime(input.at, run!.breakoutAt, nowMs);
              await counts(c, input as CountsInput, transaction);
              await repo.update(run!.id, { finishingAt: when }, transaction);
              mail = await failedNotices(c, input as CountsInput, transaction);
              break;
            }
            case 'done': {
              await finish(c, input as DoneInput, stepTime(input.at, run!.finishingAt, nowMs), transaction);
              mail = await doneNotices(c, transaction);
              break;
            }
          }
          await applyTransition(db, plan, to, user.id, comment, transaction);
          // An aborted plan holds nothing any more: its lines' quantities are open in their requests again.
          if (to === 'aborted') await repo.givePlannedBack(c.lines.map((l) => [l.request_line_id, l.quantity] as const), transaction);
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
        const when = stepTime(input.at, run.printEndedAt, Date.now(), 'the print ended');
        if (input.where === 'outside') {
          // It left the machine by the earliest outside reading.
          run.leftMachineAt = run.leftMachineAt && ms(run.leftMachineAt) < when.getTime() ? run.leftMachineAt : when;
          await repo.update(run.id, { leftMachineAt: run.leftMachineAt }, transaction);
        }
        // Checked against the cooling model: a reading colder than the cake can be is held until a second one agrees.
        const model = coolingModel(c, run);
        const check = model ? checkReading(model, { atMs: when.getTime(), tempC: input.tempC }) : null;
        const earlier = c.readings.map((r) => ({ id: r.id, atMs: ms(r.takenAt), tempC: r.tempC, status: r.checkStatus }));
        const confirms = check && !check.explained ? confirmedBy(earlier, { atMs: when.getTime(), tempC: input.tempC }) : null;
        const status: ReadingCheckStatus = !check || check.explained ? 'explained' : confirms ? 'confirmed' : 'unexplained';
        const inserted = await repo.addReading(
          { runId: run.id, tempC: input.tempC, place: input.where, takenAt: when, userId: user.id, checkStatus: status, coolestC: check?.coolestC ?? null },
          transaction,
        );
        if (confirms) await repo.confirmReading(confirms.id, inserted, transaction);
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
        if (reading.checkStatus !== 'unexplained') {
          throw conflict('reading_not_doubted', `The reading of ${reading.tempC} °C is ${reading.checkStatus}: there is nothing to accept.`, undefined, {
            checkStatus: reading.checkStatus,
          });
        }
        await repo.acceptReading(reading.id, user.id, input.reason, transaction);
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
