import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../api/client';
import { planReviewedSchema, type PlanReviewed } from '../../shared/schemas/plans';
import { planFlagsViewSchema } from '../../shared/schemas/review';
import { planKeys } from './plans';
import { queueKeys } from './queue';

/** Under the plan's own key, so whatever reads the plan again reads its flags again too. */
export const flagKeys = { plan: (labId: string, planId: string) => [...planKeys.one(labId, planId), 'flags'] as const };

/** What review points out about a plan (low density, material change, a missed due date, an open mesh), worked out by the server. */
export function usePlanFlagsQuery(labId: string, planId: string) {
  return useQuery({
    queryKey: flagKeys.plan(labId, planId),
    queryFn: () => api(`/labs/${labId}/plans/${planId}/flags`, { schema: planFlagsViewSchema }),
  });
}

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
        qc.invalidateQueries({ queryKey: flagKeys.plan(labId, planId) }),
        qc.invalidateQueries({ queryKey: [...planKeys.all(labId), 'list'] }),
        machineId ? qc.invalidateQueries({ queryKey: queueKeys.machine(labId, machineId) }) : Promise.resolve(),
      ]),
  });
}
