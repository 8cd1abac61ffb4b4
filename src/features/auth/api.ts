import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, ApiError } from '@/lib/api';
import type { ChangePasswordBody, SignInBody } from '@schemas/auth';
import type { AcceptInvitationBody, PublicUser, Role } from '@schemas/people';

export type { PublicUser, Role };

/** The person signed in, or null. A 401 is an answer here, not an error. */
export function useMe() {
  return useQuery({
    queryKey: ['me'],
    queryFn: async (): Promise<PublicUser | null> => {
      try {
        return (await api<{ user: PublicUser }>('/auth/me')).user;
      } catch (error) {
        if (error instanceof ApiError && error.status === 401) return null;
        throw error;
      }
    },
    staleTime: 60_000,
  });
}

export function useSignIn() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: SignInBody) => api<{ user: PublicUser }>('/auth/sign-in', { method: 'POST', json: body }),
    onSuccess: (data) => {
      qc.clear();
      qc.setQueryData(['me'], data.user);
    },
  });
}

export function useSignOut() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api('/auth/sign-out', { method: 'POST' }),
    onSettled: () => {
      qc.clear();
      qc.setQueryData(['me'], null);
    },
  });
}

export function useInvitationLookup(token: string) {
  return useQuery({
    queryKey: ['invitation', token],
    queryFn: () => api<{ email: string; roles: Role[]; expiresAt: string }>(`/invitations/lookup/${encodeURIComponent(token)}`),
    retry: false,
  });
}

export function useAcceptInvitation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: AcceptInvitationBody) => api<{ user: PublicUser }>('/invitations/accept', { method: 'POST', json: body }),
    onSuccess: (data) => {
      qc.clear();
      qc.setQueryData(['me'], data.user);
    },
  });
}

export function useRequestReset() {
  return useMutation({ mutationFn: (email: string) => api<{ message: string }>('/auth/password-reset', { method: 'POST', json: { email } }) });
}

export function useCompleteReset() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { token: string; password: string; revokeTokens: boolean }) => api<{ user: PublicUser; revokedTokens: number }>('/auth/password-reset/complete', { method: 'POST', json: body }),
    onSuccess: (data) => {
      qc.clear();
      qc.setQueryData(['me'], data.user);
    },
  });
}

/** Changes one's password: every other session ends; API tokens are revoked unless `revokeTokens` is false. */
export function useChangePassword() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: ChangePasswordBody) => api<{ user: PublicUser; revokedTokens: number }>('/auth/password', { method: 'POST', json: body }),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['tokens'] }),
  });
}
