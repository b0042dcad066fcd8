import { Op, col, fn, type Transaction } from 'sequelize';
import type { Database } from '../index';

/** A finished (done or aborted) run, with what the calibration reads of its plan, material, machine and layout. */
export type FinishedRun = {
  id: string;
  planId: string;
  planName: string;
  materialName: string | null;
  startedAt: Date;
  doneAt: Date | null;
  abortedAt: Date | null;
  abortReason: string | null;
  estimatedPrintHours: number;
  actualPrintHours: number | null;
  estimatedCoolingHours: number;
  actualCoolingHours: number | null;
  printTimeScaleUsed: number;
  coolingScaleUsed: number;
  estimatedPreheatHours: number | null;
  estimatedLayerHours: number | null;
  estimatedScanHours: number | null;
  calibrationChoice: 'exclude' | 'include' | null;
  calibrationReason: string | null;
  calibrationBy: string | null;
  calibrationByName: string | null;
  calibrationAt: Date | null;
  printEndedAt: Date | null;
  /** The powder cake's size as the layout's estimate stored it (older layouts: null). */
  cakeMm: [number, number, number] | null;
  materialProfile: Record<string, unknown> | null;
  machineProfile: Record<string, unknown>;
};
export type CoolingReading = { runId: string; tempC: number; takenAt: Date };

/** The runs a machine's calibration is fitted from, read through the models. */
export function calibrationRepository(db: Database) {
  const { Run, RunReading, Plan, Material, Machine, Layout, User } = db.models;
  return {
    /** The machine's finished runs, the latest first. */
    async finishedRuns(machineId: string, transaction?: Transaction): Promise<FinishedRun[]> {
      const rows = await Run.findAll({
        where: { machineId, [Op.or]: [{ doneAt: { [Op.ne]: null } }, { abortedAt: { [Op.ne]: null } }] },
        include: [
          { model: Plan, as: 'plan', attributes: ['name'], required: true, include: [{ model: Material, as: 'material', attributes: ['name', 'profile'], required: false }] },
          { model: Machine, as: 'machine', attributes: ['profile'], required: true },
          { model: Layout, as: 'layout', attributes: ['estimate'], required: false },
          { model: User, as: 'calibrator', attributes: ['name'], required: false },
        ],
        order: [[fn('COALESCE', col('Run.done_at'), col('Run.aborted_at')), 'DESC']],
        transaction,
      });
      return rows.map((r) => {
        const cake = (r.layout?.estimate as { cakeMm?: [number, number, number] } | null | undefined)?.cakeMm;
        return {
          id: r.id,
          planId: r.planId,
          planName: r.plan?.name ?? '',
          materialName: r.plan?.material?.name ?? null,
          startedAt: r.startedAt,
          doneAt: r.doneAt,
          abortedAt: r.abortedAt,
          abortReason: r.abortReason,
          estimatedPrintHours: r.estimatedPrintHours,
          actualPrintHours: r.actualPrintHours,
          estimatedCoolingHours: r.estimatedCoolingHours,
          actualCoolingHours: r.actualCoolingHours,
          printTimeScaleUsed: r.printTimeScaleUsed,
          coolingScaleUsed: r.coolingScaleUsed,
          estimatedPreheatHours: r.estimatedPreheatHours,
          estimatedLayerHours: r.estimatedLayerHours,
          estimatedScanHours: r.estimatedScanHours,
          calibrationChoice: r.calibrationChoice,
          calibrationReason: r.calibrationReason,
          calibrationBy: r.calibrationBy,
          calibrationByName: r.calibrator?.name ?? null,
          calibrationAt: r.calibrationAt,
          printEndedAt: r.printEndedAt,
          cakeMm: cake ?? null,
          materialProfile: r.plan?.material?.profile ?? null,
          machineProfile: r.machine?.profile ?? {},
        };
      });
    },

    /** The runs' readings the cooling model explains (or that were confirmed or accepted), in time order. */
    async coolingReadings(runIds: string[]): Promise<CoolingReading[]> {
      if (runIds.length === 0) return [];
      const rows = await RunReading.findAll({
        where: { runId: { [Op.in]: runIds }, checkStatus: { [Op.ne]: 'unexplained' } },
        attributes: ['runId', 'tempC', 'takenAt'],
        order: [['takenAt', 'ASC']],
      });
      return rows.map((g) => ({ runId: g.runId, tempC: g.tempC, takenAt: g.takenAt }));
    },

    async machine(labId: string, machineId: string): Promise<{ id: string; name: string } | null> {
      const m = await Machine.findOne({ where: { id: machineId, labId }, attributes: ['id', 'name'] });
      return m ? { id: m.id, name: m.name } : null;
    },

    /** Records a lead's choice to leave a run out of the fit or take it back in, with the reason, who and when. */
    async setChoice(runId: string, choice: 'exclude' | 'include', reason: string, userId: string): Promise<void> {
      await Run.update({ calibrationChoice: choice, calibrationReason: reason, calibrationBy: userId, calibrationAt: new Date() }, { where: { id: runId } });
    },
  };
}
export type CalibrationRepository = ReturnType<typeof calibrationRepository>;
