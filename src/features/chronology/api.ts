import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api';
import { contractions, type Chronology, type ChronologyBody, type ChronologyStamp, type Turn } from '@schemas/chronology';

export type { Chronology, ChronologyStamp, Turn };

export const useChronologies = () => useQuery({ queryKey: ['chronologies'], queryFn: () => api<{ items: Chronology[] }>('/chronologies').then((r) => r.items), staleTime: 60_000 });

/** The name and contractions of a chronology chosen on a study page (null: none). */
export function useChronologyStamp(id: number | null): ChronologyStamp | null {
  const list = useChronologies();
  const c = id ? list.data?.find((x) => x.id === id) : undefined;
  return c ? { id: c.id, name: c.name, area: c.area, contractions: contractions(c.turns) } : null;
}

export function useChronologyMutations() {
  const qc = useQueryClient();
  const done = () => qc.invalidateQueries({ queryKey: ['chronologies'] });
  return {
    create: useMutation({ mutationFn: (body: ChronologyBody) => api<Chronology>('/chronologies', { method: 'POST', json: body }), onSuccess: done }),
    update: useMutation({ mutationFn: ({ id, ...body }: Partial<ChronologyBody> & { id: number }) => api<Chronology>(`/chronologies/${id}`, { method: 'PATCH', json: body }), onSuccess: done }),
    remove: useMutation({ mutationFn: (id: number) => api(`/chronologies/${id}`, { method: 'DELETE' }), onSuccess: done }),
    fromSeries: useMutation({ mutationFn: (body: { seriesId: number }) => api<{ turns: Turn[]; note: string; vintage: number; series: { code: string } }>('/chronologies/from-series', { method: 'POST', json: body }) }),
  };
}

