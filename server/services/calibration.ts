import type { Database } from '../db';
import { calibrationRepository, type CoolingReading, type FinishedRun } from '../db/repositories/calibration';
import { AppError, conflict, notFound } from '../errors';
import type { Actor } from './planCommon';
import {
  calibrateMachine,
  coolingPoints,
  coolingRatio,
  coolingScaleFromPoints,
  type CoolingPoint,
  defaultExclusion,
  DEFAULT_LAST_RUNS,
  EXCLUSION_TEXT,
  printRatio,
  type Calibration,
  type RecordedRun,
} from '../../shared/calibration';
import type { CalibrationChoiceInput, CalibrationRunView, CalibrationView } from '../../shared/schemas/runs';
import type { CalibrationLookup } from './layouts';
import { layoutCalibration } from '../../shared/estimate/calibration';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

type Row = FinishedRun;
type ReadingRow = CoolingReading;

const iso = (d: Date | string | null) => (d ? new Date(d).toISOString() : null);

/**
 * A machine's estimate factors, fitted by the shared calibration (least
 * squares over its latest runs that count, with a floor on their number)
 * from the actual and estimated hours each run recorded. Every finished or
 * aborted run is listed with its actual against its estimate; runs far
 * outside the model are left out by default, and a lead may leave a run out
 * or take it back in, with a reason that is kept.
 */
