import { useQueries } from '@tanstack/react-query';
import { api } from '../api/client';
import { queueViewSchema, type QueueView } from '../../shared/schemas/runs';
import { queueKeys } from './queue';

/**
 * Every machine's queue at once, for home: the operator's next runs and the
 * late flags need all of them. The keys are the queue screen's own, so both
 * screens share one cache entry per machine.
 */

export type MachineQueueState = {
  machineId: string;
  data: QueueView | undefined;
  isPending: boolean;
  error: Error | null;
  refetch: () => unknown;
};

export function useLabQueuesQuery(labId: string, machineIds: readonly string[]): MachineQueueState[] {
  return useQueries({
    queries: machineIds.map((machineId) => ({
      queryKey: queueKeys.machine(labId, machineId),
      queryFn: ({ signal }: { signal: AbortSignal }) => api(`/labs/${labId}/machines/${machineId}/queue`, { schema: queueViewSchema, signal }),
      // Predicted times move with the clock and with runs at the machine.
      refetchInterval: 30_000,
    })),
    combine: (results) =>
      results.map((r, i) => ({ machineId: machineIds[i], data: r.data, isPending: r.isPending, error: r.error, refetch: r.refetch })),
  });
}
