import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api';
import type { MethodDescription, MethodsAnswer } from '@schemas/methods';
import type { CompareBody, CompareResult, CreateStudyBody, RealtimeResult, Study, StudyResult, StudySpec } from '@schemas/studies';

export type { CompareResult, MethodDescription, RealtimeResult, Study, StudyResult };

/** The method catalogue (GET /methods): names, parameters and their defaults, read once. */
export const useMethods = () => useQuery({ queryKey: ['methods'], queryFn: () => api<MethodsAnswer>('/methods'), staleTime: Infinity });


export const useStudies = (filter: { mine?: boolean; method?: string; q?: string; seriesId?: number }, enabled = true) =>
  useQuery({
    queryKey: ['studies', filter],
    enabled,
    queryFn: () => {
      const p = new URLSearchParams();
      if (filter.mine) p.set('mine', '1');
      if (filter.method) p.set('method', filter.method);
      if (filter.q) p.set('q', filter.q);
      if (filter.seriesId) p.set('seriesId', String(filter.seriesId));
      return api<{ items: Study[] }>(`/studies?${p}`).then((r) => r.items);
    },
  });

export const useStudy = (id: number | undefined) => useQuery({ queryKey: ['study', id], queryFn: () => api<Study>(`/studies/${id}`), enabled: !!id });

/** The result for the parameters on screen; the last result stays shown while the next one loads. */
export const usePreview = (spec: StudySpec | null) =>
  useQuery({
    queryKey: ['preview', spec],
    queryFn: ({ signal }) => api<StudyResult>('/studies/preview', { method: 'POST', json: spec, signal }),
    enabled: !!spec && !!spec.seriesId,
    placeholderData: keepPreviousData,
    staleTime: 60_000,
    retry: false,
  });

export const useCompare = (body: CompareBody | null) =>
  useQuery({ queryKey: ['compare', body], queryFn: () => api<CompareResult>('/studies/compare', { method: 'POST', json: body }), enabled: !!body && body.items.length > 0, placeholderData: keepPreviousData, retry: false });

export function useSaveStudy(id?: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateStudyBody) => (id ? api<Study>(`/studies/${id}`, { method: 'PATCH', json: body }) : api<Study>('/studies', { method: 'POST', json: body })),
    onSuccess: (s) => {
      qc.invalidateQueries({ queryKey: ['studies'] });
      qc.setQueryData(['study', s.id], s);
    },
  });
}

export function useStudyAction() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, action }: { id: number; action: 'duplicate' | 'delete' }): Promise<Study | null> =>
      action === 'duplicate' ? api<Study>(`/studies/${id}/duplicate`, { method: 'POST' }) : api<void>(`/studies/${id}`, { method: 'DELETE' }).then(() => null),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['studies'] }),
  });
}