export function calibrationService(db: Database) {
  const repo = calibrationRepository(db);

  async function rows(machineId: string): Promise<Row[]> {
    return repo.finishedRuns(machineId);
  }

  async function readingsOf(runIds: string[]): Promise<Map<string, ReadingRow[]>> {
    const byRun = new Map<string, ReadingRow[]>();
    for (const g of await repo.coolingReadings(runIds)) byRun.set(g.runId, [...(byRun.get(g.runId) ?? []), g]);
    return byRun;
  }

  function pointsOf(r: Row, readings: ReadingRow[] | undefined): CoolingPoint[] {
    if (!readings?.length || !r.printEndedAt || !r.cakeMm || !r.materialProfile) return [];
    const mat = r.materialProfile as Record<string, number>;
    const mac = r.machineProfile as Record<string, number>;
    const cake = {
      sizeMm: r.cakeMm,
      conductivityWPerMK: mat.powderConductivityWPerMK,
      densityGPerCm3: mat.bulkDensityGPerCm3,
      heatCapacityJPerKgK: mat.powderHeatCapacityJPerKgK,
      surfaceWPerM2K: mac.coolingSurfaceWPerM2K,
      startTempC: mat.bedTempC,
      ambientTempC: mac.ambientTempC,
    };
    if (![...cake.sizeMm, cake.conductivityWPerMK, cake.densityGPerCm3, cake.heatCapacityJPerKgK, cake.surfaceWPerM2K].every((v) => Number.isFinite(v) && v > 0)) return [];
    const end = new Date(r.printEndedAt).getTime();
    return coolingPoints(
      cake,
      readings.map((g) => ({ secondsAfterPrintEnd: (new Date(g.takenAt).getTime() - end) / 1000, tempC: g.tempC })),
    );
  }

  const recorded = (r: Row, points: CoolingPoint[] = []): RecordedRun => ({
    finishedAtMs: new Date((r.doneAt ?? r.abortedAt)!).getTime(),
    estimatedPrintHours: r.estimatedPrintHours,
    actualPrintHours: r.actualPrintHours,
    estimatedCoolingHours: r.estimatedCoolingHours,
    actualCoolingHours: r.actualCoolingHours,
    printTimeScaleUsed: r.printTimeScaleUsed,
    coolingScaleUsed: r.coolingScaleUsed,
    estimatedFixedHours:
      r.estimatedPreheatHours != null && r.estimatedLayerHours != null ? r.estimatedPreheatHours + r.estimatedLayerHours : null,
    estimatedScanHours: r.estimatedScanHours,
    coolingPoints: points,
  });

  const forCalibration = (r: Row) => ({ ...recorded(r), aborted: r.abortedAt !== null });

  /** Whether a run counts: the lead's choice where there is one, otherwise the default. */
  const counts = (r: Row) => (r.calibrationChoice ? r.calibrationChoice === 'include' : defaultExclusion(forCalibration(r)) === null);

  async function fit(machineId: string): Promise<{ calibration: Calibration; all: Row[]; used: Set<string>; points: Map<string, CoolingPoint[]> }> {
    const all = await rows(machineId);
    const included = all.filter(counts);
    // The fit takes the latest DEFAULT_LAST_RUNS that count; the list says which.
    const used = new Set(included.slice(0, DEFAULT_LAST_RUNS).map((r) => r.id));
    const readings = await readingsOf(all.map((r) => r.id));
    const points = new Map(all.map((r) => [r.id, pointsOf(r, readings.get(r.id))]));
    return { calibration: calibrateMachine(included.map((r) => recorded(r, points.get(r.id)))), all, used, points };
  }

  async function forMachine(machineId: string): Promise<Calibration> {
    return (await fit(machineId)).calibration;
  }

  async function machine(labId: string, machineId: string) {
    if (!UUID.test(machineId)) throw notFound('That machine');
    const m = await repo.machine(labId, machineId);
    if (!m) throw notFound('That machine');
    return m;
  }

  function runView(r: Row, used: Set<string>, points: CoolingPoint[]): CalibrationRunView {
    const byDefault = defaultExclusion(forCalibration(r));
    return {
      runId: r.id,
      planId: r.planId,
      planName: r.planName,
      materialName: r.materialName,
      startedAt: iso(r.startedAt)!,
      endedAt: iso(r.doneAt ?? r.abortedAt)!,
      outcome: r.abortedAt ? 'aborted' : 'done',
      abortReason: r.abortReason,
      estimatedPrintHours: r.estimatedPrintHours / r.printTimeScaleUsed,
      actualPrintHours: r.actualPrintHours,
      estimatedCoolingHours: r.estimatedCoolingHours * r.coolingScaleUsed,
      actualCoolingHours: r.actualCoolingHours,
      printRatio: printRatio(forCalibration(r)),
      coolingRatio: coolingRatio(forCalibration(r)),
      coolingReadings: points.length,
      readingsCoolingScale: coolingScaleFromPoints(points),
      counted: counts(r),
      usedInFit: used.has(r.id),
      defaultExclusion: byDefault,
      defaultExclusionText: byDefault ? EXCLUSION_TEXT[byDefault] : null,
      choice: r.calibrationChoice
        ? {
            choice: r.calibrationChoice,
            reason: r.calibrationReason ?? '',
            by: r.calibrationBy ? { id: r.calibrationBy, name: r.calibrationByName ?? '' } : null,
            at: iso(r.calibrationAt)!,
          }
        : null,
    };
  }

  /** For the layouts' estimates: the machine's separate factors on its fixed time, its scan time and its cooling. */
  const lookup: CalibrationLookup = async (_labId, machineId) => {
    return layoutCalibration(await forMachine(machineId));
  };

  async function get(labId: string, machineId: string): Promise<CalibrationView> {
    const m = await machine(labId, machineId);
    const { calibration, all, used, points } = await fit(m.id);
    return { ...calibration, machine: { id: m.id, name: m.name }, recordedRuns: all.map((r) => runView(r, used, points.get(r.id) ?? [])) };
  }

  return {
    forMachine,
    lookup,
    get,

    /** A lead leaves a run out of the fit, or takes one left out by default back in; the reason is kept with who and when. */
    async choose(labId: string, machineId: string, runId: string, user: Actor, input: CalibrationChoiceInput): Promise<CalibrationView> {
      const m = await machine(labId, machineId);
      if (!UUID.test(runId)) throw notFound('That run');
      const [run] = (await rows(m.id)).filter((r) => r.id === runId);
      if (!run) throw new AppError(404, 'not_found', 'That run was not found among the finished runs of this machine.');
      if (input.choice === 'include') {
        const why = defaultExclusion(forCalibration(run));
        if (why === 'aborted' || why === 'incomplete') {
          throw conflict('cannot_include', `"${run.planName}" cannot count: ${EXCLUSION_TEXT[why]}`, 'choice', { defaultExclusion: why });
        }
      }
      await repo.setChoice(run.id, input.choice, input.reason, user.id);
      return get(labId, machineId);
    },
  };
}
export type CalibrationService = ReturnType<typeof calibrationService>;
