import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import type { PackInstanceInput, PackResult } from '../../shared/packing';
import {
  layoutChosenSchema,
  layoutCreatedSchema,
  layoutViewSchema,
  openLineViewSchema,
  planCreatedSchema,
  planListItemSchema,
  planMovedSchema,
  planViewSchema,
  type LayoutView,
  type PackResultV2Input,
  type PlanOrientationRule,
} from '../../shared/schemas/plans';
import type { PlanStatus } from '../../shared/plans/status';
import { api } from '../api/client';

/**
 * The plan, layout and review routes as react-query hooks. Answers are parsed
 * with the server's own views (shared/schemas/plans.ts).
 */
export const planListSchema = z.array(planListItemSchema);
export const planSchema = planViewSchema;
export const openLinesSchema = z.array(openLineViewSchema);
export const layoutSchema = layoutViewSchema;
export type { LayoutView };

export type PlanLineInput = { requestLineId: string; quantity: number; orientation?: PlanOrientationRule | null };
export type PlanCreateInput = { name: string; machineId: string; materialId: string; lines: PlanLineInput[] };
export type PlanSaveInput = { version: number; name?: string; lines?: PlanLineInput[]; draft?: unknown };

export const planKeys = {
  all: (labId: string) => ['labs', labId, 'plans'] as const,
  list: (labId: string, status: readonly PlanStatus[] | undefined) => ['labs', labId, 'plans', 'list', status?.join(',') ?? 'all'] as const,
  one: (labId: string, planId: string) => ['labs', labId, 'plans', 'one', planId] as const,
  layout: (labId: string, planId: string, layoutId: string) => ['labs', labId, 'plans', 'one', planId, 'layout', layoutId] as const,
  openLines: (labId: string, materialId: string | undefined, planId: string | undefined) =>
    ['labs', labId, 'plans', 'open-lines', materialId ?? '', planId ?? ''] as const,
};

export function usePlansQuery(labId: string | undefined, status?: readonly PlanStatus[]) {
  return useQuery({
    queryKey: planKeys.list(labId ?? '', status),
    queryFn: ({ signal }) => api(`/labs/${labId}/plans${status?.length ? `?status=${status.join(',')}` : ''}`, { schema: planListSchema, signal }),
    enabled: !!labId,
  });
}

export function usePlanQuery(labId: string | undefined, planId: string | undefined) {
  return useQuery({
    queryKey: planKeys.one(labId ?? '', planId ?? ''),
    queryFn: ({ signal }) => api(`/labs/${labId}/plans/${planId}`, { schema: planSchema, signal }),
    enabled: !!labId && !!planId,
  });
}

export function useLayoutQuery(labId: string | undefined, planId: string | undefined, layoutId: string | null | undefined) {
  return useQuery({
    queryKey: planKeys.layout(labId ?? '', planId ?? '', layoutId ?? ''),
    queryFn: ({ signal }) => api(`/labs/${labId}/plans/${planId}/layouts/${layoutId}`, { schema: layoutSchema, signal }),
    enabled: !!labId && !!planId && !!layoutId,
    // A stored layout never changes its placements; only its label and lock do.
    staleTime: 5 * 60_000,
  });
}

export function useOpenLinesQuery(labId: string | undefined, materialId: string | undefined, planId?: string) {
  return useQuery({
    queryKey: planKeys.openLines(labId ?? '', materialId, planId),
    queryFn: ({ signal }) => {
      const q = new URLSearchParams();
      if (materialId) q.set('materialId', materialId);
      if (planId) q.set('planId', planId);
      return api(`/labs/${labId}/plans/open-lines?${q}`, { schema: openLinesSchema, signal });
    },
    enabled: !!labId,
  });
}

export function useCreatePlanMutation(labId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: PlanCreateInput) => api(`/labs/${labId}/plans`, { method: 'POST', body: input, schema: planCreatedSchema }),
    onSuccess: () => qc.invalidateQueries({ queryKey: planKeys.all(labId) }),
  });
}

/** Every plan change moves request lines' planned counts, so the lists and open lines are read again. */
function refreshPlan(qc: ReturnType<typeof useQueryClient>, labId: string, planId: string) {
  return Promise.all([
    qc.invalidateQueries({ queryKey: planKeys.one(labId, planId), exact: true }),
    qc.invalidateQueries({ queryKey: [...planKeys.all(labId), 'list'] }),
    qc.invalidateQueries({ queryKey: [...planKeys.all(labId), 'open-lines'] }),
  ]);
}

export function useSavePlanMutation(labId: string, planId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: PlanSaveInput) => api(`/labs/${labId}/plans/${planId}`, { method: 'PUT', body: input, schema: planSchema }),
    onSuccess: (plan) => {
      qc.setQueryData(planKeys.one(labId, planId), plan);
      void qc.invalidateQueries({ queryKey: [...planKeys.all(labId), 'list'] });
      void qc.invalidateQueries({ queryKey: [...planKeys.all(labId), 'open-lines'] });
    },
  });
}

export function useAddLayoutMutation(labId: string, planId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: { instance: PackInstanceInput; result: PackResult | PackResultV2Input; label?: string; locked?: boolean }) =>
      api(`/labs/${labId}/plans/${planId}/layouts`, { method: 'POST', body: input, schema: layoutCreatedSchema }),
    onSuccess: () => refreshPlan(qc, labId, planId),
  });
}

export function usePatchLayoutMutation(labId: string, planId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ layoutId, ...patch }: { layoutId: string; label?: string; locked?: boolean }) =>
      api(`/labs/${labId}/plans/${planId}/layouts/${layoutId}`, { method: 'PATCH', body: patch, schema: layoutViewSchema }),
    onSuccess: (_d, v) =>
      Promise.all([refreshPlan(qc, labId, planId), qc.invalidateQueries({ queryKey: planKeys.layout(labId, planId, v.layoutId) })]),
  });
}

export function useDeleteLayoutMutation(labId: string, planId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (layoutId: string) => api(`/labs/${labId}/plans/${planId}/layouts/${layoutId}`, { method: 'DELETE' }),
    onSuccess: () => refreshPlan(qc, labId, planId),
  });
}

export function useChooseLayoutMutation(labId: string, planId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (layoutId: string) => api(`/labs/${labId}/plans/${planId}/layouts/${layoutId}/choose`, { method: 'POST', schema: layoutChosenSchema }),
    onSuccess: () => refreshPlan(qc, labId, planId),
  });
}

export function useSubmitPlanMutation(labId: string, planId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (comment?: string) => api(`/labs/${labId}/plans/${planId}/submit`, { method: 'POST', body: comment ? { comment } : {}, schema: planMovedSchema }),
    onSuccess: () => refreshPlan(qc, labId, planId),
  });
}
