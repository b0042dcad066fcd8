import { fn, literal, Op, type Transaction } from 'sequelize';
import type { Database } from '../index';
import type { PlanStatus } from '../../../shared/plans/status';

/** A plan as the review's flags read it: its machine and material by name, and how densely its chosen layout packs. */
export type FlaggedPlanRow = {
  id: string;
  name: string;
  status: PlanStatus;
  machine_id: string;
  machine_name: string;
  material_id: string;
  material_name: string;
  /** The estimate's packing density, else the packing's own utilization; null without a chosen layout. */
  density: number | null;
};

/** A plan's last approval, or a lead's queue move, with its age by the database's clock. */
export type Decision = { user_id: string | null; created_at: Date; age_ms: number };
export type QueueMoveDecision = Decision & { id: string; before_ids: string[]; after_ids: string[]; undone_at: Date | null };

/** Milliseconds since the row's `created_at`, by the database's clock at the statement (not the transaction's start). */
const ageMs = (table: string) => literal(`EXTRACT(EPOCH FROM (clock_timestamp() - "${table}"."created_at")) * 1000`);

/** What a lead's decisions on plans read: the review's flags, the last approval and the queue moves to undo. */
export function reviewRepository(db: Database) {
  const { Plan, PlanEvent, Layout, Machine, Material, Part, Run, QueueMove } = db.models;
  return {
    /** The lab's plan with its machine and material names and its chosen layout's density, or null. */
    async flaggedPlan(labId: string, planId: string): Promise<FlaggedPlanRow | null> {
      const p = await Plan.findOne({
        where: { id: planId, labId },
        attributes: ['id', 'name', 'status', 'machineId', 'materialId'],
        include: [
          { model: Machine, as: 'machine', required: true, attributes: ['name'] },
          { model: Material, as: 'material', required: true, attributes: ['name'] },
          {
            model: Layout,
            as: 'chosenLayout',
            required: false,
            // Two numbers out of the layout's JSON, without reading its placements and per-layer profile.
            attributes: [
              [
                literal(
                  `COALESCE(("chosenLayout"."estimate"->'powder'->>'packingDensity')::double precision, ("chosenLayout"."summary"->>'utilization')::double precision)`,
                ),
                'density',
              ],
            ],
          },
        ],
      });
      if (!p || !p.machine || !p.material) return null;
      const density = p.chosenLayout ? (p.chosenLayout.get('density') as number | null) : null;
      return {
        id: p.id,
        name: p.name,
        status: p.status,
        machine_id: p.machineId,
        machine_name: p.machine.name,
        material_id: p.materialId,
        material_name: p.material.name,
        density: density ?? null,
      };
    },

    /** The plan of the last run started on the machine, other than `exceptPlanId`, with its material; or null. */
    async lastRunPlan(machineId: string, exceptPlanId: string): Promise<{ id: string; name: string; material_id: string; material_name: string } | null> {
      const r = await Run.findOne({
        where: { machineId, planId: { [Op.ne]: exceptPlanId } },
        attributes: ['id'],
        include: [
          {
            model: Plan,
            as: 'plan',
            required: true,
            attributes: ['id', 'name', 'materialId'],
            include: [{ model: Material, as: 'material', required: true, attributes: ['name'] }],
          },
        ],
        order: [['startedAt', 'DESC']],
      });
      const plan = r?.plan;
      return plan && plan.material ? { id: plan.id, name: plan.name, material_id: plan.materialId, material_name: plan.material.name } : null;
    },

    /** Which of the parts have meshes that are not closed, by name, with their open edges when measured. */
    async unclosedParts(partIds: string[]): Promise<Array<{ id: string; name: string; open_edges: number | null }>> {
      const rows = await Part.findAll({ where: { id: partIds, watertight: false }, attributes: ['id', 'name', 'metrics'], order: [['name', 'ASC']] });
      return rows.map((p) => ({ id: p.id, name: p.name, open_edges: p.metrics.openEdges == null ? null : Number(p.metrics.openEdges) }));
    },

    /** The plan's last approval and its age, or null when it was never approved. */
    async lastApproval(planId: string, transaction: Transaction): Promise<Decision | null> {
      const e = await PlanEvent.findOne({
        where: { planId, toStatus: 'approved' },
        attributes: ['userId', 'createdAt', [ageMs('PlanEvent'), 'ageMs']],
        order: [['createdAt', 'DESC']],
        transaction,
      });
      return e ? { user_id: e.userId, created_at: e.createdAt, age_ms: Number(e.get('ageMs')) } : null;
    },

    /** The lab's queue move on the machine, locked, with its age; or null. */
    async lockQueueMove(labId: string, machineId: string, moveId: string, transaction: Transaction): Promise<QueueMoveDecision | null> {
      const m = await QueueMove.findOne({
        where: { id: moveId, machineId, labId },
        attributes: ['id', 'userId', 'beforeIds', 'afterIds', 'undoneAt', 'createdAt', [ageMs('QueueMove'), 'ageMs']],
        lock: transaction.LOCK.UPDATE,
        transaction,
      });
      return m
        ? { id: m.id, user_id: m.userId, before_ids: m.beforeIds, after_ids: m.afterIds, undone_at: m.undoneAt, created_at: m.createdAt, age_ms: Number(m.get('ageMs')) }
        : null;
    },

    async markQueueMoveUndone(moveId: string, transaction: Transaction): Promise<void> {
      await QueueMove.update({ undoneAt: fn('now') }, { where: { id: moveId }, transaction });
    },
  };
}
export type ReviewRepository = ReturnType<typeof reviewRepository>;
