/**
 * What several services share about plans: the row types, the plan id check,
 * the row lock, status moves with their events, the request lines' planned
 * counts, the plan's lines, a machine or material row, and a layout's summary.
 * The plans service, layouts, review, runs, queue, the build sheet and the
 * build file use these; the plans service's own use cases are in plans.ts.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db';
import { profilesRepository } from '../db/repositories/profiles';
import { AppError, conflict, notFound } from '../errors';
import { allowedNext, canTakeBack, canTransition, STATUS_LABELS, type PlanStatus } from '../../shared/plans/status';
import type { LayoutSettings, LayoutSummaryView, PlanOrientationRule } from '../../shared/schemas/plans';
import type { MachineProfile, MaterialProfile } from '../../shared/types/profiles';

export type Actor = { id: string; name: string; email?: string };

/** Statuses whose lines no longer hold request quantities: nothing of them is (or will be) printed. */
export const INACTIVE_STATUSES: readonly PlanStatus[] = ['cancelled', 'aborted'];
export const INACTIVE_SQL = `('cancelled', 'aborted')`;

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
export function checkPlanId(id: string): string {
  if (!UUID.test(id)) throw notFound('That plan');
  return id;
}

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

export function invalidTransition(from: PlanStatus, to: PlanStatus): AppError {
  const allowed = allowedNext(from);
  const can = allowed.length ? allowed.map((s) => STATUS_LABELS[s].toLowerCase()).join(', ') : 'nothing else';
  return conflict(
    'invalid_transition',
    `A plan that is ${STATUS_LABELS[from].toLowerCase()} cannot become ${STATUS_LABELS[to].toLowerCase()}; from here it can become: ${can}.`,
    undefined,
    { status: from, allowed: [...allowed] },
  );
}

export function readOnly(status: PlanStatus): AppError {
  return conflict(
    'read_only',
    `This plan is ${STATUS_LABELS[status].toLowerCase()}, so it can no longer be changed` +
      (status === 'in_review' ? ' until a lead sends it back.' : '.'),
    undefined,
    { status },
  );
}

/** The plan row, locked for the rest of the transaction; another lab's plan is not found. */
export async function lockPlan(db: Database, labId: string, planId: string, transaction: Transaction): Promise<PlanRow> {
  const [row] = await db.sequelize.query<PlanRow>('SELECT * FROM plans WHERE id = $1 AND lab_id = $2 FOR UPDATE', {
    bind: [checkPlanId(planId), labId],
    type: QueryTypes.SELECT,
    transaction,
  });
  if (!row) throw notFound('That plan');
  return row;
}

/**
 * Moves the plan to `to` if the status machine allows it, records who and
 * when, and bumps the version; returns the new version. `takeBack` allows the
 * moves that take a decision back (undo an approval, return to draft) instead.
 */
export async function applyTransition(
  db: Database,
  plan: PlanRow,
  to: PlanStatus,
  userId: string | null,
  comment: string | null,
  transaction: Transaction,
  opts: { takeBack?: boolean } = {},
): Promise<number> {
  if (!(opts.takeBack ? canTakeBack(plan.status, to) : canTransition(plan.status, to))) throw invalidTransition(plan.status, to);
  await recordEvent(db, plan.id, plan.status, to, userId, comment, transaction);
  const [rows] = (await db.sequelize.query(
    'UPDATE plans SET status = $2, version = version + 1, updated_at = now() WHERE id = $1 RETURNING version',
    { bind: [plan.id, to], transaction },
  )) as [Array<{ version: number }>, unknown];
  plan.status = to;
  plan.version = rows[0].version;
  return plan.version;
}

export async function recordEvent(
  db: Database,
  planId: string,
  from: PlanStatus | null,
  to: PlanStatus,
  userId: string | null,
  comment: string | null,
  transaction: Transaction,
): Promise<void> {
  // clock_timestamp, not now(): two changes in one transaction (approved, then queued) keep their order.
  await db.sequelize.query(
    `INSERT INTO plan_events (id, plan_id, from_status, to_status, user_id, comment, created_at)
     VALUES (gen_random_uuid(), $1, $2, $3, $4, $5, clock_timestamp())`,
    { bind: [planId, from, to, userId, comment], transaction },
  );
}

/**
 * Moves request lines' planned counts by what a plan change took or gave
 * back, in the caller's transaction. By differences rather than recounted
 * from the plans, so that parts a run gives back (failed at breakout) stay
 * open whatever other plans do later.
 */
export async function adjustPlanned(db: Database, deltas: Map<string, number>, transaction: Transaction): Promise<void> {
  const changed = [...deltas].filter(([, d]) => d !== 0);
  if (changed.length === 0) return;
  await db.sequelize.query(
    `UPDATE request_lines rl SET planned_count = GREATEST(rl.planned_count + d.delta, 0), updated_at = now()
       FROM (SELECT unnest($1::uuid[]) AS id, unnest($2::int[]) AS delta) d
      WHERE rl.id = d.id`,
    { bind: [changed.map(([id]) => id), changed.map(([, d]) => d)], transaction },
  );
}

