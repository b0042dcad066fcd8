import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../api/client';
import { planReviewedSchema, type PlanReviewed } from '../../shared/schemas/plans';
import { planKeys } from './plans';
import { queueKeys } from './queue';

export type ReviewDecision = 'approve' | 'changes_requested';

export type Reviewed = PlanReviewed;

/** The lead's decision on a plan in review; the plan, the plan lists and the machine's queue are read again. */
export function useReviewMutation(labId: string, planId: string, machineId: string | undefined) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: { decision: ReviewDecision; comment?: string }) =>
      api(`/labs/${labId}/plans/${planId}/review`, { method: 'POST', body: input, schema: planReviewedSchema }),
    onSettled: () =>
      Promise.all([
        qc.invalidateQueries({ queryKey: planKeys.one(labId, planId), exact: true }),
        qc.invalidateQueries({ queryKey: [...planKeys.all(labId), 'list'] }),
        machineId ? qc.invalidateQueries({ queryKey: queueKeys.machine(labId, machineId) }) : Promise.resolve(),
      ]),
  });
}
