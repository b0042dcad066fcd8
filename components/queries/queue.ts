import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../api/client';
import { queueViewSchema, type QueueView } from '../../shared/schemas/runs';
import { reorderQueue } from '../queue/reschedule';


export const queueKeys = {
  all: (labId: string) => ['labs', labId, 'queue'] as const,
  machine: (labId: string, machineId: string) => ['labs', labId, 'queue', machineId] as const,
};

export function useQueueQuery(labId: string, machineId: string | undefined) {
  return useQuery({
    queryKey: queueKeys.machine(labId, machineId ?? ''),
    queryFn: ({ signal }) => api(`/labs/${labId}/machines/${machineId}/queue`, { schema: queueViewSchema, signal }),
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
    mutationFn: (planIds: string[]) => api(`/labs/${labId}/machines/${machineId}/queue`, { method: 'PUT', body: { planIds }, schema: queueViewSchema }),
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

/** Puts the queue back in the order before a move the lead just made (the server allows it for a short while). */
export function useUndoQueueMoveMutation(labId: string, machineId: string) {
  const qc = useQueryClient();
  const key = queueKeys.machine(labId, machineId);
  return useMutation({
    mutationFn: (moveId: string) => api(`/labs/${labId}/machines/${machineId}/queue/moves/${moveId}/undo`, { method: 'POST', body: {}, schema: queueViewSchema }),
    onSuccess: (view) => qc.setQueryData(key, view),
    onSettled: () => qc.invalidateQueries({ queryKey: key }),
  });
}
