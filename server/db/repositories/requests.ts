import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../index';
import type { RequestView } from '../../../shared/schemas/requests';
import type { PlanStatus } from '../../../shared/plans/status';

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

export type RequestRow = {
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
export type LineRow = {
  id: string;
  request_id: string;
  part_id: string;
  part_name: string;
  quantity: number;
  planned_count: number;
  printed_count: number;
  failed_count: number;
};

export type BuildRow = {
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

const SELECT_REQUESTS = `
  SELECT r.*, m.name AS material_name, u.name AS creator_name
    FROM requests r
    LEFT JOIN materials m ON m.id = r.material_id
    LEFT JOIN users u ON u.id = r.created_by`;

/**
 * Designers' requests and their lines. The lists join parts, materials,
 * users and run counts and sort by a rank of priority: typed SQL, here.
 */
export function requestsRepository(db: Database) {
  const { sequelize, models } = db;
  const select = <T extends object>(sql: string, bind: unknown[], transaction?: Transaction) => sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT, transaction });

  return {
    /** The lines of the requests, in order, each with its part's name and the parts failed in runs so far. */
    async lines(requestIds: string[], transaction?: Transaction): Promise<LineRow[]> {
      return select<LineRow>(
        `SELECT l.id, l.request_id, l.part_id, p.name AS part_name, l.quantity, l.planned_count, l.printed_count,
                COALESCE((SELECT SUM(x.failed_count) FROM run_lines x WHERE x.request_line_id = l.id), 0)::int AS failed_count
           FROM request_lines l JOIN parts p ON p.id = l.part_id
          WHERE l.request_id = ANY($1::uuid[]) ORDER BY l.request_id, l.position`,
        [requestIds],
        transaction,
      );
    },

    async request(labId: string, requestId: string, transaction?: Transaction): Promise<RequestRow | null> {
      const [row] = await select<RequestRow>(`${SELECT_REQUESTS} WHERE r.lab_id = $1 AND r.id = $2`, [labId, requestId], transaction);
      return row ?? null;
    },

    /** The plans holding the request's lines (not cancelled), with each line's run counts. */
    async builds(labId: string, requestId: string, transaction?: Transaction): Promise<BuildRow[]> {
      return select<BuildRow>(
        `SELECT p.id AS plan_id, p.name AS plan_name, p.status, p.machine_id, mc.name AS machine_name, mt.name AS material_name,
                pl.request_line_id, pl.quantity, x.good_count, x.failed_count, r.done_at
           FROM plan_lines pl JOIN plans p ON p.id = pl.plan_id JOIN request_lines rl ON rl.id = pl.request_line_id
           JOIN machines mc ON mc.id = p.machine_id LEFT JOIN materials mt ON mt.id = p.material_id
           LEFT JOIN runs r ON r.plan_id = p.id LEFT JOIN run_lines x ON x.run_id = r.id AND x.plan_line_id = pl.id
          WHERE rl.request_id = $1 AND p.lab_id = $2 AND p.status <> 'cancelled'
          ORDER BY p.created_at, pl.position`,
        [requestId, labId],
        transaction,
      );
    },

    async isMaterialOf(labId: string, materialId: string, transaction?: Transaction): Promise<boolean> {
      return (await models.Material.count({ where: { id: materialId, labId }, transaction })) > 0;
    },

    /** Which of the ids are parts of the lab. */
    async partIdsOf(labId: string, partIds: string[], transaction?: Transaction): Promise<Set<string>> {
      const rows = await models.Part.findAll({ where: { labId, id: partIds }, attributes: ['id'], transaction });
      return new Set(rows.map((r) => r.id));
    },

    /**
     * Writes the lines in the given order. A part already on the request keeps
     * its line (and the line's id, which plans refer to); parts no longer listed
     * lose theirs.
     */
    async writeLines(requestId: string, lines: { partId: string; quantity: number }[], transaction: Transaction): Promise<void> {
      const existing = await models.RequestLine.findAll({ where: { requestId }, transaction });
      const byPart = new Map(existing.map((row) => [row.partId, row]));
      const keep = new Set(lines.map((l) => l.partId));
      for (const row of existing) if (!keep.has(row.partId)) await row.destroy({ transaction });
      // Move the kept lines out of the way of the unique (request, position) index first.
      await models.RequestLine.update({ position: sequelize.literal('-1 - position') }, { where: { requestId }, transaction });
      for (const [position, line] of lines.entries()) {
        const row = byPart.get(line.partId);
        if (row) await row.update({ quantity: line.quantity, position }, { transaction });
        else await models.RequestLine.create({ requestId, partId: line.partId, quantity: line.quantity, position, plannedCount: 0, printedCount: 0 }, { transaction });
      }
    },

    /** The first request (by filing) naming the part, or null. */
    async firstTitleNaming(labId: string, partId: string, transaction?: Transaction): Promise<string | null> {
      const [row] = await select<{ title: string }>(
        `SELECT r.title FROM request_lines l JOIN requests r ON r.id = l.request_id
          WHERE r.lab_id = $1 AND l.part_id = $2 ORDER BY r.created_at LIMIT 1`,
        [labId, partId],
        transaction,
      );
      return row ? row.title : null;
    },

    async create(fields: { labId: string; title: string; materialId: string; dueDate: string; priority: RequestView['priority']; notes: string; createdBy: string }, transaction: Transaction): Promise<string> {
      return (await models.Request.create({ ...fields, status: 'open' }, { transaction })).id;
    },

    /** One page of the lab's requests (status and a title search), sorted, and how many match in all. */
    async page(labId: string, q: { status: string; search?: string; sort: string; page: number; pageSize: number }): Promise<{ rows: RequestRow[]; total: number }> {
      const where = ['r.lab_id = $1'];
      const bind: unknown[] = [labId];
      const param = (v: unknown) => {
        bind.push(v);
        return `$${bind.length}`;
      };
      if (q.status !== 'all') where.push(`r.status = ${param(q.status)}`);
      if (q.search) where.push(`r.title ILIKE ${param(`%${q.search.replace(/[\\%_]/g, (c) => `\\${c}`)}%`)}`);
      const whereSql = where.join(' AND ');
      const [{ total }] = await select<{ total: string }>(`SELECT count(*) AS total FROM requests r WHERE ${whereSql}`, bind);
      const limit = param(q.pageSize);
      const offset = param((q.page - 1) * q.pageSize);
      const rows = await select<RequestRow>(`${SELECT_REQUESTS} WHERE ${whereSql} ORDER BY ${ORDER_SQL[q.sort]}, r.created_at, r.id LIMIT ${limit} OFFSET ${offset}`, bind);
      return { rows, total: Number(total) };
    },

    /**
     * Locks the lab's request for a change; null when there is none. Returns
     * how many of its parts are already in plans.
     */
    async lockForChange(labId: string, requestId: string, transaction: Transaction): Promise<{ planned: number } | null> {
      const row = await models.Request.findOne({ where: { id: requestId, labId }, attributes: ['id'], transaction, lock: transaction.LOCK.UPDATE });
      if (!row) return null;
      return { planned: Number((await models.RequestLine.sum('plannedCount', { where: { requestId }, transaction })) ?? 0) };
    },

    /** Changes the fields given; the row is touched even when none is, so updatedAt moves. */
    async update(requestId: string, fields: { title?: string; materialId?: string; dueDate?: string; priority?: RequestView['priority']; notes?: string }, transaction: Transaction): Promise<void> {
      const row = await models.Request.findByPk(requestId, { transaction });
      if (!row) return;
      row.set({ ...fields });
      row.changed('updatedAt', true);
      await row.save({ transaction });
    },
  };
}
export type RequestsRepository = ReturnType<typeof requestsRepository>;
