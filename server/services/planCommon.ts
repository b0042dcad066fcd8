/**
 * What several services share about plans: the plan id check, the locked
 * plan, status moves with their events, the request lines' planned counts,
 * the plan's lines, a machine or material row, and a layout's summary. The
 * rows themselves are read and written by the plans repository
 * (server/db/repositories/plans.ts); its row types are re-exported here.
 * The plans service, layouts, review, runs, the build sheet and the build
 * file use these; the plans service's own use cases are in plans.ts.
 */
import type { Transaction } from 'sequelize';
import type { Database } from '../db';
import { profilesRepository } from '../db/repositories/profiles';
import { plansRepository, type LineRow, type PlanRow } from '../db/repositories/plans';
import type { LayoutSummaryRow } from '../db/repositories/layouts';
import { AppError, conflict, notFound } from '../errors';
import { allowedNext, canTakeBack, canTransition, STATUS_LABELS, type PlanStatus } from '../../shared/plans/status';
import type { LayoutSummaryView, PlanOrientationRule } from '../../shared/schemas/plans';
import type { MachineProfile, MaterialProfile } from '../../shared/types/profiles';

export type Actor = { id: string; name: string; email?: string };

/** Statuses whose lines no longer hold request quantities: nothing of them is (or will be) printed. */
export const INACTIVE_STATUSES: readonly PlanStatus[] = ['cancelled', 'aborted'];
export type { LayoutSummaryRow, LineRow, PlanRow };

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
export function checkPlanId(id: string): string {
  if (!UUID.test(id)) throw notFound('That plan');
  return id;
}

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
  const row = await plansRepository(db).lock(labId, checkPlanId(planId), transaction);
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
  const version = await plansRepository(db).setStatus(plan.id, to, transaction);
  plan.status = to;
  plan.version = version;
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
  // At the statement's own time: two changes in one transaction (approved, then queued) keep their order.
  await plansRepository(db).addEvent(planId, from, to, userId, comment, transaction);
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
  await plansRepository(db).adjustPlanned(changed, transaction);
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

/** The plan's lines in order, each with its request line, request and part. */
export async function planLines(db: Database, planId: string, transaction?: Transaction): Promise<LineRow[]> {
  return plansRepository(db).lines(planId, transaction);
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
