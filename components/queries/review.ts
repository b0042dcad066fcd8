import { useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../api/client';
import type { PlanStatus } from '../../shared/plans/status';
import { planKeys } from './plans';
import { queueKeys } from './queue';

export type ReviewDecision = 'approve' | 'changes_requested';

const reviewedSchema = z.looseObject({
  id: z.string(),
  status: z.string(),
  version: z.number(),
  queuePosition: z.number().nullable().optional(),
  notified: z.array(z.string()).optional(),
});
export type Reviewed = { id: string; status: PlanStatus; version: number; queuePosition?: number | null; notified?: string[] };

/** The lead's decision on a plan in review; the plan, the plan lists and the machine's queue are read again. */
export function useReviewMutation(labId: string, planId: string, machineId: string | undefined) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: { decision: ReviewDecision; comment?: string }) =>
      api(`/labs/${labId}/plans/${planId}/review`, { method: 'POST', body: input, schema: reviewedSchema }) as Promise<Reviewed>,
    onSettled: () =>
      Promise.all([
        qc.invalidateQueries({ queryKey: planKeys.one(labId, planId), exact: true }),
        qc.invalidateQueries({ queryKey: [...planKeys.all(labId), 'list'] }),
        machineId ? qc.invalidateQueries({ queryKey: queueKeys.machine(labId, machineId) }) : Promise.resolve(),
      ]),
  });
}
