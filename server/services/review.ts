import type { Database } from '../db';
import { applyTransition, invalidTransition, lockPlan, type Actor } from './planCommon';
import type { PlansService } from './plans';
import type { LabsService } from './labs';
import { canTransition } from '../../shared/plans/status';
import type { PlanReviewed, ReviewInput } from '../../shared/schemas/plans';
import { undoUntil } from './takeBack';
import { plansRepository } from '../db/repositories/plans';

export type ReviewDeps = { plans: PlansService; appUrl: string; labs: LabsService };

/**
 * A lead's decision on a plan in review. Approving records `approved` and
 * then `queued`, at the end of the plan's machine's queue; sending back needs
 * a comment. Either way the planner who sent it is e-mailed.
 */
export function reviewService(db: Database, deps: ReviewDeps) {
  const { sequelize } = db;
  const plans = plansRepository(db);

  return {
    async review(labId: string, planId: string, user: Actor, input: ReviewInput): Promise<PlanReviewed> {
      const comment = input.comment ? input.comment : null;
      const done = await sequelize.transaction(async (transaction) => {
        const plan = await lockPlan(db, labId, planId, transaction);
        let queuePosition: number | null = null;
        if (input.decision === 'approve') {
          if (!canTransition(plan.status, 'approved')) throw invalidTransition(plan.status, 'approved');
          await deps.labs.assertSecondApprover(labId, plan.id, user.id, transaction);
          await applyTransition(db, plan, 'approved', user.id, comment, transaction);
          // Locking the machine row makes two approvals for one machine take positions one after the other.
          await plans.lockMachine(plan.machine_id, transaction);
          queuePosition = ((await plans.lastQueuePosition(plan.machine_id, transaction)) ?? 0) + 1;
          await applyTransition(db, plan, 'queued', user.id, null, transaction);
          await plans.setQueuePosition(plan.id, queuePosition, transaction);
        } else {
          if (!canTransition(plan.status, 'changes_requested')) throw invalidTransition(plan.status, 'changes_requested');
          await applyTransition(db, plan, 'changes_requested', user.id, comment, transaction);
        }
        const planner = await plans.submitter(plan.id, transaction);
        return { plan, queuePosition, planner, approvedAt: new Date() };
      });
      const { plan, queuePosition, planner } = done;
      let notified: string[] = [];
      if (planner) {
        const link = `${deps.appUrl}/plans/${plan.id}`;
        notified =
          input.decision === 'approve'
            ? await deps.plans.notify(
                [planner.email],
                `Approved: plan ${plan.name}`,
                [
                  `${user.name} approved the build plan "${plan.name}". It is number ${queuePosition} in its machine's queue.`,
                  ...(comment ? ['', `Comment: ${comment}`] : []),
                  '',
                  link,
                ].join('\n'),
              )
            : await deps.plans.notify(
                [planner.email],
                `Needs changes: plan ${plan.name}`,
                [`${user.name} sent the build plan "${plan.name}" back with this comment:`, '', comment ?? '', '', 'Open it to make the changes and send it again:', link].join('\n'),
              );
      }
      return {
        id: plan.id,
        status: plan.status,
        version: plan.version,
        queuePosition,
        notified,
        undoUntil: input.decision === 'approve' ? undoUntil(done.approvedAt) : null,
      };
    },
  };
}
export type ReviewService = ReturnType<typeof reviewService>;
