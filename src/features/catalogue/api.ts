import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api';
import type { CatalogueUnits, CreateSeriesBody, FileProblem, LoadAnswer, LoadPreview, LoadSummary, RevisionRow, RevisionSummary, Series, SeriesListAnswer, SeriesListItem, SeriesListQuery, Vintage } from '@schemas/catalogue';
import { useUpload } from '@/lib/upload';
import type { HistoryAnswer, HistoryPreview, HistoryVintage } from '@schemas/history';

export type { HistoryAnswer, HistoryPreview, HistoryVintage };

export type { LoadAnswer, LoadPreview, RevisionRow, RevisionSummary, Series, SeriesListAnswer, SeriesListItem, Vintage };
export type Problem = FileProblem;

/**
 * One page of the Catalogue, searched and filtered on the server (`GET /series?q=&limit=&offset=`),
 * with the number of matching series; the previous page stays shown while the next one comes.
 */
export function useSeriesPage(query: SeriesListQuery, enabled = true) {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(query)) if (value !== undefined && value !== '') params.set(key, String(value));
  return useQuery({ queryKey: ['series', 'page', params.toString()], queryFn: () => api<SeriesListAnswer>(`/series?${params}`), placeholderData: keepPreviousData, enabled });
}
/** The units series are kept in, with how many series each (the Catalogue's unit filter). */
export const useCatalogueUnits = () => useQuery({ queryKey: ['series', 'units'], queryFn: () => api<CatalogueUnits>('/catalogue/units') });
export type SeriesDetail = Series & { vintageCount: number; latestVintage: Vintage | null };
export const useSeries = (id: number) => useQuery({ queryKey: ['series', id], queryFn: () => api<SeriesDetail>(`/series/${id}`) });
/** A series named by its id or its code; nothing is asked before one is named. */
export const useSeriesRef = (ref: number | string | null | undefined) =>
  useQuery({ queryKey: ['series', typeof ref === 'number' ? ref : String(ref ?? '')], queryFn: () => api<SeriesDetail>(`/series/${encodeURIComponent(String(ref))}`), enabled: ref !== null && ref !== undefined && ref !== '' && ref !== 0 });
/** A series' vintages; nothing is asked before a series is chosen (no request for series 0). */
export const useVintages = (id: number | undefined) => useQuery({ queryKey: ['series', id, 'vintages'], queryFn: () => api<{ items: Vintage[] }>(`/series/${id}/vintages`).then((r) => r.items), enabled: !!id && id > 0 });
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

/**
 * A load: `mutate({ path, form })` with path /series/:id/vintages or /loads, and ?dryRun=1 to
 * preview. A stored load refreshes the Catalogue and the list of loads. Loads of many series
 * stream their progress.
 */
export function useLoad(opts: { stream?: boolean } = {}) {
  const qc = useQueryClient();
  return useUpload<LoadAnswer>({
    stream: opts.stream,
    onSuccess: (answer) => {
      if (answer.vintage || answer.load) {
        qc.invalidateQueries({ queryKey: ['series'] });
        qc.invalidateQueries({ queryKey: ['loads'] });
      }
    },
  });
}

/** A history load: `mutate({ path, form })` with path /series/:id/history (and ?dryRun=1 to preview). */
export function useHistoryLoad() {
  const qc = useQueryClient();
  return useUpload<HistoryAnswer>({
    onSuccess: (answer) => {
      if (answer.loadId) {
        qc.invalidateQueries({ queryKey: ['series'] });
        qc.invalidateQueries({ queryKey: ['loads'] });
      }
    },
  });
}
