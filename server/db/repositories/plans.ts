import { Op, type Transaction } from 'sequelize';
import type { Database } from '../index';
import type { PlanStatus } from '../../../shared/plans/status';
import type { LengthUnit } from '../../../shared/geometry';

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

/** The stored file behind one plan line's part, as the 3MF export and the layer profiles read it. */
export type PlanPartFile = {
  requestLineId: string;
  partId: string;
  partName: string;
  fileKey: string;
  fileName: string;
  fileUnit: LengthUnit;
  fileSplit: boolean;
  filePartIndex: number;
  rotationDeg: number[];
  /** Watertight and consistently oriented: its sliced sections are areas. */
  closed: boolean;
};

/** Build plans, their lines' part files and their status history, read through the models. */
export function plansRepository(db: Database) {
  const { Plan, PlanEvent, PlanLine, RequestLine, Part, User } = db.models;
  return {
    /** Each line's part file, in the plan's line order. */
    async partFiles(planId: string, transaction?: Transaction): Promise<PlanPartFile[]> {
      const lines = await PlanLine.findAll({
        where: { planId },
        attributes: ['requestLineId', 'position'],
        include: [
          {
            model: RequestLine,
            as: 'requestLine',
            attributes: ['id'],
            required: true,
            include: [
              {
                model: Part,
                as: 'part',
                attributes: ['id', 'name', 'fileKey', 'fileName', 'fileUnit', 'fileSplit', 'filePartIndex', 'rotationDeg', 'watertight', 'metrics'],
                required: true,
              },
            ],
          },
        ],
        order: [['position', 'ASC']],
        transaction,
      });
      return lines.flatMap((l) => {
        const p = l.requestLine?.part;
        if (!p) return [];
        return [
          {
            requestLineId: l.requestLineId,
            partId: p.id,
            partName: p.name,
            fileKey: p.fileKey,
            fileName: p.fileName,
            fileUnit: p.fileUnit as LengthUnit,
            fileSplit: p.fileSplit,
            filePartIndex: p.filePartIndex,
            rotationDeg: p.rotationDeg,
            closed: p.watertight && p.metrics.oriented === true,
          },
        ];
      });
    },

    /** The lab's plan, or null (a plan of another lab is simply not there). */
    async head(labId: string, planId: string, transaction?: Transaction): Promise<PlanHead | null> {
      const p = await Plan.findOne({ where: { id: planId, labId }, transaction });
      return p
        ? { id: p.id, labId: p.labId, name: p.name, status: p.status, machineId: p.machineId, materialId: p.materialId, chosenLayoutId: p.chosenLayoutId, queuePosition: p.queuePosition, version: p.version }
        : null;
    },

    /** The plan's lab, or null when there is no such plan. */
    async labOf(planId: string, transaction?: Transaction): Promise<{ labId: string } | null> {
      const p = await Plan.findByPk(planId, { attributes: ['labId'], transaction });
      return p ? { labId: p.labId } : null;
    },

    /**
     * Who last sent the plan for review (null: nobody, or an account since removed). An undone approval also
     * puts the plan in review, by the lead who undid it; that is not a sending, so only moves from a draft count.
     */
    async lastSentForReviewBy(planId: string, transaction?: Transaction): Promise<string | null> {
      const e = await PlanEvent.findOne({ where: { planId, toStatus: 'in_review', fromStatus: { [Op.in]: ['draft', 'changes_requested'] } }, order: [['createdAt', 'DESC']], attributes: ['userId'], transaction });
      return e?.userId ?? null;
    },

    /** The planner a decision on the plan is told to: whoever sent it for review last, else its author; null when neither account is there. */
    async submitter(planId: string, transaction?: Transaction): Promise<{ id: string; email: string; name: string } | null> {
      const sentBy = await this.lastSentForReviewBy(planId, transaction);
      const userId = sentBy ?? (await Plan.findByPk(planId, { attributes: ['createdBy'], transaction }))?.createdBy ?? null;
      if (!userId) return null;
      const u = await User.findByPk(userId, { attributes: ['id', 'email', 'name'], transaction });
      return u ? { id: u.id, email: u.email, name: u.name } : null;
    },
  };
}
export type PlansRepository = ReturnType<typeof plansRepository>;
