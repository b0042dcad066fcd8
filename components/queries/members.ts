import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../api/client';
import { memberViewSchema as memberSchema, type Role } from '../../shared/schemas/auth';
import { meKeys } from './me';

export const memberKeys = {
  all: (labId: string) => ['labs', labId, 'members'] as const,
};

export function useMembersQuery(labId: string | undefined) {
  return useQuery({
    queryKey: memberKeys.all(labId ?? ''),
    queryFn: () => api(`/labs/${labId}/members`, { schema: z.array(memberSchema) }),
    enabled: !!labId,
  });
}

export function useUpdateMemberRolesMutation(labId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, roles }: { userId: string; roles: Role[] }) =>
      api(`/labs/${labId}/members/${userId}`, { method: 'PATCH', body: { roles }, schema: memberSchema }),
    onSuccess: () => {
      qc.invalidateQueries({ queryKey: memberKeys.all(labId) });
      // The caller may have changed their own roles.
      qc.invalidateQueries({ queryKey: meKeys.all });
    },
  });
}

export function useRemoveMemberMutation(labId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (userId: string) => api(`/labs/${labId}/members/${userId}`, { method: 'DELETE' }),
    onSuccess: () => {
      qc.invalidateQueries({ queryKey: memberKeys.all(labId) });
      qc.invalidateQueries({ queryKey: meKeys.all });
    },
  });
}
