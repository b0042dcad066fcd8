import { useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { PASSWORD_MIN } from '../../shared/schemas/auth';
import { api, isApiError } from '../api/client';
import { meViewSchema as meSchema, type MeResponse as Me } from '../../shared/schemas/auth';

export const meKeys = {
  all: ['me'] as const,
};

/** The signed-in user and their labs; null when signed out (401). */
export async function fetchMe(): Promise<Me | null> {
  try {
    return await api('/me', { schema: meSchema });
  } catch (e) {
    if (isApiError(e) && e.status === 401) return null;
    throw e;
  }
}

/**
 * Forget every other user's data at a session change. The me entry itself is
 * kept (and overwritten by the caller) so mounted observers keep watching it.
 */
export function dropSessionData(qc: QueryClient): void {
  qc.removeQueries({ predicate: (q) => q.queryKey[0] !== meKeys.all[0] });
}

export function useMeQuery() {
  return useQuery({ queryKey: meKeys.all, queryFn: fetchMe });
}

export const signInInputSchema = z.object({
  email: z.string().trim().email('Enter an e-mail address.'),
  password: z.string().min(1, 'Enter your password.'),
});
export type SignInInput = z.infer<typeof signInInputSchema>;

export const signUpInputSchema = z.object({
  email: z.string().trim().email('Enter an e-mail address.').max(254),
  password: z.string().min(PASSWORD_MIN, `At least ${PASSWORD_MIN} characters.`).max(200, 'At most 200 characters.'),
  name: z.string().trim().min(1, 'Enter your name.').max(120),
  labName: z.string().trim().min(1, 'Name the lab.').max(120),
});
export type SignUpInput = z.infer<typeof signUpInputSchema>;

function useSessionMutation<I>(path: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: I) => api(path, { method: 'POST', body: input, schema: meSchema }),
    onSuccess: (me) => {
      dropSessionData(qc);
      qc.setQueryData(meKeys.all, me);
    },
  });
}

export function useSignInMutation() {
  return useSessionMutation<SignInInput>('/auth/sign-in');
}

export function useSignUpMutation() {
  return useSessionMutation<SignUpInput>('/auth/sign-up');
}

export function useSignOutMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api('/auth/sign-out', { method: 'POST' }),
    onSuccess: () => {
      dropSessionData(qc);
      qc.setQueryData(meKeys.all, null);
    },
  });
}
