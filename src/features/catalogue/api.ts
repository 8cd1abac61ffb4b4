import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api';
import type { CreateSeriesBody, FileProblem, LoadPreview, LoadSummary, RevisionRow, RevisionSummary, Series, SeriesListItem, Vintage } from '@schemas/catalogue';

export type { LoadPreview, RevisionRow, RevisionSummary, Series, SeriesListItem, Vintage };
export type Problem = FileProblem;

export const useSeriesList = () => useQuery({ queryKey: ['series'], queryFn: () => api<{ items: SeriesListItem[] }>('/series').then((r) => r.items) });
export const useSeries = (id: number) => useQuery({ queryKey: ['series', id], queryFn: () => api<Series & { vintageCount: number; latestVintage: Vintage | null }>(`/series/${id}`) });
export const useVintages = (id: number) => useQuery({ queryKey: ['series', id, 'vintages'], queryFn: () => api<{ items: Vintage[] }>(`/series/${id}/vintages`).then((r) => r.items) });
export const useObservations = (id: number, vintage: number | 'latest', enabled = true) =>
  useQuery({
    queryKey: ['series', id, 'observations', vintage],
    queryFn: () => api<{ vintage: number; asOf: string; periods: string[]; values: (number | null)[] }>(`/series/${id}/vintages/${vintage}/observations`),
    enabled,
  });
export const useRevisions = (id: number, from: number | undefined, to: number | undefined) =>
  useQuery({
    queryKey: ['series', id, 'revisions', from, to],
    queryFn: () => api<{ items: RevisionRow[]; summary: RevisionSummary; from: Vintage; to: Vintage }>(`/series/${id}/revisions?from=${from}&to=${to}`),
    enabled: from !== undefined && to !== undefined,
  });
export const useTriangle = (id: number, enabled: boolean) =>
  useQuery({
    queryKey: ['series', id, 'triangle'],
    queryFn: () => api<{ vintages: { number: number; asOf: string }[]; periods: string[]; values: (number | null)[][] }>(`/series/${id}/revisions/triangle`),
    enabled,
  });
export const useLoads = () => useQuery({ queryKey: ['loads'], queryFn: () => api<{ items: LoadSummary[] }>('/loads').then((r) => r.items) });

export function useSaveSeries(id?: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: Partial<CreateSeriesBody>) => (id ? api<Series>(`/series/${id}`, { method: 'PATCH', json: body }) : api<Series>('/series', { method: 'POST', json: body })),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['series'] }),
  });
}
