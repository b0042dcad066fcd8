/**
 * A plan's life. Only these transitions exist; each one is recorded with who
 * made it and when.
 *
 *   draft -> in_review -> approved -> queued -> printing -> cooling -> breakout -> finishing -> done
 *    ^ ^        |  ^         |  |       |  |         |
 *    | |        v  '---------'--+-------'  |         v
 *    | '- changes_requested     |  (undo)  |       aborted (a print stopped at the machine)
 *    '--------------------------'----------'
 *              (return to draft)
 *
 *   cancelled: from any state before printing.
 *
 * Taking a decision back is kept apart from the forward moves (the floor and
 * the run steps never offer it): an approved or queued plan goes back to
 * in_review when its approval is undone shortly after it was given, and to
 * draft when a lead or planner returns it, with a reason. Neither is possible
 * once printing has started.
 */
export const PLAN_STATUSES = [
  'draft',
  'in_review',
  'changes_requested',
  'approved',
  'queued',
  'printing',
  'cooling',
  'breakout',
  'finishing',
  'done',
  'cancelled',
  'aborted',
] as const;
export type PlanStatus = (typeof PLAN_STATUSES)[number];

const BEFORE_PRINTING: PlanStatus[] = ['draft', 'in_review', 'changes_requested', 'approved', 'queued'];

const NEXT: Record<PlanStatus, PlanStatus[]> = {
  draft: ['in_review', 'cancelled'],
  in_review: ['approved', 'changes_requested', 'cancelled'],
  changes_requested: ['draft', 'cancelled'],
  approved: ['queued', 'cancelled'],
  queued: ['printing', 'cancelled'],
  printing: ['cooling', 'aborted'],
  cooling: ['breakout'],
  breakout: ['finishing'],
  finishing: ['done'],
  done: [],
  cancelled: [],
  aborted: [],
};

/** Decisions taken back: undoing an approval (-> in_review) and returning a plan to draft. */
const TAKE_BACK: Partial<Record<PlanStatus, PlanStatus[]>> = {
  approved: ['in_review', 'draft'],
  queued: ['in_review', 'draft'],
};

export function canTakeBack(from: PlanStatus, to: PlanStatus): boolean {
  return TAKE_BACK[from]?.includes(to) ?? false;
}

export function allowedNext(from: PlanStatus): readonly PlanStatus[] {
  return NEXT[from];
}

export function canTransition(from: PlanStatus, to: PlanStatus): boolean {
  return NEXT[from].includes(to);
}

export function isBeforePrinting(s: PlanStatus): boolean {
  return BEFORE_PRINTING.includes(s);
}

/** Statuses in which the planner may still change the plan. */
export function isEditable(s: PlanStatus): boolean {
  return s === 'draft' || s === 'changes_requested';
}

/** Statuses that belong to the machine's run (the floor screen). */
export const RUN_STATUSES: readonly PlanStatus[] = ['queued', 'printing', 'cooling', 'breakout', 'finishing'];

export const STATUS_LABELS: Record<PlanStatus, string> = {
  draft: 'Draft',
  in_review: 'In review',
  changes_requested: 'Sent back',
  approved: 'Approved',
  queued: 'Queued',
  printing: 'Printing',
  cooling: 'Cooling',
  breakout: 'Breakout',
  finishing: 'Finishing',
  done: 'Done',
  cancelled: 'Cancelled',
  aborted: 'Aborted',
};
