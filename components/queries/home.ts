import { useQueries } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../api/client';
import type { QueueView } from '../../shared/schemas/runs';
import { queueKeys } from './queue';

/**
 * Every machine's queue at once, for home: the operator's next runs and the
 * late flags need all of them. The keys are the queue screen's own, so both
 * screens share one cache entry per machine.
 */
const queueItem = z.looseObject({
  planId: z.string(),
  name: z.string(),
  status: z.string(),
  startAt: z.string(),
  printEndAt: z.string(),
  cooledAt: z.string(),
  breakoutDoneAt: z.string(),
  late: z.boolean(),
  lateByHours: z.number(),
  earliestDueDate: z.string().nullable(),
  requests: z.array(z.looseObject({ id: z.string(), title: z.string(), dueDate: z.string() })),
});
const labQueueSchema = z.looseObject({
  machine: z.looseObject({ id: z.string(), name: z.string(), chamberCount: z.number() }),
  now: z.string(),
  current: queueItem.nullable(),
  active: z.array(queueItem),
  plans: z.array(queueItem),
}) as unknown as z.ZodType<QueueView>;

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
      queryFn: ({ signal }: { signal: AbortSignal }) => api(`/labs/${labId}/machines/${machineId}/queue`, { schema: labQueueSchema, signal }),
      // Predicted times move with the clock and with runs at the machine.
      refetchInterval: 30_000,
    })),
    combine: (results) =>
      results.map((r, i) => ({ machineId: machineIds[i], data: r.data, isPending: r.isPending, error: r.error, refetch: r.refetch })),
  });
}
