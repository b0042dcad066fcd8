import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db';
import { badRequest, conflict, forbidden, notFound } from '../errors';
import type { RequestBuildView, RequestCreate, RequestListQuery, RequestListResponse, RequestPatch, RequestView } from '../../shared/schemas/requests';
import type { PartsService } from './parts';
import type { PlanStatus } from '../../shared/plans/status';

const isId = (s: string) => /^[0-9a-f-]{36}$/i.test(s);

/**
 * The earliest due date accepted now: today somewhere on Earth. The
 * westernmost time zone (UTC−12) is still on yesterday's UTC date until noon
 * UTC, so a designer there can pick their own today.
 */
export function earliestDueDate(now: Date = new Date()): string {
  return new Date(now.getTime() - 12 * 3600 * 1000).toISOString().slice(0, 10);
}

const PRIORITY_RANK_SQL = "(CASE r.priority WHEN 'urgent' THEN 3 WHEN 'high' THEN 2 WHEN 'normal' THEN 1 ELSE 0 END)";

const ORDER_SQL: Record<string, string> = {
  dueDate: `r.due_date ASC, ${PRIORITY_RANK_SQL} DESC`,
  '-dueDate': `r.due_date DESC, ${PRIORITY_RANK_SQL} DESC`,
  priority: `${PRIORITY_RANK_SQL} DESC, r.due_date ASC`,
  '-priority': `${PRIORITY_RANK_SQL} ASC, r.due_date ASC`,
  createdAt: 'r.created_at ASC',
  '-createdAt': 'r.created_at DESC',
  title: 'lower(r.title) ASC',
  '-title': 'lower(r.title) DESC',
};

type RequestRow = {
  id: string;
  lab_id: string;
  title: string;
  material_id: string | null;
  material_name: string | null;
  due_date: string;
  priority: RequestView['priority'];
  notes: string;
  status: RequestView['status'];
  created_by: string | null;
  creator_name: string | null;
  created_at: Date;
  updated_at: Date;
};
type LineRow = {
  id: string;
  request_id: string;
  part_id: string;
  part_name: string;
  quantity: number;
  planned_count: number;
  printed_count: number;
  failed_count: number;
};

type BuildRow = {
  plan_id: string;
  plan_name: string;
  status: PlanStatus;
  machine_id: string;
  machine_name: string;
  material_name: string | null;
  request_line_id: string;
  quantity: number;
  good_count: number | null;
  failed_count: number | null;
  done_at: Date | null;
};

/** When a plan's parts are expected out of the powder, from its machine's queue; null when not in the queue. */
export type ReadyDates = (labId: string, machineId: string) => Promise<Map<string, string>>;

/** Statuses whose parts are expected from the queue: waiting, or under way on the machine. */
const IN_QUEUE: readonly PlanStatus[] = ['queued', 'printing', 'cooling', 'breakout'];

const SELECT_REQUESTS = `
  SELECT r.*, m.name AS material_name, u.name AS creator_name
    FROM requests r
    LEFT JOIN materials m ON m.id = r.material_id
    LEFT JOIN users u ON u.id = r.created_by`;

