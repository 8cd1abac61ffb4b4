import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { api } from '@/lib/api';
import { apiStream, type ProgressEvent } from '@/lib/ndjson';
import type { CreateFeedInput, Feed, FeedRun, UpdateFeedBody } from '@schemas/feeds';

export type { Feed, FeedRun };

export const useFeeds = () => useQuery({ queryKey: ['feeds'], queryFn: () => api<{ items: Feed[] }>('/feeds').then((r) => r.items) });

export const useFeedRuns = (id: number | undefined) =>
  useQuery({ queryKey: ['feeds', id, 'runs'], queryFn: () => api<{ items: FeedRun[] }>(`/feeds/${id}/runs`).then((r) => r.items), enabled: !!id && id > 0 });

export function useCreateFeed() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateFeedInput) => api<Feed>('/feeds', { method: 'POST', json: body }),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['feeds'] }),
  });
}

/** Changes a feed (PATCH: pause with enabled false, resume with true). */
export function useUpdateFeed(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: Partial<UpdateFeedBody>) => api<Feed>(`/feeds/${id}`, { method: 'PATCH', json: body }),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['feeds'] }),
  });
}

/** Removes a feed with its run records (the vintages it stored stay). */
export function useDeleteFeed(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api<void>(`/feeds/${id}`, { method: 'DELETE' }),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['feeds'] }),
  });
}

/** "Run now", with the run's progress (fetching, checking, storing) as it arrives. */
export function useRunFeed(id: number) {
  const qc = useQueryClient();
  const [progress, setProgress] = useState<ProgressEvent | null>(null);
  const mutation = useMutation({
    mutationFn: () => apiStream<FeedRun>(`/feeds/${id}/run`, { method: 'POST' }, setProgress),
    onSettled: () => {
      setProgress(null);
      void qc.invalidateQueries({ queryKey: ['feeds'] });
      void qc.invalidateQueries({ queryKey: ['series'] });
    },
  });
  return { ...mutation, progress };
}
