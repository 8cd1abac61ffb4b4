import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api';
import type { ApiToken, AuditRow, Invitation, InviteBody, MailboxMessage, Person, Role } from '@schemas/people';
import type { AlertSettings } from '@schemas/alerts';

export type { AuditRow, Invitation, Person };
export type MailMessage = MailboxMessage;

export const usePeople = () => useQuery({ queryKey: ['people'], queryFn: () => api<{ items: Person[] }>('/users').then((r) => r.items) });
export const useInvitations = () => useQuery({ queryKey: ['invitations'], queryFn: () => api<{ items: Invitation[] }>('/invitations').then((r) => r.items) });
export const useAudit = () => useQuery({ queryKey: ['audit'], queryFn: () => api<{ items: AuditRow[] }>('/audit?limit=300').then((r) => r.items) });
export const useMailbox = () =>
  useQuery({ queryKey: ['mailbox'], queryFn: () => api<{ items: MailMessage[] }>('/dev/mailbox').then((r) => r.items), refetchInterval: 5000 });
export const useSettings = () => useQuery({ queryKey: ['settings'], queryFn: () => api<WorkspaceSettings>('/settings') });

export function useUpdatePerson() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...change }: { id: number; roles?: Role[]; status?: 'active' | 'deactivated' }) => api(`/users/${id}`, { method: 'PATCH', json: change }),
    onSuccess: () => {
      qc.invalidateQueries({ queryKey: ['people'] });
      qc.invalidateQueries({ queryKey: ['audit'] });
    },
  });
}

export function useInvite() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: InviteBody) => api<{ id: number; mailed: boolean }>('/invitations', { method: 'POST', json: body }),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['invitations'] }),
  });
}

export function useInvitationAction() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, action }: { id: number; action: 'resend' | 'withdraw' }) =>
      action === 'resend' ? api(`/invitations/${id}/resend`, { method: 'POST' }) : api(`/invitations/${id}`, { method: 'DELETE' }),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['invitations'] }),
  });
}

/** The workspace settings (services/settings.ts). */
export interface WorkspaceSettings {
  publicExhibitLinks: boolean;
  institutionName: string;
  sourceLineWording: string;
}

export function useUpdateSettings() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: Partial<WorkspaceSettings>) => api('/settings', { method: 'PUT', json: body }),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['settings'] }),
  });
}

/** One's own API tokens. */
export const useTokens = () => useQuery({ queryKey: ['tokens'], queryFn: () => api<{ items: ApiToken[] }>('/tokens').then((r) => r.items) });

export function useTokenMutations() {
  const qc = useQueryClient();
  const refresh = () => qc.invalidateQueries({ queryKey: ['tokens'] });
  return {
    create: useMutation({ mutationFn: (body: { name: string }) => api<{ id: number; token: string; name: string }>('/tokens', { method: 'POST', json: body }), onSuccess: refresh }),
    revoke: useMutation({ mutationFn: (id: number) => api(`/tokens/${id}`, { method: 'DELETE' }), onSuccess: refresh }),
  };
}

/** One's own release alerts (mail when new vintages move one's gaps). */
export const useAlertSettings = () => useQuery({ queryKey: ['alert-settings'], queryFn: () => api<AlertSettings>('/profile/alerts') });

export function useUpdateAlertSettings() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: AlertSettings) => api<AlertSettings>('/profile/alerts', { method: 'PUT', json: body }),
    onSuccess: (data) => qc.setQueryData(['alert-settings'], data),
  });
}
