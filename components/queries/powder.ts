import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../api/client';
import type {
  LotDetailView,
  LotView,
  MaterialDetailView,
  MeltFlowView,
  MovementView,
  PlanPowderView,
  PowderOverview,
  RequestLotsView,
} from '../../shared/schemas/powder';
import type { PowderPolicy } from '../../shared/powder';

const forecast = z.looseObject({ points: z.array(z.looseObject({ at: z.string(), stockKg: z.number() })), shortage: z.boolean(), neededKg: z.number() });
const stock = z.looseObject({
  material: z.looseObject({ id: z.string(), name: z.string() }),
  policy: z.looseObject({ maxMeanAgeBuilds: z.number(), reorderLevelKg: z.number() }),
  freshKg: z.number(),
  reusedKg: z.number(),
  reusedMeanAgeBuilds: z.number(),
  reuseBlocked: z.boolean(),
  forecast,
});
const overviewSchema = z.looseObject({ materials: z.array(stock), now: z.string() }) as unknown as z.ZodType<PowderOverview>;
const detailSchema = stock.extend({
  lots: z.array(z.looseObject({ id: z.string(), code: z.string(), onHandKg: z.number() })),
  movements: z.array(z.looseObject({ id: z.string(), kind: z.string(), deltaKg: z.number(), at: z.string() })),
  checks: z.array(z.looseObject({ id: z.string(), mvrCm3Per10Min: z.number(), passed: z.boolean() })),
  history: z.array(z.looseObject({ at: z.string(), freshKg: z.number(), reusedKg: z.number() })),
}) as unknown as z.ZodType<MaterialDetailView>;
const lotSchema = z.looseObject({ id: z.string(), code: z.string(), onHandKg: z.number() }) as unknown as z.ZodType<LotView>;
const lotDetailSchema = z.looseObject({ lot: lotSchema, builds: z.array(z.looseObject({ runId: z.string() })), movements: z.array(z.looseObject({ id: z.string() })) }) as unknown as z.ZodType<LotDetailView>;
const movementSchema = z.looseObject({ id: z.string(), kind: z.string(), deltaKg: z.number() }) as unknown as z.ZodType<MovementView>;
const checkSchema = z.looseObject({ id: z.string(), mvrCm3Per10Min: z.number(), passed: z.boolean() }) as unknown as z.ZodType<MeltFlowView>;
const planSchema = z.looseObject({
  plan: z.looseObject({ id: z.string(), name: z.string() }),
  material: z.looseObject({ id: z.string(), name: z.string() }),
  tracked: z.boolean(),
  stock: z.looseObject({ freshKg: z.number(), reusedKg: z.number() }),
  warnings: z.array(z.looseObject({ code: z.string(), message: z.string() })),
}) as unknown as z.ZodType<PlanPowderView>;
const requestLotsSchema = z.looseObject({ request: z.looseObject({ id: z.string() }), builds: z.array(z.looseObject({ runId: z.string() })) }) as unknown as z.ZodType<RequestLotsView>;

export const powderKeys = {
  all: (labId: string) => ['labs', labId, 'powder'] as const,
  material: (labId: string, materialId: string) => ['labs', labId, 'powder', 'material', materialId] as const,
  lot: (labId: string, lotId: string) => ['labs', labId, 'powder', 'lot', lotId] as const,
  plan: (labId: string, planId: string) => ['labs', labId, 'powder', 'plan', planId] as const,
  request: (labId: string, requestId: string) => ['labs', labId, 'powder', 'request', requestId] as const,
};

export function usePowderQuery(labId: string) {
  return useQuery({ queryKey: powderKeys.all(labId), queryFn: ({ signal }) => api(`/labs/${labId}/powder`, { schema: overviewSchema, signal }), staleTime: 30_000 });
}

export function usePowderMaterialQuery(labId: string, materialId: string | undefined) {
  return useQuery({
    queryKey: powderKeys.material(labId, materialId ?? ''),
    queryFn: ({ signal }) => api(`/labs/${labId}/powder/materials/${materialId}`, { schema: detailSchema, signal }),
    enabled: !!materialId,
  });
}

export function usePowderLotQuery(labId: string, lotId: string | undefined) {
  return useQuery({
    queryKey: powderKeys.lot(labId, lotId ?? ''),
    queryFn: ({ signal }) => api(`/labs/${labId}/powder/lots/${lotId}`, { schema: lotDetailSchema, signal }),
    enabled: !!lotId,
  });
}

export function usePlanPowderQuery(labId: string, planId: string, opts: { refetchMs?: number } = {}) {
  return useQuery({
    queryKey: powderKeys.plan(labId, planId),
    queryFn: ({ signal }) => api(`/labs/${labId}/powder/plans/${planId}`, { schema: planSchema, signal }),
    refetchInterval: opts.refetchMs,
  });
}

export function useRequestLotsQuery(labId: string, requestId: string) {
  return useQuery({ queryKey: powderKeys.request(labId, requestId), queryFn: ({ signal }) => api(`/labs/${labId}/powder/requests/${requestId}`, { schema: requestLotsSchema, signal }) });
}

/** Every powder answer may have changed after a movement: refetch them all. */
function useRefresh(labId: string) {
  const qc = useQueryClient();
  return () => qc.invalidateQueries({ queryKey: powderKeys.all(labId) });
}

export function useReceiveLotMutation(labId: string) {
  const refresh = useRefresh(labId);
  return useMutation({
    mutationFn: (body: { materialId: string; code: string; kg: number; receivedOn: string; makerLot?: string; expiresOn?: string | null; note?: string }) =>
      api(`/labs/${labId}/powder/lots`, { method: 'POST', body, schema: lotSchema }),
    onSuccess: refresh,
  });
}

export function useMovementMutation(labId: string) {
  const refresh = useRefresh(labId);
  return useMutation({
    mutationFn: (body: { kind: 'discarded' | 'adjusted'; materialId: string; lotId: string | null; kg?: number; countedKg?: number; reason: string }) =>
      api(`/labs/${labId}/powder/movements`, { method: 'POST', body, schema: movementSchema }),
    onSuccess: refresh,
  });
}

export function useMeltFlowMutation(labId: string) {
  const refresh = useRefresh(labId);
  return useMutation({
    mutationFn: (body: { materialId: string; mvrCm3Per10Min: number; testTempC?: number; testLoadKg?: number; note?: string }) =>
      api(`/labs/${labId}/powder/checks`, { method: 'POST', body, schema: checkSchema }),
    onSuccess: refresh,
  });
}

export function useReleaseMutation(labId: string) {
  const refresh = useRefresh(labId);
  return useMutation({
    mutationFn: ({ checkId, reason }: { checkId: string; reason: string }) => api(`/labs/${labId}/powder/checks/${checkId}/release`, { method: 'POST', body: { reason }, schema: checkSchema }),
    onSuccess: refresh,
  });
}

export function usePolicyMutation(labId: string, materialId: string) {
  const refresh = useRefresh(labId);
  return useMutation({
    mutationFn: (body: PowderPolicy) => api(`/labs/${labId}/powder/materials/${materialId}/policy`, { method: 'PUT', body, schema: detailSchema }),
    onSuccess: refresh,
  });
}

export function useRecoveryMutation(labId: string, planId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { recoveredKg: number; discardedKg?: number; reason?: string }) =>
      api(`/labs/${labId}/powder/plans/${planId}/recovery`, { method: 'POST', body, schema: planSchema }),
    onSuccess: (view) => {
      qc.setQueryData(powderKeys.plan(labId, planId), view);
      return qc.invalidateQueries({ queryKey: powderKeys.all(labId) });
    },
  });
}
