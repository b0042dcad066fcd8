import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../api/client';
import { planReviewedSchema, type PlanReviewed } from '../../shared/schemas/plans';
import { planFlagsViewSchema, type ReturnToDraftInput } from '../../shared/schemas/review';
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

/** Reads the plan, the plan lists and the machine's queue again after a plan moved. */
function useAfterMove(labId: string, planId: string, machineId: string | undefined) {
  const qc = useQueryClient();
  return () =>
    Promise.all([
      qc.invalidateQueries({ queryKey: planKeys.one(labId, planId) }),
      qc.invalidateQueries({ queryKey: [...planKeys.all(labId), 'list'] }),
      machineId ? qc.invalidateQueries({ queryKey: queueKeys.machine(labId, machineId) }) : Promise.resolve(),
    ]);
}

/** The lead who just approved a plan takes the approval back (the server allows it for a short while). */
export function useUndoApprovalMutation(labId: string, planId: string, machineId: string | undefined) {
  const after = useAfterMove(labId, planId, machineId);
  return useMutation({
    mutationFn: () => api(`/labs/${labId}/plans/${planId}/review/undo`, { method: 'POST', body: {}, schema: planReviewedSchema }),
    onSettled: after,
  });
}

/** An approved or queued plan back to draft, with the reason. */
export function useReturnToDraftMutation(labId: string, planId: string, machineId: string | undefined) {
  const after = useAfterMove(labId, planId, machineId);
  return useMutation({
    mutationFn: (input: ReturnToDraftInput) => api(`/labs/${labId}/plans/${planId}/return-to-draft`, { method: 'POST', body: input, schema: planReviewedSchema }),
    onSettled: after,
  });
}
