import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import type { PackInstanceInput, PackResult } from '../../shared/packing';
import type { LayoutSummaryView, OpenLineView, PlanListItem, PlanOrientationRule, PlanView } from '../../shared/schemas/plans';
import type { PlanStatus } from '../../shared/plans/status';
import { api } from '../api/client';

/**
 * The plan, layout and review routes as react-query hooks. Answers are
 * checked for the fields the editor relies on; the rest passes through as the
 * shared view types describe it.
 */
const id = z.union([z.string(), z.number()]).transform((v) => String(v));
const vec3 = z.tuple([z.number(), z.number(), z.number()]);
const loose = <T>(shape: z.ZodRawShape) => z.looseObject(shape) as unknown as z.ZodType<T>;

const partShape = z.looseObject({ id, name: z.string(), sizeMm: vec3, volumeMm3: z.number() });

export const planListSchema = z.array(
  loose<PlanListItem>({ id, name: z.string(), status: z.string(), version: z.number(), machine: z.looseObject({ id, name: z.string() }), material: z.looseObject({ id, name: z.string() }) }),
);

export const planSchema = loose<PlanView>({
  id,
  name: z.string(),
  status: z.string(),
  version: z.number(),
  editable: z.boolean(),
  machine: z.looseObject({ id, name: z.string(), chamberMm: vec3, layerHeightsMm: z.array(z.number()) }),
  material: z.looseObject({ id, name: z.string(), spacingMm: z.number(), marginXyMm: z.number(), marginBottomMm: z.number(), marginTopMm: z.number(), defaultLayerHeightMm: z.number() }),
  lines: z.array(z.looseObject({ id, requestLineId: id, quantity: z.number(), orientation: z.string(), part: partShape })),
  layouts: z.array(z.looseObject({ id, label: z.string(), chosen: z.boolean(), placedCount: z.number() })),
  events: z.array(z.looseObject({ to: z.string(), at: z.string() })),
});

export const openLinesSchema = z.array(
  loose<OpenLineView>({ requestLineId: id, part: partShape, request: z.looseObject({ id, title: z.string(), dueDate: z.string(), priority: z.string() }), remaining: z.number() }),
);

/** A stored layout as read back: the engine's result plus the server's estimate. */
export interface LayoutView extends LayoutSummaryView {
  planId: string;
  instance: PackInstanceInput;
  result: PackResult;
  estimate: Record<string, unknown> & { areaPerLayerMm2?: number[] };
}

export const layoutSchema = loose<LayoutView>({
  id,
  label: z.string(),
  instance: z.looseObject({ chamber: vec3, parts: z.array(z.looseObject({ id: z.string() })) }),
  result: z.looseObject({ placements: z.array(z.looseObject({ id: z.string(), position: vec3, size: vec3, orientation: z.string() })) }),
  estimate: z.looseObject({}),
});

const createdSchema = z.looseObject({ id, version: z.number(), status: z.string() });
const layoutCreatedSchema = z.looseObject({ id, label: z.string(), estimate: z.looseObject({}) });
const choseSchema = z.looseObject({ id, chosenLayoutId: id.nullable(), version: z.number(), status: z.string() });
const submittedSchema = z.looseObject({ id, status: z.string(), version: z.number(), notified: z.array(z.string()).optional() });

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
    mutationFn: (input: PlanCreateInput) => api(`/labs/${labId}/plans`, { method: 'POST', body: input, schema: createdSchema }),
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
    mutationFn: (input: { instance: PackInstanceInput; result: PackResult; label?: string; locked?: boolean }) =>
      api(`/labs/${labId}/plans/${planId}/layouts`, { method: 'POST', body: input, schema: layoutCreatedSchema }),
    onSuccess: () => refreshPlan(qc, labId, planId),
  });
}

export function usePatchLayoutMutation(labId: string, planId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ layoutId, ...patch }: { layoutId: string; label?: string; locked?: boolean }) =>
      api(`/labs/${labId}/plans/${planId}/layouts/${layoutId}`, { method: 'PATCH', body: patch, schema: z.looseObject({ id }) }),
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
    mutationFn: (layoutId: string) => api(`/labs/${labId}/plans/${planId}/layouts/${layoutId}/choose`, { method: 'POST', schema: choseSchema }),
    onSuccess: () => refreshPlan(qc, labId, planId),
  });
}

export function useSubmitPlanMutation(labId: string, planId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (comment?: string) => api(`/labs/${labId}/plans/${planId}/submit`, { method: 'POST', body: comment ? { comment } : {}, schema: submittedSchema }),
    onSuccess: () => refreshPlan(qc, labId, planId),
  });
}
