import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../api/client';
import { invitePreviewViewSchema as invitePreviewSchema, inviteViewSchema as inviteSchema, meViewSchema as meSchema, roleSchema } from '../../shared/schemas/auth';
import { dropSessionData, meKeys } from './me';

export const inviteKeys = {
  all: (labId: string) => ['labs', labId, 'invites'] as const,
  preview: (token: string) => ['invites', token] as const,
};

export const inviteInputSchema = z.object({
  email: z.string().trim().email('Enter an e-mail address.').max(254),
  roles: z.array(roleSchema).min(1, 'Pick at least one role.'),
});
export type InviteInput = z.infer<typeof inviteInputSchema>;

/** Leads only: the server answers 403 to everyone else. */
export function useInvitesQuery(labId: string | undefined, enabled = true) {
  return useQuery({
    queryKey: inviteKeys.all(labId ?? ''),
    queryFn: () => api(`/labs/${labId}/invites`, { schema: z.array(inviteSchema) }),
    enabled: !!labId && enabled,
  });
}

export function useCreateInviteMutation(labId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: InviteInput) => api(`/labs/${labId}/invites`, { method: 'POST', body: input, schema: inviteSchema }),
    onSuccess: () => qc.invalidateQueries({ queryKey: inviteKeys.all(labId) }),
  });
}

export function useRevokeInviteMutation(labId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (inviteId: string) => api(`/labs/${labId}/invites/${inviteId}`, { method: 'DELETE' }),
    onSuccess: () => qc.invalidateQueries({ queryKey: inviteKeys.all(labId) }),
  });
}

/** What an invite link offers; anyone may read it with the token. */
export function useInvitePreviewQuery(token: string | undefined) {
  return useQuery({
    queryKey: inviteKeys.preview(token ?? ''),
    queryFn: () => api(`/invites/${encodeURIComponent(token ?? '')}`, { schema: invitePreviewSchema }),
    enabled: !!token,
  });
}

export type AcceptInviteInput = { name: string; password: string } | { password: string } | Record<string, never>;

export function useAcceptInviteMutation(token: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: AcceptInviteInput) =>
      api(`/invites/${encodeURIComponent(token)}/accept`, { method: 'POST', body: input, schema: meSchema }),
    onSuccess: (me) => {
      dropSessionData(qc);
      qc.setQueryData(meKeys.all, me);
    },
  });
}
