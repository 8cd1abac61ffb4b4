import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api';
import type { Exhibit, ExhibitDiffAnswer, ExhibitEvent, ExhibitState, ExhibitSummary, PublicExhibit, Snapshot } from '@schemas/exhibits';

export type { Exhibit, ExhibitEvent, ExhibitState, ExhibitSummary, PublicExhibit, Snapshot };

export const STATE_LABELS: Record<ExhibitState, string> = {
  draft: 'draft',
  in_review: 'in review',
  returned: 'returned',
  approved: 'approved',
  published: 'published',
  withdrawn: 'withdrawn',
  superseded: 'superseded',
};

export const MOVE_LABELS: Record<ExhibitState, string> = {
  in_review: 'Submit for review',
  returned: 'Return to the author',
  approved: 'Approve',
  published: 'Publish',
  withdrawn: 'Withdraw',
  draft: '',
  superseded: '',
};

export const useExhibits = (filter: { status?: string; mine?: boolean }) =>
  useQuery({
    queryKey: ['exhibits', filter],
    queryFn: () => api<{ items: ExhibitSummary[] }>(`/exhibits?${new URLSearchParams({ ...(filter.status ? { status: filter.status } : {}), ...(filter.mine ? { mine: '1' } : {}) })}`).then((r) => r.items),
  });
export const useExhibit = (id: number) => useQuery({ queryKey: ['exhibit', id], queryFn: () => api<Exhibit>(`/exhibits/${id}`) });
export const useDiff = (id: number, enabled: boolean) => useQuery({ queryKey: ['exhibit', id, 'diff'], queryFn: () => api<ExhibitDiffAnswer>(`/exhibits/${id}/diff`), enabled });
export const useReviewQueue = (enabled = true) => useQuery({ queryKey: ['review'], enabled, queryFn: () => api<{ items: (ExhibitSummary & { own: boolean })[] }>('/review').then((r) => r.items), refetchInterval: 30_000 });

export function useExhibitMutations(id?: number) {
  const qc = useQueryClient();
  const done = (e: Exhibit) => {
    qc.setQueryData(['exhibit', e.id], e);
    qc.invalidateQueries({ queryKey: ['exhibits'] });
    qc.invalidateQueries({ queryKey: ['review'] });
    qc.invalidateQueries({ queryKey: ['exhibit', e.id, 'diff'] });
  };
  return {
    create: useMutation({ mutationFn: (body: Record<string, unknown>) => api<Exhibit>('/exhibits', { method: 'POST', json: body }), onSuccess: done }),
    update: useMutation({ mutationFn: (body: Record<string, unknown>) => api<Exhibit>(`/exhibits/${id}`, { method: 'PATCH', json: body }), onSuccess: done }),
    move: useMutation({ mutationFn: (body: { to: ExhibitState; comment?: string }) => api<Exhibit>(`/exhibits/${id}/transitions`, { method: 'POST', json: body }), onSuccess: done }),
    remove: useMutation({ mutationFn: () => api(`/exhibits/${id}`, { method: 'DELETE' }), onSuccess: () => qc.invalidateQueries({ queryKey: ['exhibits'] }) }),
  };
}

/** Prepares an update of a published exhibit (a new draft linked to it); answers the new draft. */
export function usePrepareUpdate(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api<Exhibit>(`/exhibits/${id}/update`, { method: 'POST' }),
    onSuccess: (e) => {
      qc.setQueryData(['exhibit', e.id], e);
      qc.invalidateQueries({ queryKey: ['exhibits'] });
    },
  });
}
