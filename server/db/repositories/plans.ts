import type { Transaction } from 'sequelize';
import type { Database } from '../index';
import type { PlanStatus } from '../../../shared/plans/status';

/** A plan's own fields, as a plain record (never an ORM instance). */
export type PlanHead = {
  id: string;
  labId: string;
  name: string;
  status: PlanStatus;
  machineId: string;
  materialId: string;
  chosenLayoutId: string | null;
  queuePosition: number | null;
  version: number;
};

/** Build plans and their status history, read through the models. */
export function plansRepository(db: Database) {
  const { Plan, PlanEvent } = db.models;
  return {
    /** The lab's plan, or null (a plan of another lab is simply not there). */
    async head(labId: string, planId: string, transaction?: Transaction): Promise<PlanHead | null> {
      const p = await Plan.findOne({ where: { id: planId, labId }, transaction });
      return p
        ? { id: p.id, labId: p.labId, name: p.name, status: p.status, machineId: p.machineId, materialId: p.materialId, chosenLayoutId: p.chosenLayoutId, queuePosition: p.queuePosition, version: p.version }
        : null;
    },

    /** Who last sent the plan for review (null: nobody, or an account since removed). */
    async lastSentForReviewBy(planId: string, transaction?: Transaction): Promise<string | null> {
      const e = await PlanEvent.findOne({ where: { planId, toStatus: 'in_review' }, order: [['createdAt', 'DESC']], attributes: ['userId'], transaction });
      return e?.userId ?? null;
    },
  };
}
export type PlansRepository = ReturnType<typeof plansRepository>;
