import { useMutation } from '@tanstack/react-query';
import type { RangeBody, RangeResult, ReliabilityBody, ReliabilityResult } from '@schemas/analyses';
import { api } from '@/lib/api';
import { apiStream, type ProgressEvent } from '@/lib/ndjson';

export type { RangeResult, ReliabilityResult };

/** POST /studies/range: the methods' cycles on aligned periods and their median, minimum and maximum. */
export const useRange = () => useMutation({ mutationFn: (body: RangeBody) => api<RangeResult>('/studies/range', { method: 'POST', json: body }) });

/** POST /series/:series/reliability with NDJSON progress (one line per method done). */
export function runReliability(seriesId: number, body: ReliabilityBody, onProgress: (e: ProgressEvent) => void) {
  return apiStream<ReliabilityResult>(`/series/${seriesId}/reliability`, { method: 'POST', body: JSON.stringify(body), headers: { 'Content-Type': 'application/json' } }, onProgress);
}
