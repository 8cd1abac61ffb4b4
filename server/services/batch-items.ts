/**
 * Batch items that name a stored series (by id and vintage) turned into value arrays, in a few
 * queries for the whole batch. Used on the request thread and inside worker threads.
 */
import type { Db } from '../db.js';
import { HttpError } from '../lib/errors.js';
import type { BatchItem, FailedItem, RawItem } from '../workers/batch-types.js';
import { readStoredValues } from './catalogue/stored-values.js';

export async function resolveItems(db: Db, items: RawItem[]): Promise<(BatchItem | FailedItem)[]> {
  const stored = items.filter((i) => i.seriesId !== undefined).map((i) => ({ seriesId: i.seriesId!, vintage: i.vintage ?? ('latest' as const) }));
  const found = stored.length ? await readStoredValues(db, stored) : new Map();
  return items.map((item) => {
    if (item.seriesId === undefined) return item as unknown as BatchItem;
    const data = found.get(`${item.seriesId}@${item.vintage ?? 'latest'}`);
    if (!data || data instanceof HttpError) return { id: item.id, error: { code: data?.code ?? 'not_found', message: data?.message ?? 'The series was not found.' } };
    return {
      id: item.id,
      frequency: data.series.frequency,
      start: data.start ?? undefined,
      values: data.values,
      transform: item.transform as BatchItem['transform'],
      method: item.method as BatchItem['method'],
      params: item.params,
      echo: { seriesId: item.seriesId, vintage: data.vintage.number },
    };
  });
}
