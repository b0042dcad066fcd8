import { Op, literal, type Transaction } from 'sequelize';
import type { Database } from '../index';
import type { MachineProfile } from '../../../shared/types/profiles';
import type { PlanStatus } from '../../../shared/plans/status';

/** A plan on a machine's queue (or under way on it), with its chosen layout's estimate and its run's stage times. */
export type QueueRow<E> = {
  id: string;
  name: string;
  status: PlanStatus;
  queuePosition: number | null;
  materialId: string;
  materialName: string | null;
  estimate: E | null;
  startedAt: Date | null;
  printEndedAt: Date | null;
  leftMachineAt: Date | null;
  breakoutAt: Date | null;
};

export type QueueRequest = { planId: string; id: string; title: string; dueDate: string };

/** A machine's queue and the lead's reorderings of it, through the models. */
export function queueRepository(db: Database) {
  const { Plan, Layout, Run, Material, Machine, PlanLine, RequestLine, Request, QueueMove } = db.models;

  return {
    async machine(labId: string, machineId: string): Promise<{ id: string; name: string; profile: Partial<MachineProfile> } | null> {
      const row = await Machine.findOne({ where: { id: machineId, labId }, attributes: ['id', 'name', 'profile'] });
      return row ? { id: row.id, name: row.name, profile: row.profile as Partial<MachineProfile> } : null;
    },

    /**
     * The machine's queued plans and those `statuses` (under way), plus `extraPlanId` when given: in queue order,
     * then the latest started first. Estimates come without their per-layer areas (large, and never read here).
     */
    async plans<E>(labId: string, machineId: string, statuses: readonly PlanStatus[], extraPlanId: string | null): Promise<Array<QueueRow<E>>> {
      const rows = await Plan.findAll({
        where: {
          machineId,
          labId,
          [Op.or]: [{ status: ['queued', ...statuses] }, ...(extraPlanId ? [{ id: extraPlanId }] : [])],
        },
        attributes: ['id', 'name', 'status', 'queuePosition', 'materialId', 'createdAt'],
        include: [
          { model: Layout, as: 'chosenLayout', attributes: [[literal(`"chosenLayout"."estimate" - 'areaPerLayerMm2'`), 'estimate']], required: false },
          { model: Run, as: 'run', attributes: ['startedAt', 'printEndedAt', 'leftMachineAt', 'breakoutAt'], required: false },
          { model: Material, as: 'material', attributes: ['name'], required: false },
        ],
        order: [
          ['queuePosition', 'ASC NULLS LAST'],
          [{ model: Run, as: 'run' }, 'startedAt', 'DESC NULLS LAST'],
          ['createdAt', 'ASC'],
        ],
      });
      return rows.map((p) => ({
        id: p.id,
        name: p.name,
        status: p.status,
        queuePosition: p.queuePosition,
        materialId: p.materialId,
        materialName: p.material?.name ?? null,
        estimate: (p.chosenLayout?.get('estimate') as E | undefined) ?? null,
        startedAt: p.run?.startedAt ?? null,
        printEndedAt: p.run?.printEndedAt ?? null,
        leftMachineAt: p.run?.leftMachineAt ?? null,
        breakoutAt: p.run?.breakoutAt ?? null,
      }));
    },

    /** The requests whose lines the plans hold, each once per plan, by due date then title. */
    async requests(planIds: string[]): Promise<QueueRequest[]> {
      const lines = await PlanLine.findAll({
        where: { planId: planIds },
        attributes: ['planId'],
        include: [
          {
            model: RequestLine,
            as: 'requestLine',
            attributes: ['id'],
            required: true,
            include: [{ model: Request, as: 'request', attributes: ['id', 'title', 'dueDate'], required: true }],
          },
        ],
        order: [
          [{ model: RequestLine, as: 'requestLine' }, { model: Request, as: 'request' }, 'dueDate', 'ASC'],
          [{ model: RequestLine, as: 'requestLine' }, { model: Request, as: 'request' }, 'title', 'ASC'],
        ],
      });
      const seen = new Set<string>();
      return lines.flatMap((l) => {
        const r = l.requestLine!.request!;
        const key = `${l.planId}:${r.id}`;
        if (seen.has(key)) return [];
        seen.add(key);
        return [{ planId: l.planId, id: r.id, title: r.title, dueDate: r.dueDate }];
      });
    },

    /**
     * Locks the machine's row (the lock approvals take, so a plan approved meanwhile is either in the list or
     * after it), then its queued plans' rows; returns those plans in queue order.
     */
    async lockQueued(labId: string, machineId: string, transaction: Transaction): Promise<Array<{ id: string; name: string }>> {
      await Machine.findByPk(machineId, { attributes: ['id'], transaction, lock: transaction.LOCK.UPDATE });
      const rows = await Plan.findAll({
        where: { machineId, labId, status: 'queued' },
        attributes: ['id', 'name'],
        order: [['queuePosition', 'ASC']],
        transaction,
        lock: transaction.LOCK.UPDATE,
      });
      return rows.map((r) => ({ id: r.id, name: r.name }));
    },

    /** Numbers the plans 1, 2, … in the order given. */
    async setOrder(planIds: string[], transaction: Transaction): Promise<void> {
      for (const [i, id] of planIds.entries()) await Plan.update({ queuePosition: i + 1 }, { where: { id }, transaction });
    },

    /** Keeps a reordering with the order before it; returns its id and when it was made. */
    async recordMove(move: { labId: string; machineId: string; userId: string; beforeIds: string[]; afterIds: string[] }, transaction: Transaction): Promise<{ id: string; createdAt: Date }> {
      const row = await QueueMove.create(move, { transaction });
      return { id: row.id, createdAt: row.createdAt };
    },
  };
}
export type QueueRepository = ReturnType<typeof queueRepository>;
