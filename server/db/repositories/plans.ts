// Over 450 lines: every read and write of plans, their lines, status history and queue places, with the typed SQL of the two lists.
import { fn, literal, Op, QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../index';
import type { PlanRow as PlanModel } from '../models/plans';
import type { PlanStatus } from '../../../shared/plans/status';
import type { LengthUnit } from '../../../shared/geometry';
import type { OpenLineView, PlanOrientationRule } from '../../../shared/schemas/plans';

/** Statuses whose lines no longer hold request quantities, as an SQL list. */
export const INACTIVE_SQL = `('cancelled', 'aborted')`;

/** The database's clock at the statement itself, not the transaction's start: two events in one transaction keep their order. */
const clockNow = () => fn('clock_timestamp') as unknown as Date;

/** A plan's row as a plain record, in the columns' own names. */
export type PlanRow = {
  id: string;
  lab_id: string;
  name: string;
  machine_id: string;
  material_id: string;
  status: PlanStatus;
  version: number;
  chosen_layout_id: string | null;
  queue_position: number | null;
  draft: unknown;
  created_by: string | null;
  created_at: Date;
  updated_at: Date;
};

/** A line of a plan with what the packing and the checks need. */
export type LineRow = {
  id: string;
  request_line_id: string;
  position: number;
  quantity: number;
  orientation: PlanOrientationRule | null;
  part_id: string;
  part_name: string;
  size_x_mm: number;
  size_y_mm: number;
  size_z_mm: number;
  volume_mm3: number;
  watertight: boolean;
  triangles: number;
  part_orientation: PlanOrientationRule;
  request_id: string;
  request_title: string;
  due_date: string;
  priority: string;
  request_status: string;
  line_quantity: number;
  line_planned: number;
  printed_count: number;
};

/** A plan as the list shows it: its machine, material and author by name, and its lines and layouts counted (counts come as text). */
export type PlanListRow = {
  id: string;
  name: string;
  status: PlanStatus;
  version: number;
  chosen_layout_id: string | null;
  queue_position: number | null;
  created_at: Date;
  updated_at: Date;
  machine_id: string;
  machine_name: string;
  material_id: string;
  material_name: string;
  created_by: string | null;
  created_by_name: string | null;
  line_count: string;
  part_count: string;
  earliest_due_date: string | null;
  layout_count: string;
};

/** An open request line with its part and request, and how much of it other plans hold (a sum, as text). */
export type OpenLineRow = {
  id: string;
  quantity: number;
  part_id: string;
  part_name: string;
  size_x_mm: number;
  size_y_mm: number;
  size_z_mm: number;
  volume_mm3: number;
  watertight: boolean;
  triangles: number;
  orientation: OpenLineView['part']['orientation'];
  request_id: string;
  title: string;
  due_date: string;
  priority: OpenLineView['request']['priority'];
  material_id: string | null;
  held: string;
};

/** A status change of a plan, with who made it by name. */
export type PlanEventRecord = {
  id: string;
  from_status: PlanStatus | null;
  to_status: PlanStatus;
  user_id: string | null;
  user_name: string | null;
  comment: string | null;
  created_at: Date;
};

/** A request line a planner picked, with its request and part, as the line checks read it. */
export type PickedLineRow = {
  id: string;
  quantity: number;
  planned_count: number;
  status: string;
  material_id: string | null;
  title: string;
  part_name: string;
};

export type PlanLineInput = { requestLineId: string; quantity: number; orientation?: PlanOrientationRule | null };

const plainPlan = (p: PlanModel): PlanRow => ({
  id: p.id,
  lab_id: p.labId,
  name: p.name,
  machine_id: p.machineId,
  material_id: p.materialId,
  status: p.status,
  version: p.version,
  chosen_layout_id: p.chosenLayoutId,
  queue_position: p.queuePosition,
  draft: p.draft,
  created_by: p.createdBy,
  created_at: p.createdAt,
  updated_at: p.updatedAt,
});

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
  const { sequelize } = db;
  const { Plan, PlanEvent, PlanLine, RequestLine, Request, Part, Machine, User } = db.models;
  const select = <T extends object>(sql: string, bind: unknown[], transaction?: Transaction) => sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT, transaction });
  /** What an update of a plan writes besides its own fields: the database's time, as the other writers of the row do. */
  const touched = { updatedAt: fn('now') };
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

    /** The lab's plan row, locked for the rest of the transaction; null when the lab has no such plan. */
    async lock(labId: string, planId: string, transaction: Transaction): Promise<PlanRow | null> {
      const p = await Plan.findOne({ where: { id: planId, labId }, lock: transaction.LOCK.UPDATE, transaction });
      return p ? plainPlan(p) : null;
    },

    /** The lab's plan row with its author's name, or null. */
    async withCreator(labId: string, planId: string): Promise<(PlanRow & { created_by_name: string | null }) | null> {
      const p = await Plan.findOne({ where: { id: planId, labId }, include: [{ model: User, as: 'creator', attributes: ['name'], required: false }] });
      return p ? { ...plainPlan(p), created_by_name: p.creator?.name ?? null } : null;
    },

    /** A new draft plan (version 1); its id. */
    async create(fields: { labId: string; name: string; machineId: string; materialId: string; createdBy: string }, transaction: Transaction): Promise<string> {
      const p = await Plan.create({ ...fields, status: 'draft', version: 1 }, { transaction });
      return p.id;
    },

    /** Sets the status and bumps the version; the new version. */
    async setStatus(planId: string, to: PlanStatus, transaction: Transaction): Promise<number> {
      const [, rows] = await Plan.update({ status: to, version: literal('version + 1'), ...touched }, { where: { id: planId }, returning: ['version'], silent: true, transaction });
      return rows[0].version;
    },

    /**
     * Saves the planner's name and draft if the plan is still at `version`,
     * bumping it; the new version, or null when someone saved in between.
     */
    async saveEdits(planId: string, version: number, edits: { name?: string; draft?: unknown }, transaction: Transaction): Promise<number | null> {
      const [count, rows] = await Plan.update(
        {
          ...(edits.name !== undefined ? { name: edits.name } : {}),
          // Stored as it came (JSON); null clears it.
          ...(edits.draft !== undefined ? { draft: edits.draft as PlanModel['draft'] } : {}),
          version: literal('version + 1'),
          ...touched,
        },
        { where: { id: planId, version }, returning: ['version'], silent: true, transaction },
      );
      return count > 0 ? rows[0].version : null;
    },

    /** Bumps the version (what a reviewer saw is no longer what the plan is). */
    async bumpVersion(planId: string, transaction: Transaction): Promise<void> {
      await Plan.update({ version: literal('version + 1'), ...touched }, { where: { id: planId }, silent: true, transaction });
    },

    /** Marks the plan as changed without a new version (a layout was added). */
    async touch(planId: string, transaction: Transaction): Promise<void> {
      await Plan.update({ ...touched }, { where: { id: planId }, silent: true, transaction });
    },

    /** The layout to review, bumping the version; the new version. */
    async choose(planId: string, layoutId: string, transaction: Transaction): Promise<number> {
      const [, rows] = await Plan.update(
        { chosenLayoutId: layoutId, version: literal('version + 1'), ...touched },
        { where: { id: planId }, returning: ['version'], silent: true, transaction },
      );
      return rows[0].version;
    },

    /** Records a status change at the database's clock. */
    async addEvent(planId: string, from: PlanStatus | null, to: PlanStatus, userId: string | null, comment: string | null, transaction: Transaction): Promise<void> {
      await PlanEvent.create({ planId, fromStatus: from, toStatus: to, userId, comment, createdAt: clockNow() }, { transaction });
    },

    /** The plan's status changes, oldest first, with who made them by name. */
    async events(planId: string, transaction?: Transaction): Promise<PlanEventRecord[]> {
      const rows = await PlanEvent.findAll({
        where: { planId },
        include: [{ model: User, as: 'user', attributes: ['name'], required: false }],
        order: [
          ['createdAt', 'ASC'],
          ['id', 'ASC'],
        ],
        transaction,
      });
      return rows.map((e) => ({
        id: e.id,
        from_status: e.fromStatus,
        to_status: e.toStatus,
        user_id: e.userId,
        user_name: e.user?.name ?? null,
        comment: e.comment,
        created_at: e.createdAt,
      }));
    },

    /** The plan's lines in order, each with its request line, request and part. */
    async lines(planId: string, transaction?: Transaction): Promise<LineRow[]> {
      const rows = await PlanLine.findAll({
        where: { planId },
        include: [
          {
            model: RequestLine,
            as: 'requestLine',
            required: true,
            include: [
              { model: Request, as: 'request', required: true, attributes: ['id', 'title', 'dueDate', 'priority', 'status'] },
              { model: Part, as: 'part', required: true, attributes: ['id', 'name', 'sizeXMm', 'sizeYMm', 'sizeZMm', 'volumeMm3', 'watertight', 'metrics', 'triangles', 'orientation'] },
            ],
          },
        ],
        order: [['position', 'ASC']],
        transaction,
      });
      return rows.flatMap((l) => {
        const rl = l.requestLine;
        const p = rl?.part;
        const r = rl?.request;
        if (!rl || !p || !r) return [];
        return [
          {
            id: l.id,
            request_line_id: l.requestLineId,
            position: l.position,
            quantity: l.quantity,
            orientation: l.orientation as PlanOrientationRule | null,
            part_id: p.id,
            part_name: p.name,
            size_x_mm: p.sizeXMm,
            size_y_mm: p.sizeYMm,
            size_z_mm: p.sizeZMm,
            volume_mm3: p.volumeMm3,
            // Closed as the check and the slices count it: watertight and consistently oriented.
            watertight: p.watertight && p.metrics?.oriented === true,
            triangles: p.triangles,
            part_orientation: p.orientation as PlanOrientationRule,
            request_id: r.id,
            request_title: r.title,
            due_date: r.dueDate,
            priority: r.priority,
            request_status: r.status,
            line_quantity: rl.quantity,
            line_planned: rl.plannedCount,
            printed_count: rl.printedCount,
          },
        ];
      });
    },

    /** How many of each request line the plan holds. */
    async lineQuantities(planId: string, transaction?: Transaction): Promise<Array<{ request_line_id: string; quantity: number }>> {
      const rows = await PlanLine.findAll({ where: { planId }, attributes: ['requestLineId', 'quantity'], transaction });
      return rows.map((r) => ({ request_line_id: r.requestLineId, quantity: r.quantity }));
    },

    /** The lab's request lines among the ids, with their request and part, locked so two plans cannot both take the last of one. */
    async lockPickedLines(labId: string, requestLineIds: string[], transaction: Transaction): Promise<PickedLineRow[]> {
      const rows = await RequestLine.findAll({
        where: { id: requestLineIds },
        attributes: ['id', 'quantity', 'plannedCount'],
        include: [
          { model: Request, as: 'request', required: true, where: { labId }, attributes: ['status', 'materialId', 'title'] },
          { model: Part, as: 'part', required: true, attributes: ['name'] },
        ],
        lock: { level: transaction.LOCK.UPDATE, of: RequestLine },
        transaction,
      });
      return rows.flatMap((rl) =>
        rl.request && rl.part
          ? [{ id: rl.id, quantity: rl.quantity, planned_count: rl.plannedCount, status: rl.request.status, material_id: rl.request.materialId, title: rl.request.title, part_name: rl.part.name }]
          : [],
      );
    },

    /** Replaces the plan's lines with these, in this order. */
    async setLines(planId: string, lines: PlanLineInput[], transaction: Transaction): Promise<void> {
      await PlanLine.destroy({ where: { planId }, transaction });
      if (lines.length === 0) return;
      await PlanLine.bulkCreate(
        lines.map((l, position) => ({ planId, requestLineId: l.requestLineId, position, quantity: l.quantity, orientation: l.orientation ?? null })),
        { transaction },
      );
    },

    /**
     * Moves request lines' planned counts by the given differences (never
     * below zero), one line at a time in the order of their ids.
     */
    async adjustPlanned(deltas: Array<[requestLineId: string, delta: number]>, transaction: Transaction): Promise<void> {
      for (const [id, delta] of [...deltas].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))) {
        if (!Number.isInteger(delta)) throw new Error(`a planned count moves by whole parts, not ${delta}`);
        await RequestLine.update(
          { plannedCount: fn('GREATEST', literal(`planned_count + ${delta}`), 0), updatedAt: fn('now') },
          { where: { id }, silent: true, transaction },
        );
      }
    },

    /** The lab's plans (optionally of some statuses or one machine), last changed first, with the counts the list shows. */
    async list(labId: string, q: { status?: PlanStatus[] | null; machineId?: string | null }): Promise<PlanListRow[]> {
      // Counts and the earliest due date over each plan's lines and layouts: aggregates, so typed SQL.
      return select<PlanListRow>(
        `SELECT p.id, p.name, p.status, p.version, p.chosen_layout_id, p.queue_position, p.created_at, p.updated_at,
                p.machine_id, m.name AS machine_name, p.material_id, mt.name AS material_name,
                p.created_by, u.name AS created_by_name,
                (SELECT COUNT(*) FROM plan_lines pl WHERE pl.plan_id = p.id) AS line_count,
                (SELECT COALESCE(SUM(pl.quantity), 0) FROM plan_lines pl WHERE pl.plan_id = p.id) AS part_count,
                (SELECT to_char(MIN(r.due_date), 'YYYY-MM-DD') FROM plan_lines pl JOIN request_lines rl ON rl.id = pl.request_line_id
                   JOIN requests r ON r.id = rl.request_id WHERE pl.plan_id = p.id) AS earliest_due_date,
                (SELECT COUNT(*) FROM layouts l WHERE l.plan_id = p.id) AS layout_count
           FROM plans p
           JOIN machines m ON m.id = p.machine_id
           JOIN materials mt ON mt.id = p.material_id
           LEFT JOIN users u ON u.id = p.created_by
          WHERE p.lab_id = $1 AND ($2::text[] IS NULL OR p.status = ANY($2::text[])) AND ($3::uuid IS NULL OR p.machine_id = $3::uuid)
          ORDER BY p.updated_at DESC`,
        [labId, q.status ?? null, q.machineId ?? null],
      );
    },

    /**
     * Request lines of the lab's open requests (optionally of one material),
     * most urgent first, each with how much of it plans hold, not counting
     * the plan `exceptPlanId` itself.
     */
    async openLines(labId: string, q: { materialId?: string | null; exceptPlanId?: string | null }): Promise<OpenLineRow[]> {
      // A sum over the other plans' lines and an order by a rank of priority: typed SQL.
      return select<OpenLineRow>(
        `SELECT rl.id, rl.quantity, p.id AS part_id, p.name AS part_name, p.size_x_mm, p.size_y_mm, p.size_z_mm, p.volume_mm3,
                (p.watertight AND COALESCE((p.metrics->>'oriented')::boolean, false)) AS watertight, p.triangles, p.orientation, r.id AS request_id, r.title, to_char(r.due_date, 'YYYY-MM-DD') AS due_date, r.priority, r.material_id,
                rl.planned_count - COALESCE((SELECT SUM(pl.quantity) FROM plan_lines pl JOIN plans pp ON pp.id = pl.plan_id
                           WHERE pl.request_line_id = rl.id AND pp.id = $3::uuid AND pp.status NOT IN ${INACTIVE_SQL}), 0) AS held
           FROM request_lines rl JOIN requests r ON r.id = rl.request_id JOIN parts p ON p.id = rl.part_id
          WHERE r.lab_id = $1 AND r.status = 'open' AND ($2::uuid IS NULL OR r.material_id = $2::uuid)
          ORDER BY CASE r.priority WHEN 'urgent' THEN 0 WHEN 'high' THEN 1 WHEN 'normal' THEN 2 ELSE 3 END, r.due_date, r.created_at, rl.position`,
        [labId, q.materialId ?? null, q.exceptPlanId ?? null],
      );
    },

    /** Locks a machine's row (and so its queue) for the rest of the transaction; false when the lab (if given) has no such machine. */
    async lockMachine(machineId: string, transaction: Transaction, labId?: string): Promise<boolean> {
      const m = await Machine.findOne({ where: { id: machineId, ...(labId ? { labId } : {}) }, attributes: ['id'], lock: transaction.LOCK.UPDATE, transaction });
      return m !== null;
    },

    /** The last place taken in the machine's queue, or null when it has none. */
    async lastQueuePosition(machineId: string, transaction: Transaction): Promise<number | null> {
      const max = await Plan.max<number | null, PlanModel>('queuePosition', { where: { machineId, queuePosition: { [Op.ne]: null } }, transaction });
      return max ?? null;
    },

    async setQueuePosition(planId: string, position: number | null, transaction: Transaction): Promise<void> {
      await Plan.update({ queuePosition: position }, { where: { id: planId }, silent: true, transaction });
    },

    /** Takes the plan out of its machine's queue; the queued plans behind it move up one place. */
    async leaveQueue(plan: Pick<PlanRow, 'id' | 'machine_id' | 'queue_position'>, transaction: Transaction): Promise<void> {
      if (plan.queue_position != null) {
        await Plan.update(
          { queuePosition: literal('queue_position - 1') },
          { where: { machineId: plan.machine_id, status: 'queued', queuePosition: { [Op.gt]: plan.queue_position }, id: { [Op.ne]: plan.id } }, silent: true, transaction },
        );
      }
      await Plan.update({ queuePosition: null }, { where: { id: plan.id }, silent: true, transaction });
    },
  };
}
export type PlansRepository = ReturnType<typeof plansRepository>;
