import { useInfiniteQuery, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../api/client';
import { PASSWORD_MIN, labSettingsViewSchema, sessionViewSchema, type LabSettingsUpdate } from '../../shared/schemas/auth';
import { auditPageViewSchema, type AuditKind } from '../../shared/schemas/audit';
import { dropSessionData, meKeys } from './me';

export const accountKeys = {
  sessions: ['auth', 'sessions'] as const,
  labSettings: (labId: string) => ['labs', labId, 'settings'] as const,
  audit: (labId: string, filters: AuditFilters) => ['labs', labId, 'audit', filters] as const,
};

export const resetRequestInputSchema = z.object({ email: z.string().trim().email('Enter an e-mail address.').max(254) });
export const resetInputSchema = z
  .object({
    password: z.string().min(PASSWORD_MIN, `At least ${PASSWORD_MIN} characters.`).max(200, 'At most 200 characters.'),
    repeat: z.string(),
  })
  .refine((v) => v.password === v.repeat, { message: 'The two passwords differ.', path: ['repeat'] });

/** Asks for a reset link; the answer is the same whether or not the address has an account. */
export function useResetRequestMutation() {
  return useMutation({
    mutationFn: (email: string) => api('/auth/reset-request', { method: 'POST', body: { email } }),
  });
}

export function useResetMutation(token: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (password: string) => api('/auth/reset', { method: 'POST', body: { token, password } }),
    // Every session of the account ended, this browser's too.
    onSuccess: () => {
      dropSessionData(qc);
      qc.setQueryData(meKeys.all, null);
    },
  });
}

export function useSessionsQuery() {
  return useQuery({ queryKey: accountKeys.sessions, queryFn: () => api('/auth/sessions', { schema: z.array(sessionViewSchema) }) });
}

export function useRevokeSessionMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api(`/auth/sessions/${id}`, { method: 'DELETE' }),
    onSuccess: () => qc.invalidateQueries({ queryKey: accountKeys.sessions }),
  });
}

export function useSignOutEverywhereMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api('/auth/sign-out-everywhere', { method: 'POST' }),
    onSuccess: () => {
      dropSessionData(qc);
      qc.setQueryData(meKeys.all, null);
    },
  });
}

export function useLabSettingsQuery(labId: string) {
  return useQuery({ queryKey: accountKeys.labSettings(labId), queryFn: () => api(`/labs/${labId}/settings`, { schema: labSettingsViewSchema }) });
}

/** The ISO 4217 code the lab's money is in; undefined until the settings have loaded. */
export function useLabCurrency(labId: string): string | undefined {
  return useLabSettingsQuery(labId).data?.currency;
}

export function useUpdateLabSettingsMutation(labId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: LabSettingsUpdate) => api(`/labs/${labId}/settings`, { method: 'PATCH', body: input, schema: labSettingsViewSchema }),
    onSuccess: (settings) => qc.setQueryData(accountKeys.labSettings(labId), settings),
  });
}

export type AuditFilters = { kind?: AuditKind; actor?: string; from?: string; to?: string };

/** The lab's audit log, newest first, a page at a time (leads only). */
export function useAuditQuery(labId: string, filters: AuditFilters) {
  return useInfiniteQuery({
    queryKey: accountKeys.audit(labId, filters),
    initialPageParam: null as string | null,
    queryFn: ({ pageParam }) => {
      const q = new URLSearchParams({ limit: '50' });
      for (const [k, v] of Object.entries(filters)) if (v) q.set(k, v);
      if (pageParam) q.set('before', pageParam);
      return api(`/labs/${labId}/audit?${q.toString()}`, { schema: auditPageViewSchema });
    },
    getNextPageParam: (last) => last.next,
  });
}
