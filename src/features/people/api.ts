import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api';
import type { InviteBody, MailboxMessage, Role } from '@schemas/auth';

export interface Person {
  id: number;
  email: string;
  name: string;
  status: 'active' | 'deactivated';
  roles: Role[];
  lastSignInAt: string | null;
  createdAt: string;
}
export interface Invitation {
  id: number;
  email: string;
  roles: Role[];
  invitedBy: string | null;
  createdAt: string;
  expiresAt: string;
  expired: boolean;
  sendCount: number;
}
export type MailMessage = MailboxMessage;
export interface AuditRow {
  id: number;
  at: string;
  action: string;
  actor: { id: number; email: string; name: string } | null;
  targetType: string | null;
  targetId: string | null;
  details: unknown;
  ip: string | null;
}

export const usePeople = () => useQuery({ queryKey: ['people'], queryFn: () => api<{ items: Person[] }>('/users').then((r) => r.items) });
export const useInvitations = () => useQuery({ queryKey: ['invitations'], queryFn: () => api<{ items: Invitation[] }>('/invitations').then((r) => r.items) });
export const useAudit = () => useQuery({ queryKey: ['audit'], queryFn: () => api<{ items: AuditRow[] }>('/audit?limit=300').then((r) => r.items) });
export const useMailbox = () =>
  useQuery({ queryKey: ['mailbox'], queryFn: () => api<{ items: MailMessage[] }>('/dev/mailbox').then((r) => r.items), refetchInterval: 5000 });
export const useSettings = () => useQuery({ queryKey: ['settings'], queryFn: () => api<{ publicExhibitLinks: boolean }>('/settings') });

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

export function useUpdateSettings() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { publicExhibitLinks: boolean }) => api('/settings', { method: 'PUT', json: body }),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['settings'] }),
  });
}
