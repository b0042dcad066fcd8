import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../api/client';
import type { QueueView } from '../../shared/schemas/runs';
import { reorderQueue } from '../queue/reschedule';

const item = z.looseObject({
  planId: z.string(),
  name: z.string(),
  status: z.string(),
  startAt: z.string(),
  printEndAt: z.string(),
  leavesMachineAt: z.string(),
  cooledAt: z.string(),
  breakoutDoneAt: z.string(),
  late: z.boolean(),
  requests: z.array(z.looseObject({ id: z.string(), title: z.string(), dueDate: z.string() })),
  durations: z.looseObject({ preheatSeconds: z.number(), layersSeconds: z.number() }),
});
const queueSchema = z.looseObject({
  machine: z.looseObject({ id: z.string(), name: z.string(), chamberCount: z.number() }),
  calibration: z.looseObject({ runs: z.number(), calibrated: z.boolean() }),
  now: z.string(),
  current: item.nullable(),
  plans: z.array(item),
}) as unknown as z.ZodType<QueueView>;

export const queueKeys = {
  all: (labId: string) => ['labs', labId, 'queue'] as const,
  machine: (labId: string, machineId: string) => ['labs', labId, 'queue', machineId] as const,
};

export function useQueueQuery(labId: string, machineId: string | undefined) {
  return useQuery({
    queryKey: queueKeys.machine(labId, machineId ?? ''),
    queryFn: ({ signal }) => api(`/labs/${labId}/machines/${machineId}/queue`, { schema: queueSchema, signal }),
    enabled: !!machineId,
    // Predicted times move with the clock and with runs at the machine.
    refetchInterval: 15_000,
  });
}

/**
 * The lead's new order. The times are recomputed here at once (the same
 * schedule as the server's), then the server's answer replaces them; a
 * refused order puts the last known queue back.
 */
export function useReorderQueueMutation(labId: string, machineId: string) {
  const qc = useQueryClient();
  const key = queueKeys.machine(labId, machineId);
  return useMutation({
    mutationFn: (planIds: string[]) => api(`/labs/${labId}/machines/${machineId}/queue`, { method: 'PUT', body: { planIds }, schema: queueSchema }),
    onMutate: async (planIds) => {
      await qc.cancelQueries({ queryKey: key });
      const before = qc.getQueryData<QueueView>(key);
      if (before) qc.setQueryData(key, reorderQueue(before, planIds, Date.now()));
      return { before };
    },
    onError: (_e, _v, ctx) => {
      if (ctx?.before) qc.setQueryData(key, ctx.before);
    },
    onSuccess: (view) => qc.setQueryData(key, view),
    onSettled: () => qc.invalidateQueries({ queryKey: key }),
  });
}