/** A planner's edit of a plan that was sent back reopens it as a draft (recorded like any other change). */
export async function reopenIfSentBack(db: Database, plan: PlanRow, userId: string, transaction: Transaction): Promise<void> {
  if (plan.status === 'changes_requested') await applyTransition(db, plan, 'draft', userId, null, transaction);
}

export function effectiveRule(line: Pick<LineRow, 'orientation' | 'part_orientation'>): PlanOrientationRule {
  return line.orientation ?? line.part_orientation;
}

/** Which lines, how many and how they may turn: a layout packed for another key no longer fits the plan. */
export function linesKey(lines: Array<Pick<LineRow, 'request_line_id' | 'quantity' | 'orientation' | 'part_orientation'>>): string {
  return lines
    .map((l) => `${l.request_line_id}:${l.quantity}:${effectiveRule(l)}`)
    .sort()
    .join(',');
}

export async function planLines(db: Database, planId: string, transaction?: Transaction): Promise<LineRow[]> {
  return db.sequelize.query<LineRow>(
    `SELECT pl.id, pl.request_line_id, pl.position, pl.quantity, pl.orientation,
            p.id AS part_id, p.name AS part_name, p.size_x_mm, p.size_y_mm, p.size_z_mm, p.volume_mm3,
            p.orientation AS part_orientation, r.id AS request_id, r.title AS request_title,
            to_char(r.due_date, 'YYYY-MM-DD') AS due_date, r.priority, r.status AS request_status,
            rl.quantity AS line_quantity, rl.planned_count AS line_planned, rl.printed_count
       FROM plan_lines pl
       JOIN request_lines rl ON rl.id = pl.request_line_id
       JOIN requests r ON r.id = rl.request_id
       JOIN parts p ON p.id = rl.part_id
      WHERE pl.plan_id = $1
      ORDER BY pl.position`,
    { bind: [planId], type: QueryTypes.SELECT, transaction },
  );
}

export type MachineRow = MachineProfile & { id: string; name: string };
export type MaterialRow = MaterialProfile & { id: string; name: string };

/** A machine or material of the lab with its profile flattened, as the profile routes show it. */
export async function profileRow(db: Database, table: 'machines', labId: string, id: string, transaction?: Transaction): Promise<MachineRow | null>;
export async function profileRow(db: Database, table: 'materials', labId: string, id: string, transaction?: Transaction): Promise<MaterialRow | null>;
export async function profileRow(
  db: Database,
  table: 'machines' | 'materials',
  labId: string,
  id: string,
  transaction?: Transaction,
): Promise<MachineRow | MaterialRow | null> {
  const row = await profilesRepository(db, table).find(labId, id, transaction);
  // The profile was checked by its schema when it was stored.
  return row ? ({ id: row.id, ...row.profile, name: row.name } as MachineRow | MaterialRow) : null;
}

export const iso = (d: Date | string) => new Date(d).toISOString();
export const person = (id: string | null, name: string | null) => (id ? { id, name: name ?? '' } : null);

/** The numbers a layout's `summary` column keeps about its packing. */
export type StoredLayoutSummary = { unplaced?: Array<{ id: string; count: number }>; height: number; layers: number; utilization: number; elapsedMs: number };

/** The columns of a layout row a summary shows, with its author's name and the estimate without its per-layer profile. */
export type LayoutSummaryRow = {
  id: string;
  label: string;
  locked: boolean;
  settings: LayoutSettings;
  lines_key: string;
  placement_count: number;
  summary: StoredLayoutSummary;
  result_format: string;
  estimate_summary: Record<string, unknown> | null;
  created_by: string | null;
  created_by_name: string | null;
  created_at: Date | string;
};

/** The layout row's numbers without the placements and the per-layer profile. */
export function layoutSummary(row: LayoutSummaryRow, plan: { chosen_layout_id: string | null }, currentKey: string): LayoutSummaryView {
  return {
    id: row.id,
    label: row.label,
    locked: row.locked,
    chosen: plan.chosen_layout_id === row.id,
    matchesPlan: row.lines_key === currentKey,
    settings: row.settings,
    placedCount: row.placement_count,
    unplacedCount: (row.summary.unplaced ?? []).reduce((s, u) => s + u.count, 0),
    heightMm: row.summary.height,
    layers: row.summary.layers,
    utilization: row.summary.utilization,
    elapsedMs: row.summary.elapsedMs,
    resultFormat: row.result_format,
    estimate: row.estimate_summary ?? {},
    createdBy: person(row.created_by, row.created_by_name),
    createdAt: iso(row.created_at),
  };
}
