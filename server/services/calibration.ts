import { QueryTypes } from 'sequelize';
import type { Database } from '../db';
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

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

type Row = {
  id: string;
  plan_id: string;
  plan_name: string;
  material_name: string | null;
  started_at: Date;
  done_at: Date | null;
  aborted_at: Date | null;
  abort_reason: string | null;
  estimated_print_hours: number;
  actual_print_hours: number | null;
  estimated_cooling_hours: number;
  actual_cooling_hours: number | null;
  print_time_scale_used: number;
  cooling_scale_used: number;
  estimated_preheat_hours: number | null;
  estimated_layer_hours: number | null;
  estimated_scan_hours: number | null;
  calibration_choice: 'exclude' | 'include' | null;
  calibration_reason: string | null;
  calibration_by: string | null;
  calibration_by_name: string | null;
  calibration_at: Date | null;
  print_ended_at: Date | null;
  cake_mm: [number, number, number] | null;
  material_profile: Record<string, unknown> | null;
  machine_profile: Record<string, unknown>;
};

type ReadingRow = { run_id: string; temp_c: number; taken_at: Date };

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
  const { sequelize } = db;

  async function rows(machineId: string): Promise<Row[]> {
    return sequelize.query<Row>(
      `SELECT r.id, r.plan_id, p.name AS plan_name, m.name AS material_name, r.started_at, r.done_at, r.aborted_at, r.abort_reason,
              r.estimated_print_hours, r.actual_print_hours, r.estimated_cooling_hours, r.actual_cooling_hours,
              r.print_time_scale_used, r.cooling_scale_used, r.estimated_preheat_hours, r.estimated_layer_hours, r.estimated_scan_hours,
              r.calibration_choice, r.calibration_reason, r.calibration_by, u.name AS calibration_by_name, r.calibration_at,
              r.print_ended_at, l.estimate -> 'cakeMm' AS cake_mm, m.profile AS material_profile, mc.profile AS machine_profile
         FROM runs r JOIN plans p ON p.id = r.plan_id LEFT JOIN materials m ON m.id = p.material_id LEFT JOIN users u ON u.id = r.calibration_by
              JOIN machines mc ON mc.id = r.machine_id LEFT JOIN layouts l ON l.id = r.layout_id
        WHERE r.machine_id = $1 AND (r.done_at IS NOT NULL OR r.aborted_at IS NOT NULL)
        ORDER BY COALESCE(r.done_at, r.aborted_at) DESC`,
      { bind: [machineId], type: QueryTypes.SELECT },
    );
  }

  /** Core readings that count (explained, confirmed or accepted) of the given runs, by run. */
  async function readingsOf(runIds: string[]): Promise<Map<string, ReadingRow[]>> {
    const byRun = new Map<string, ReadingRow[]>();
    if (runIds.length === 0) return byRun;
    const rows = await sequelize.query<ReadingRow>(
      `SELECT run_id, temp_c, taken_at FROM run_readings WHERE run_id = ANY($1::uuid[]) AND check_status <> 'unexplained' ORDER BY taken_at`,
      { bind: [runIds], type: QueryTypes.SELECT },
    );
    for (const g of rows) byRun.set(g.run_id, [...(byRun.get(g.run_id) ?? []), g]);
    return byRun;
  }

  /** A run's readings beside the conduction model of its cake, with the profiles as they are now. */
  function pointsOf(r: Row, readings: ReadingRow[] | undefined): CoolingPoint[] {
    if (!readings?.length || !r.print_ended_at || !r.cake_mm || !r.material_profile) return [];
    const mat = r.material_profile as Record<string, number>;
    const mac = r.machine_profile as Record<string, number>;
    const cake = {
      sizeMm: r.cake_mm,
      conductivityWPerMK: mat.powderConductivityWPerMK,
      densityGPerCm3: mat.bulkDensityGPerCm3,
      heatCapacityJPerKgK: mat.powderHeatCapacityJPerKgK,
      surfaceWPerM2K: mac.coolingSurfaceWPerM2K,
      startTempC: mat.bedTempC,
      ambientTempC: mac.ambientTempC,
    };
    if (![...cake.sizeMm, cake.conductivityWPerMK, cake.densityGPerCm3, cake.heatCapacityJPerKgK, cake.surfaceWPerM2K].every((v) => Number.isFinite(v) && v > 0)) return [];
    const end = new Date(r.print_ended_at).getTime();
    return coolingPoints(
      cake,
      readings.map((g) => ({ secondsAfterPrintEnd: (new Date(g.taken_at).getTime() - end) / 1000, tempC: g.temp_c })),
    );
  }

  const recorded = (r: Row, points: CoolingPoint[] = []): RecordedRun => ({
    finishedAtMs: new Date((r.done_at ?? r.aborted_at)!).getTime(),
    estimatedPrintHours: r.estimated_print_hours,
    actualPrintHours: r.actual_print_hours,
    estimatedCoolingHours: r.estimated_cooling_hours,
    actualCoolingHours: r.actual_cooling_hours,
    printTimeScaleUsed: r.print_time_scale_used,
    coolingScaleUsed: r.cooling_scale_used,
    estimatedFixedHours:
      r.estimated_preheat_hours != null && r.estimated_layer_hours != null ? r.estimated_preheat_hours + r.estimated_layer_hours : null,
    estimatedScanHours: r.estimated_scan_hours,
    coolingPoints: points,
  });

  const forCalibration = (r: Row) => ({ ...recorded(r), aborted: r.aborted_at !== null });

  /** Whether a run counts: the lead's choice where there is one, otherwise the default. */
  const counts = (r: Row) => (r.calibration_choice ? r.calibration_choice === 'include' : defaultExclusion(forCalibration(r)) === null);

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
    const [m] = await sequelize.query<{ id: string; name: string }>('SELECT id, name FROM machines WHERE id = $1 AND lab_id = $2', {
      bind: [machineId, labId],
      type: QueryTypes.SELECT,
    });
    if (!m) throw notFound('That machine');
    return m;
  }

  function runView(r: Row, used: Set<string>, points: CoolingPoint[]): CalibrationRunView {
    const byDefault = defaultExclusion(forCalibration(r));
    return {
      runId: r.id,
      planId: r.plan_id,
      planName: r.plan_name,
      materialName: r.material_name,
      startedAt: iso(r.started_at)!,
      endedAt: iso(r.done_at ?? r.aborted_at)!,
      outcome: r.aborted_at ? 'aborted' : 'done',
      abortReason: r.abort_reason,
      estimatedPrintHours: r.estimated_print_hours / r.print_time_scale_used,
      actualPrintHours: r.actual_print_hours,
      estimatedCoolingHours: r.estimated_cooling_hours * r.cooling_scale_used,
      actualCoolingHours: r.actual_cooling_hours,
      printRatio: printRatio(forCalibration(r)),
      coolingRatio: coolingRatio(forCalibration(r)),
      coolingReadings: points.length,
      readingsCoolingScale: coolingScaleFromPoints(points),
      counted: counts(r),
      usedInFit: used.has(r.id),
      defaultExclusion: byDefault,
      defaultExclusionText: byDefault ? EXCLUSION_TEXT[byDefault] : null,
      choice: r.calibration_choice
        ? {
            choice: r.calibration_choice,
            reason: r.calibration_reason ?? '',
            by: r.calibration_by ? { id: r.calibration_by, name: r.calibration_by_name ?? '' } : null,
            at: iso(r.calibration_at)!,
          }
        : null,
    };
  }

  /** For the layouts' estimates: the machine's separate factors on its fixed time, its scan time and its cooling. */
  const lookup: CalibrationLookup = async (_labId, machineId) => {
    const c = await forMachine(machineId);
    return { layerTimeScale: c.perLayerScale, scanTimeScale: c.scanScale, coolingScale: c.coolingScale, runs: c.runs, calibrated: c.calibrated };
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
          throw conflict('cannot_include', `"${run.plan_name}" cannot count: ${EXCLUSION_TEXT[why]}`, 'choice', { defaultExclusion: why });
        }
      }
      await sequelize.query(
        `UPDATE runs SET calibration_choice = $2, calibration_reason = $3, calibration_by = $4, calibration_at = now(), updated_at = now() WHERE id = $1`,
        { bind: [run.id, input.choice, input.reason, user.id] },
      );
      return get(labId, machineId);
    },
  };
}
export type CalibrationService = ReturnType<typeof calibrationService>;
