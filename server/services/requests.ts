import type { Transaction } from 'sequelize';
import type { Database } from '../db';
import { requestsRepository, type LineRow, type RequestRow } from '../db/repositories/requests';
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

/** When a plan's parts are expected out of the powder, from its machine's queue; null when not in the queue. */
export type ReadyDates = (labId: string, machineId: string) => Promise<Map<string, string>>;

/** Statuses whose parts are expected from the queue: waiting, or under way on the machine. */
const IN_QUEUE: readonly PlanStatus[] = ['queued', 'printing', 'cooling', 'breakout'];

/** Designers' requests: which parts, how many, in what material, by when. */
export function requestsService(
  db: Database,
  parts: PartsService,
  deps: { readyDates?: ReadyDates; newestRevisions?: (partIds: string[], transaction: Transaction) => Promise<Map<string, string>> } = {},
) {
  const { sequelize } = db;
  const repo = requestsRepository(db);

  async function views(rows: RequestRow[], transaction?: Transaction): Promise<RequestView[]> {
    if (rows.length === 0) return [];
    const lines = await repo.lines(rows.map((r) => r.id), transaction);
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
    const row = await repo.request(labId, requestId, transaction);
    if (!row) throw notFound('That request');
    const [view] = await views([row], transaction);
    return { ...view, builds: await builds(labId, requestId, transaction) };
  }

  /** The builds holding the request's parts, each with its lines' counts and when its parts are expected out of the powder. */
  async function builds(labId: string, requestId: string, transaction?: Transaction): Promise<RequestBuildView[]> {
    const rows = await repo.builds(labId, requestId, transaction);
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
    if (!(await repo.isMaterialOf(labId, materialId, transaction))) throw badRequest('materialId is not a material of this lab', 'materialId');
  }

  /**
   * Another lab's part id is answered like an unknown one: its name or data are never shown.
   * A part that has a newer file revision is requested as its newest revision.
   */
  async function checkParts<L extends { partId: string }>(labId: string, lines: L[], transaction: Transaction): Promise<L[]> {
    const ids = await repo.partIdsOf(labId, lines.map((l) => l.partId), transaction);
    const i = lines.findIndex((l) => !ids.has(l.partId));
    if (i >= 0) throw badRequest(`lines[${i}].partId is not a part of this lab`, `lines[${i}].partId`);
    if (!deps.newestRevisions) return lines;
    const newest = await deps.newestRevisions(lines.map((l) => l.partId), transaction);
    const mapped = lines.map((l) => ({ ...l, partId: newest.get(l.partId) ?? l.partId }));
    const seen = new Map<string, number>();
    mapped.forEach((l, k) => {
      const j = seen.get(l.partId);
      if (j !== undefined) throw badRequest(`lines[${k}].partId is a revision of the same part as lines[${j}]; name each part once`, `lines[${k}].partId`);
      seen.set(l.partId, k);
    });
    return mapped;
  }

  // A part named in a request stays until the request lets go of it.
  parts.addUsageCheck(async (labId, partId, transaction) => {
    const title = await repo.firstTitleNaming(labId, partId, transaction);
    return title !== null ? `This part is in the request "${title}"; remove it from the request before deleting the part.` : null;
  });

  return {
    get,

    async create(labId: string, userId: string, input: RequestCreate): Promise<RequestView> {
      checkDueDate(input.dueDate);
      return sequelize.transaction(async (transaction) => {
        await checkMaterial(labId, input.materialId, transaction);
        const lines = await checkParts(labId, input.lines, transaction);
        const id = await repo.create(
          { labId, title: input.title, materialId: input.materialId, dueDate: input.dueDate, priority: input.priority, notes: input.notes, createdBy: userId },
          transaction,
        );
        await repo.writeLines(id, lines, transaction);
        return get(labId, id, transaction);
      });
    },

    async list(labId: string, q: RequestListQuery): Promise<RequestListResponse> {
      const { rows, total } = await repo.page(labId, q);
      return { items: await views(rows), total };
    },

    /** The creator or a lead, and only while none of it is planned. */
    async update(labId: string, requestId: string, caller: { userId: string; isLead: boolean }, patch: RequestPatch): Promise<RequestView> {
      const current = await get(labId, requestId);
      if (!caller.isLead && current.createdBy?.id !== caller.userId) {
        throw forbidden('Only the person who filed this request or a lead of the lab may change it.');
      }
      if (patch.dueDate !== undefined) checkDueDate(patch.dueDate);
      return sequelize.transaction(async (transaction) => {
        const locked = await repo.lockForChange(labId, requestId, transaction);
        if (!locked) throw notFound('That request');
        if (locked.planned > 0) {
          throw conflict('already_planned', 'Parts of this request are already in a build plan, so it can no longer be changed; ask a planner.');
        }
        if (patch.materialId !== undefined) await checkMaterial(labId, patch.materialId, transaction);
        if (patch.lines !== undefined) {
          await repo.writeLines(requestId, await checkParts(labId, patch.lines, transaction), transaction);
        }
        const { lines: _lines, ...fields } = patch;
        // Touched even when only the lines changed, so updatedAt moves.
        await repo.update(requestId, fields, transaction);
        return get(labId, requestId, transaction);
      });
    },
  };
}
export type RequestsService = ReturnType<typeof requestsService>;
