import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { pollUnlessLive } from '../stores/live';
import { api } from '../api/client';
import type { PlanStatus } from '../../shared/plans/status';
import { calibrationViewSchema, runViewSchema, type ReadingInput, type RunView } from '../../shared/schemas/runs';
import { planKeys, planListSchema } from './plans';
import { queueKeys } from './queue';

/** The floor's cards must show a change made on another phone within 5 s. */
export const FLOOR_REFRESH_MS = 4000;


/** Statuses whose run belongs on a machine's floor: the next queued build and every one under way. */
export const FLOOR_STATUSES: readonly PlanStatus[] = ['queued', 'printing', 'cooling', 'breakout', 'finishing'];

export const runKeys = {
  all: (labId: string) => ['labs', labId, 'runs'] as const,
  one: (labId: string, planId: string) => ['labs', labId, 'runs', planId] as const,
  machine: (labId: string, machineId: string) => ['labs', labId, 'runs', 'machine', machineId] as const,
};

/** One run as its card reads it; shared by the card and the floor's ordering, so both read one request. */
export function runQueryOptions(labId: string, planId: string) {
  return {
    queryKey: runKeys.one(labId, planId),
    queryFn: ({ signal }: { signal: AbortSignal }) => api(`/labs/${labId}/plans/${planId}/run`, { schema: runViewSchema, signal }),
    refetchInterval: pollUnlessLive(labId, FLOOR_REFRESH_MS),
    refetchIntervalInBackground: false,
    staleTime: 0,
  };
}

export function useRunQuery(labId: string, planId: string) {
  return useQuery(runQueryOptions(labId, planId));
}

/** A machine's plans that are queued or under way, as the floor lists them. */
export function useMachineRunsQuery(labId: string, machineId: string) {
  return useQuery({
    queryKey: runKeys.machine(labId, machineId),
    queryFn: ({ signal }) => api(`/labs/${labId}/plans?status=${FLOOR_STATUSES.join(',')}&machineId=${machineId}`, { schema: planListSchema, signal }),
    refetchInterval: pollUnlessLive(labId, FLOOR_REFRESH_MS),
    staleTime: 0,
  });
}

function refreshAfterStep(qc: ReturnType<typeof useQueryClient>, labId: string, run: RunView) {
  qc.setQueryData(runKeys.one(labId, run.planId), run);
  return Promise.all([
    qc.invalidateQueries({ queryKey: runKeys.machine(labId, run.machine.id) }),
    qc.invalidateQueries({ queryKey: queueKeys.machine(labId, run.machine.id) }),
    qc.invalidateQueries({ queryKey: planKeys.one(labId, run.planId), exact: true }),
  ]);
}

/** Moves the run to its next stage with that stage's fields; a 409 or 400 comes back as the ApiError to show. */
export function useAdvanceRunMutation(labId: string, planId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { to: PlanStatus } & Record<string, unknown>) =>
      api(`/labs/${labId}/plans/${planId}/run/advance`, { method: 'POST', body, schema: runViewSchema }),
    onSuccess: (run) => refreshAfterStep(qc, labId, run),
    // Someone else may have moved the run: show it as it is now.
    onError: () => qc.invalidateQueries({ queryKey: runKeys.one(labId, planId) }),
  });
}

export function useAddReadingMutation(labId: string, planId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: ReadingInput) => api(`/labs/${labId}/plans/${planId}/run/readings`, { method: 'POST', body, schema: runViewSchema }),
    onSuccess: (run) => refreshAfterStep(qc, labId, run),
    onError: () => qc.invalidateQueries({ queryKey: runKeys.one(labId, planId) }),
  });
}

/** A lead accepts a reading the cooling model cannot explain, with the reason. */
export function useAcceptReadingMutation(labId: string, planId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ readingId, ...body }: { readingId: string; runId: string; reason: string }) =>
      api(`/labs/${labId}/plans/${planId}/run/readings/${readingId}/accept`, { method: 'POST', body, schema: runViewSchema }),
    onSuccess: (run) => refreshAfterStep(qc, labId, run),
    onError: () => qc.invalidateQueries({ queryKey: runKeys.one(labId, planId) }),
  });
}

/** A lead leaves a run out of the machine's calibration or takes it back in, with a reason; answers the calibration refitted. */
export function useCalibrationChoiceMutation(labId: string, machineId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ runId, ...body }: { runId: string; choice: 'exclude' | 'include'; reason: string }) =>
      api(`/labs/${labId}/machines/${machineId}/calibration/runs/${runId}`, { method: 'PUT', body, schema: calibrationViewSchema }),
    onSuccess: (view) => {
      qc.setQueryData([...runKeys.all(labId), 'calibration', machineId], view);
      return qc.invalidateQueries({ queryKey: queueKeys.machine(labId, machineId) });
    },
  });
}

/** How far a machine's estimates rest on its recorded runs, and every run against its estimate. */
export function useCalibrationQuery(labId: string, machineId: string) {
  return useQuery({
    queryKey: [...runKeys.all(labId), 'calibration', machineId] as const,
    queryFn: ({ signal }) => api(`/labs/${labId}/machines/${machineId}/calibration`, { schema: calibrationViewSchema, signal }),
    staleTime: 60_000,
  });
}

/** Where the build sheet and the build file of a plan are downloaded (same origin as the app). */
export function planFileUrl(labId: string, planId: string, file: 'sheet.pdf' | 'build.3mf'): string {
  return `${process.env.EXPO_PUBLIC_API_URL ?? ''}/api/labs/${labId}/plans/${planId}/${file}`;
}
