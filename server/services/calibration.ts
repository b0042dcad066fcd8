import { QueryTypes } from 'sequelize';
import type { Database } from '../db';
import { notFound } from '../errors';
import { calibrateMachine, type Calibration, type RecordedRun } from '../../shared/calibration';
import type { CalibrationLookup } from './layouts';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * A machine's estimate factors, fitted by the shared calibration (least
 * squares over its latest finished runs, with a floor on their number) from
 * the actual and estimated hours each finished run recorded.
 */
export function calibrationService(db: Database) {
  const { sequelize } = db;

  async function recordedRuns(machineId: string): Promise<RecordedRun[]> {
    const rows = await sequelize.query<any>(
      `SELECT estimated_print_hours, actual_print_hours, estimated_cooling_hours, actual_cooling_hours,
              print_time_scale_used, cooling_scale_used, done_at
         FROM runs WHERE machine_id = $1 AND done_at IS NOT NULL ORDER BY done_at`,
      { bind: [machineId], type: QueryTypes.SELECT },
    );
    return rows.map((r) => ({
      finishedAtMs: new Date(r.done_at).getTime(),
      estimatedPrintHours: r.estimated_print_hours,
      actualPrintHours: r.actual_print_hours,
      estimatedCoolingHours: r.estimated_cooling_hours,
      actualCoolingHours: r.actual_cooling_hours,
      printTimeScaleUsed: r.print_time_scale_used,
      coolingScaleUsed: r.cooling_scale_used,
    }));
  }

  async function forMachine(machineId: string): Promise<Calibration> {
    return calibrateMachine(await recordedRuns(machineId));
  }

  /** For the layouts' estimates: the factors of the plan's machine. */
  const lookup: CalibrationLookup = async (_labId, machineId) => {
    const c = await forMachine(machineId);
    return { printTimeScale: c.printTimeScale, coolingScale: c.coolingScale, runs: c.runs, calibrated: c.calibrated };
  };

  return {
    forMachine,
    lookup,
    async get(labId: string, machineId: string): Promise<Calibration> {
      if (!UUID.test(machineId)) throw notFound('That machine');
      const [m] = await sequelize.query('SELECT id FROM machines WHERE id = $1 AND lab_id = $2', {
        bind: [machineId, labId],
        type: QueryTypes.SELECT,
      });
      if (!m) throw notFound('That machine');
      return forMachine(machineId);
    },
  };
}
export type CalibrationService = ReturnType<typeof calibrationService>;