/** Designers' requests: which parts, how many, in what material, by when. */
export function requestsService(db: Database, parts: PartsService, deps: { readyDates?: ReadyDates } = {}) {
  const { sequelize, models } = db;

  async function views(rows: RequestRow[], transaction?: Transaction): Promise<RequestView[]> {
    if (rows.length === 0) return [];
    const lines = await sequelize.query<LineRow>(
      `SELECT l.id, l.request_id, l.part_id, p.name AS part_name, l.quantity, l.planned_count, l.printed_count,
              COALESCE((SELECT SUM(x.failed_count) FROM run_lines x WHERE x.request_line_id = l.id), 0)::int AS failed_count
         FROM request_lines l JOIN parts p ON p.id = l.part_id
        WHERE l.request_id = ANY($1::uuid[]) ORDER BY l.request_id, l.position`,
      { bind: [rows.map((r) => r.id)], type: QueryTypes.SELECT, transaction },
    );
    const byRequest = new Map<string, LineRow[]>();
    for (const l of lines) byRequest.set(l.request_id, [...(byRequest.get(l.request_id) ?? []), l]);
    return rows.map((r) => {
      const ls = (byRequest.get(r.id) ?? []).map((l) => ({
        id: l.id,
        partId: l.part_id,
        partName: l.part_name,
        quantity: l.quantity,
        plannedCount: l.planned_count,
        printedCount: l.printed_count,
        failedCount: l.failed_count,
        stillToMakeCount: Math.max(0, l.quantity - l.printed_count),
        openCount: Math.max(0, l.quantity - l.planned_count),
      }));
      const totals = {
        quantity: ls.reduce((s, l) => s + l.quantity, 0),
        planned: ls.reduce((s, l) => s + l.plannedCount, 0),
        printed: ls.reduce((s, l) => s + l.printedCount, 0),
        failed: ls.reduce((s, l) => s + l.failedCount, 0),
        stillToMake: ls.reduce((s, l) => s + l.stillToMakeCount, 0),
      };
      return {
        id: r.id,
        labId: r.lab_id,
        title: r.title,
        materialId: r.material_id,
        materialName: r.material_name,
        dueDate: String(r.due_date).slice(0, 10),
        priority: r.priority,
        notes: r.notes,
        status: r.status,
        createdBy: r.created_by ? { id: r.created_by, name: r.creator_name ?? '' } : null,
        createdAt: new Date(r.created_at).toISOString(),
        updatedAt: new Date(r.updated_at).toISOString(),
        lines: ls,
        totals,
        planned: totals.planned > 0,
      };
    });
  }

  async function get(labId: string, requestId: string, transaction?: Transaction): Promise<RequestView> {
    if (!isId(requestId)) throw notFound('That request');
    const rows = await sequelize.query<RequestRow>(`${SELECT_REQUESTS} WHERE r.lab_id = $1 AND r.id = $2`, {
      bind: [labId, requestId],
      type: QueryTypes.SELECT,
      transaction,
    });
    if (!rows[0]) throw notFound('That request');
    const [view] = await views(rows, transaction);
    return { ...view, builds: await builds(labId, requestId, transaction) };
  }

  /** The builds holding the request's parts, each with its lines' counts and when its parts are expected out of the powder. */
  async function builds(labId: string, requestId: string, transaction?: Transaction): Promise<RequestBuildView[]> {
    const rows = await sequelize.query<BuildRow>(
      `SELECT p.id AS plan_id, p.name AS plan_name, p.status, p.machine_id, mc.name AS machine_name, mt.name AS material_name,
              pl.request_line_id, pl.quantity, x.good_count, x.failed_count, r.done_at
         FROM plan_lines pl JOIN plans p ON p.id = pl.plan_id JOIN request_lines rl ON rl.id = pl.request_line_id
         JOIN machines mc ON mc.id = p.machine_id LEFT JOIN materials mt ON mt.id = p.material_id
         LEFT JOIN runs r ON r.plan_id = p.id LEFT JOIN run_lines x ON x.run_id = r.id AND x.plan_line_id = pl.id
        WHERE rl.request_id = $1 AND p.lab_id = $2 AND p.status <> 'cancelled'
        ORDER BY p.created_at, pl.position`,
      { bind: [requestId, labId], type: QueryTypes.SELECT, transaction },
    );
    const ready = new Map<string, string>();
    for (const machineId of new Set(rows.filter((r) => IN_QUEUE.includes(r.status)).map((r) => r.machine_id))) {
      for (const [planId, at] of (await deps.readyDates?.(labId, machineId)) ?? []) ready.set(planId, at);
    }
    const byPlan = new Map<string, RequestBuildView>();
    for (const r of rows) {
      const b = byPlan.get(r.plan_id) ?? {
        planId: r.plan_id,
        planName: r.plan_name,
        status: r.status,
        machine: { id: r.machine_id, name: r.machine_name },
        materialName: r.material_name,
        readyAt: r.status === 'done' && r.done_at ? new Date(r.done_at).toISOString() : (ready.get(r.plan_id) ?? null),
        lines: [],
      };
      b.lines.push({ requestLineId: r.request_line_id, quantity: r.quantity, goodCount: r.good_count, failedCount: r.failed_count });
      byPlan.set(r.plan_id, b);
    }
    return [...byPlan.values()];
  }

  function checkDueDate(dueDate: string) {
    if (dueDate < earliestDueDate()) throw badRequest(`dueDate ${dueDate} is in the past; choose today or a later date`, 'dueDate');
  }

  async function checkMaterial(labId: string, materialId: string, transaction: Transaction) {
    const m = await models.Material.findOne({ where: { id: materialId, labId }, transaction });
    if (!m) throw badRequest('materialId is not a material of this lab', 'materialId');
  }

  /** Another lab's part id is answered like an unknown one: its name or data are never shown. */
  async function checkParts(labId: string, lines: { partId: string }[], transaction: Transaction) {
    const found = await sequelize.query<{ id: string }>('SELECT id FROM parts WHERE lab_id = $1 AND id = ANY($2::uuid[])', {
      bind: [labId, lines.map((l) => l.partId)],
      type: QueryTypes.SELECT,
      transaction,
    });
    const ids = new Set(found.map((f) => f.id));
    const i = lines.findIndex((l) => !ids.has(l.partId));
    if (i >= 0) throw badRequest(`lines[${i}].partId is not a part of this lab`, `lines[${i}].partId`);
  }

  /**
   * Writes the lines in the given order. A part already on the request keeps
   * its line (and the line's id, which plans refer to); parts no longer listed
   * lose theirs.
   */
  async function writeLines(requestId: string, lines: { partId: string; quantity: number }[], transaction: Transaction) {
    const existing = await models.RequestLine.findAll({ where: { requestId }, transaction });
    const byPart = new Map(existing.map((row) => [row.get('partId') as string, row]));
    const keep = new Set(lines.map((l) => l.partId));
    for (const row of existing) if (!keep.has(row.get('partId') as string)) await row.destroy({ transaction });
    // Move the kept lines out of the way of the unique (request, position) index first.
    await sequelize.query('UPDATE request_lines SET position = -1 - position WHERE request_id = $1', { bind: [requestId], transaction });
    for (const [position, line] of lines.entries()) {
      const row = byPart.get(line.partId);
      if (row) await row.update({ quantity: line.quantity, position }, { transaction });
      else await models.RequestLine.create({ requestId, partId: line.partId, quantity: line.quantity, position, plannedCount: 0, printedCount: 0 }, { transaction });
    }
  }

  // A part named in a request stays until the request lets go of it.
  parts.addUsageCheck(async (labId, partId, transaction) => {
    const rows = await sequelize.query<{ title: string }>(
      `SELECT r.title FROM request_lines l JOIN requests r ON r.id = l.request_id
        WHERE r.lab_id = $1 AND l.part_id = $2 ORDER BY r.created_at LIMIT 1`,
      { bind: [labId, partId], type: QueryTypes.SELECT, transaction },
    );
    return rows[0] ? `This part is in the request "${rows[0].title}"; remove it from the request before deleting the part.` : null;
  });

  return {
    get,

    async create(labId: string, userId: string, input: RequestCreate): Promise<RequestView> {
      checkDueDate(input.dueDate);
      return sequelize.transaction(async (transaction) => {
        await checkMaterial(labId, input.materialId, transaction);
        await checkParts(labId, input.lines, transaction);
        const row = await models.Request.create(
          {
            labId,
            title: input.title,
            materialId: input.materialId,
            dueDate: input.dueDate,
            priority: input.priority,
            notes: input.notes,
            status: 'open',
            createdBy: userId,
          },
          { transaction },
        );
        const id = row.get('id') as string;
        await writeLines(id, input.lines, transaction);
        return get(labId, id, transaction);
      });
    },

    async list(labId: string, q: RequestListQuery): Promise<RequestListResponse> {
      const where = ['r.lab_id = $1'];
      const bind: unknown[] = [labId];
      const param = (v: unknown) => {
        bind.push(v);
        return `$${bind.length}`;
      };
      if (q.status !== 'all') where.push(`r.status = ${param(q.status)}`);
      if (q.search) where.push(`r.title ILIKE ${param(`%${q.search.replace(/[\\%_]/g, (c) => `\\${c}`)}%`)}`);
      const whereSql = where.join(' AND ');
      const [{ total }] = await sequelize.query<{ total: string }>(`SELECT count(*) AS total FROM requests r WHERE ${whereSql}`, {
        bind,
        type: QueryTypes.SELECT,
      });
      const limit = param(q.pageSize);
      const offset = param((q.page - 1) * q.pageSize);
      const rows = await sequelize.query<RequestRow>(
        `${SELECT_REQUESTS} WHERE ${whereSql} ORDER BY ${ORDER_SQL[q.sort]}, r.created_at, r.id LIMIT ${limit} OFFSET ${offset}`,
        { bind, type: QueryTypes.SELECT },
      );
      return { items: await views(rows), total: Number(total) };
    },

    /** The creator or a lead, and only while none of it is planned. */
    async update(labId: string, requestId: string, caller: { userId: string; isLead: boolean }, patch: RequestPatch): Promise<RequestView> {
      const current = await get(labId, requestId);
      if (!caller.isLead && current.createdBy?.id !== caller.userId) {
        throw forbidden('Only the person who filed this request or a lead of the lab may change it.');
      }
      if (patch.dueDate !== undefined) checkDueDate(patch.dueDate);
      return sequelize.transaction(async (transaction) => {
        const row = await models.Request.findOne({ where: { id: requestId, labId }, transaction, lock: transaction.LOCK.UPDATE });
        if (!row) throw notFound('That request');
        const planned = await models.RequestLine.sum('plannedCount', { where: { requestId }, transaction });
        if (Number(planned) > 0) {
          throw conflict('already_planned', 'Parts of this request are already in a build plan, so it can no longer be changed; ask a planner.');
        }
        if (patch.materialId !== undefined) await checkMaterial(labId, patch.materialId, transaction);
        if (patch.lines !== undefined) {
          await checkParts(labId, patch.lines, transaction);
          await writeLines(requestId, patch.lines, transaction);
        }
        const { lines: _lines, ...fields } = patch;
        // Touch the row even when only the lines changed, so updatedAt moves.
        row.set({ ...fields });
        row.changed('updatedAt' as never, true);
        await row.save({ transaction });
        return get(labId, requestId, transaction);
      });
    },
  };
}
export type RequestsService = ReturnType<typeof requestsService>;
