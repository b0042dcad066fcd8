import type { Transaction } from 'sequelize';
import type { Database } from '../db';
import { reviewRepository } from '../db/repositories/review';
import { auditRepository } from '../db/repositories/audit';
import { queueRepository } from '../db/repositories/queue';
import { AppError, conflict, forbidden, notFound } from '../errors';
import { applyTransition, invalidTransition, lockPlan, type Actor, type PlanRow } from './planCommon';
import { canTakeBack, STATUS_LABELS } from '../../shared/plans/status';
import type { PlanReviewed } from '../../shared/schemas/plans';
import type { PlansService } from './plans';
import { plansRepository } from '../db/repositories/plans';

/** How long after approving a plan or moving the queue the lead who did it may undo it. After that, return the plan to draft. */
export const UNDO_WINDOW_MS = 2 * 60_000;

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

function windowPassed(what: string, ageMs: number, instead: string): AppError {
  const ago = ageMs < 120_000 ? `${Math.round(ageMs / 1000)} s` : `${Math.round(ageMs / 60_000)} min`;
  return conflict(
    'undo_window_passed',
    `${what} was made ${ago} ago; it can be undone only within ${UNDO_WINDOW_MS / 60_000} minutes of it. ${instead}`,
    undefined,
    { windowMs: UNDO_WINDOW_MS, ageMs: Math.round(ageMs) },
  );
}

export const undoUntil = (at: Date | string) => new Date(new Date(at).getTime() + UNDO_WINDOW_MS).toISOString();

/**
 * Taking decisions back: undoing an approval or a queue move shortly after it
 * (the window is the server's, {@link UNDO_WINDOW_MS}, counted by the
 * database's clock), and returning an approved or queued plan to draft, with
 * a reason, at any time before printing. Each is recorded in the plan's
 * history and in the lab's audit log, and the planner who sent the plan for
 * review is e-mailed, as for the approval itself (not when they did it).
 */
export function takeBackService(db: Database, deps: { plans: PlansService; appUrl: string }) {
  const { sequelize } = db;
  const repo = plansRepository(db);
  const decisions = reviewRepository(db);
  const queue = queueRepository(db);
  const audit = auditRepository(db);

  /** E-mails the plan's submitter about a take-back by someone else; the addresses reached. */
  async function tellSubmitter(planId: string, user: Actor, subject: string, lines: string[]): Promise<string[]> {
    const planner = await repo.submitter(planId);
    if (!planner || planner.id === user.id) return [];
    return deps.plans.notify([planner.email], subject, [...lines, '', `${deps.appUrl}/plans/${planId}`].join('\n'));
  }

  /** Takes the plan out of its machine's queue; those behind it move up one place. */
  async function leaveQueue(plan: PlanRow, transaction: Transaction): Promise<void> {
    await repo.lockMachine(plan.machine_id, transaction);
    await repo.leaveQueue(plan, transaction);
  }

  async function recordAudit(plan: PlanRow, actorId: string, action: string, after: Record<string, unknown>, transaction: Transaction) {
    await audit.addLabEvent({ labId: plan.lab_id, actorId, kind: 'plan', action, targetId: plan.id, targetLabel: plan.name, after }, transaction);
  }

  return {
    /** The lead who approved a plan puts it back in review, within the window; it leaves the queue. */
    async undoApproval(labId: string, planId: string, user: Actor): Promise<PlanReviewed> {
      const done = await sequelize.transaction(async (transaction) => {
        const plan = await lockPlan(db, labId, planId, transaction);
        if (!canTakeBack(plan.status, 'in_review')) throw invalidTransition(plan.status, 'in_review');
        const approval = await decisions.lastApproval(plan.id, transaction);
        if (!approval) throw conflict('not_approved', 'This plan has no approval to undo.');
        if (approval.user_id !== user.id) {
          throw forbidden('Only the lead who approved this plan can undo the approval; another member can return it to draft, with a reason.');
        }
        const age = Number(approval.age_ms);
        if (age > UNDO_WINDOW_MS) throw windowPassed('The approval', age, 'Return the plan to draft instead, with a reason.');
        const from = plan.status;
        await leaveQueue(plan, transaction);
        const version = await applyTransition(db, plan, 'in_review', user.id, 'Approval undone', transaction, { takeBack: true });
        await recordAudit(plan, user.id, 'approval_undone', { status: 'in_review', from }, transaction);
        return { id: plan.id, name: plan.name, status: plan.status, version };
      });
      const notified = await tellSubmitter(done.id, user, `Approval undone: plan ${done.name}`, [
        `${user.name} undid the approval of the build plan "${done.name}". It has left its machine's queue and is waiting for review again.`,
      ]);
      return { id: done.id, status: done.status, version: done.version, queuePosition: null, notified };
    },

    /** An approved or queued plan back to draft, before printing, with the reason kept in its history. */
    async returnToDraft(labId: string, planId: string, user: Actor, reason: string): Promise<PlanReviewed> {
      const done = await sequelize.transaction(async (transaction) => {
        const plan = await lockPlan(db, labId, planId, transaction);
        if (!canTakeBack(plan.status, 'draft')) {
          throw conflict(
            'invalid_transition',
            `A plan that is ${STATUS_LABELS[plan.status].toLowerCase()} cannot be returned to draft: only approved or queued plans can, before printing starts.`,
            undefined,
            { status: plan.status, allowed: [] },
          );
        }
        const from = plan.status;
        await leaveQueue(plan, transaction);
        const version = await applyTransition(db, plan, 'draft', user.id, reason, transaction, { takeBack: true });
        await recordAudit(plan, user.id, 'returned_to_draft', { status: 'draft', from, reason }, transaction);
        return { id: plan.id, name: plan.name, status: plan.status, version };
      });
      const notified = await tellSubmitter(done.id, user, `Returned to draft: plan ${done.name}`, [
        `${user.name} returned the build plan "${done.name}" to draft, with this reason:`,
        '',
        reason,
        '',
        'It has left its machine\'s queue. Open it to change it and send it for review again:',
      ]);
      return { id: done.id, status: done.status, version: done.version, queuePosition: null, notified };
    },

    /** Puts a machine's queue back in the order before a move, if the lead who made it asks within the window and nothing changed since. */
    async undoQueueMove(labId: string, machineId: string, moveId: string, user: Actor): Promise<void> {
      if (!UUID.test(moveId) || !UUID.test(machineId)) throw notFound('That queue move');
      await sequelize.transaction(async (transaction) => {
        await repo.lockMachine(machineId, transaction, labId);
        const move = await decisions.lockQueueMove(labId, machineId, moveId, transaction);
        if (!move) throw notFound('That queue move');
        if (move.user_id !== user.id) throw forbidden('Only the lead who moved the queue can undo that move; reorder it again instead.');
        if (move.undone_at) throw conflict('already_undone', 'This queue move was already undone.');
        const age = Number(move.age_ms);
        if (age > UNDO_WINDOW_MS) throw windowPassed('The queue move', age, 'Reorder the queue again instead.');
        const now = await queue.lockQueued(labId, machineId, transaction);
        if (now.map((p) => p.id).join(',') !== move.after_ids.join(',')) {
          throw conflict('queue_changed', 'The queue has changed since that move (a plan was approved, started, reordered or taken out), so it cannot be undone; reorder it again instead.');
        }
        await queue.setOrder(move.before_ids, transaction);
        await decisions.markQueueMoveUndone(move.id, transaction);
      });
    },
  };
}
export type TakeBackService = ReturnType<typeof takeBackService>;
