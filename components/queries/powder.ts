import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../api/client';
import {
  lotDetailView,
  lotView,
  materialDetailView,
  meltFlowView,
  movementView,
  planPowderView,
  powderOverview,
  requestLotsView,
} from '../../shared/schemas/powder';
import type { PowderPolicy } from '../../shared/powder';

export const powderKeys = {
  all: (labId: string) => ['labs', labId, 'powder'] as const,
  material: (labId: string, materialId: string) => ['labs', labId, 'powder', 'material', materialId] as const,
  lot: (labId: string, lotId: string) => ['labs', labId, 'powder', 'lot', lotId] as const,
  plan: (labId: string, planId: string) => ['labs', labId, 'powder', 'plan', planId] as const,
  request: (labId: string, requestId: string) => ['labs', labId, 'powder', 'request', requestId] as const,
};

export function usePowderQuery(labId: string) {
  return useQuery({ queryKey: powderKeys.all(labId), queryFn: ({ signal }) => api(`/labs/${labId}/powder`, { schema: powderOverview, signal }), staleTime: 30_000 });
}

export function usePowderMaterialQuery(labId: string, materialId: string | undefined) {
  return useQuery({
    queryKey: powderKeys.material(labId, materialId ?? ''),
    queryFn: ({ signal }) => api(`/labs/${labId}/powder/materials/${materialId}`, { schema: materialDetailView, signal }),
    enabled: !!materialId,
  });
}

export function usePowderLotQuery(labId: string, lotId: string | undefined) {
  return useQuery({
    queryKey: powderKeys.lot(labId, lotId ?? ''),
    queryFn: ({ signal }) => api(`/labs/${labId}/powder/lots/${lotId}`, { schema: lotDetailView, signal }),
    enabled: !!lotId,
  });
}

export function usePlanPowderQuery(labId: string, planId: string, opts: { refetchMs?: number } = {}) {
  return useQuery({
    queryKey: powderKeys.plan(labId, planId),
    queryFn: ({ signal }) => api(`/labs/${labId}/powder/plans/${planId}`, { schema: planPowderView, signal }),
    refetchInterval: opts.refetchMs,
  });
}

export function useRequestLotsQuery(labId: string, requestId: string) {
  return useQuery({ queryKey: powderKeys.request(labId, requestId), queryFn: ({ signal }) => api(`/labs/${labId}/powder/requests/${requestId}`, { schema: requestLotsView, signal }) });
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
      api(`/labs/${labId}/powder/lots`, { method: 'POST', body, schema: lotView }),
    onSuccess: refresh,
  });
}

export function useMovementMutation(labId: string) {
  const refresh = useRefresh(labId);
  return useMutation({
    mutationFn: (body: { kind: 'discarded' | 'adjusted'; materialId: string; lotId: string | null; kg?: number; countedKg?: number; reason: string }) =>
      api(`/labs/${labId}/powder/movements`, { method: 'POST', body, schema: movementView }),
    onSuccess: refresh,
  });
}

export function useMeltFlowMutation(labId: string) {
  const refresh = useRefresh(labId);
  return useMutation({
    mutationFn: (body: { materialId: string; mvrCm3Per10Min: number; testTempC?: number; testLoadKg?: number; note?: string }) =>
      api(`/labs/${labId}/powder/checks`, { method: 'POST', body, schema: meltFlowView }),
    onSuccess: refresh,
  });
}

export function useReleaseMutation(labId: string) {
  const refresh = useRefresh(labId);
  return useMutation({
    mutationFn: ({ checkId, reason }: { checkId: string; reason: string }) => api(`/labs/${labId}/powder/checks/${checkId}/release`, { method: 'POST', body: { reason }, schema: meltFlowView }),
    onSuccess: refresh,
  });
}

export function usePolicyMutation(labId: string, materialId: string) {
  const refresh = useRefresh(labId);
  return useMutation({
    mutationFn: (body: PowderPolicy) => api(`/labs/${labId}/powder/materials/${materialId}/policy`, { method: 'PUT', body, schema: materialDetailView }),
    onSuccess: refresh,
  });
}

export function useRecoveryMutation(labId: string, planId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { recoveredKg: number; discardedKg?: number; reason?: string }) =>
      api(`/labs/${labId}/powder/plans/${planId}/recovery`, { method: 'POST', body, schema: planPowderView }),
    onSuccess: (view) => {
      qc.setQueryData(powderKeys.plan(labId, planId), view);
      return qc.invalidateQueries({ queryKey: powderKeys.all(labId) });
    },
  });
}
