/**
 * Decompositions over HTTP: one series, or a batch (values sent, or stored series by id and
 * vintage). Large batches go to worker threads; progress can stream as NDJSON.
 */
import { AnalysisError, decompose, toJsonResponse, type DecomposeJson, type DecomposeRequest } from '../analysis/index.js';
import type { Db } from '../db.js';
import { badRequest, HttpError } from '../lib/errors.js';
import type { AnalysisPool } from '../workers/pool.js';
import { runBatchChunk, type BatchItem } from '../workers/decompose-task.js';
import { seriesValues } from './catalogue.js';

export function toHttp(error: unknown): never {
  if (error instanceof AnalysisError) throw new HttpError(400, error.code, error.message, error.details);
  throw error;
}

export function decomposeOne(request: DecomposeRequest): DecomposeJson {
  try {
    return toJsonResponse(decompose(request));
  } catch (error) {
    toHttp(error);
  }
}

type RawItem = { id?: string; seriesId?: number; vintage?: number | 'latest'; frequency?: string; start?: string; values?: unknown[]; transform?: string; method: string; params?: Record<string, unknown> };

/** Turns stored-series items into value arrays (one query per distinct series and vintage). */
export async function resolveItems(db: Db, items: RawItem[]): Promise<(BatchItem | { id?: string; error: { code: string; message: string } })[]> {
  const cache = new Map<string, Awaited<ReturnType<typeof seriesValues>> | HttpError>();
  const out: (BatchItem | { id?: string; error: { code: string; message: string } })[] = [];
  for (const item of items) {
    if (item.seriesId === undefined) {
      out.push(item as unknown as BatchItem);
      continue;
    }
    const key = `${item.seriesId}@${item.vintage ?? 'latest'}`;
    if (!cache.has(key)) {
      try {
        cache.set(key, await seriesValues(db, item.seriesId, item.vintage ?? 'latest'));
      } catch (error) {
        if (error instanceof HttpError && error.status < 500) cache.set(key, error);
        else throw error;
      }
    }
    const data = cache.get(key)!;
    if (data instanceof HttpError) {
      out.push({ id: item.id, error: { code: data.code, message: data.message } });
      continue;
    }
    out.push({
      id: item.id,
      frequency: data.series.frequency,
      start: data.start ?? undefined,
      values: data.values,
      transform: item.transform as BatchItem['transform'],
      method: item.method as BatchItem['method'],
      params: item.params,
      echo: { seriesId: item.seriesId, vintage: data.vintage.number },
    });
  }
  return out;
}

const INLINE_MAX_VALUES = 200_000;
const CHUNK_VALUES = 250_000;

/**
 * Runs the items, in order, and returns one JSON string per item. Small batches run here; larger
 * ones are cut into chunks for the worker pool (all threads busy at once).
 */
export async function runBatch(
  items: (BatchItem | { id?: string; error: { code: string; message: string } })[],
  output: 'full' | 'summary',
  pool: AnalysisPool | undefined,
  onProgress?: (done: number, total: number) => void,
): Promise<string[]> {
  const total = items.length;
  const results: string[] = new Array(total);
  const work: { index: number; item: BatchItem }[] = [];
  items.forEach((item, index) => {
    if ('error' in item) results[index] = JSON.stringify(item);
    else work.push({ index, item });
  });
  const size = work.reduce((s, w) => s + (w.item.values?.length ?? 0), 0);
  if (!pool || size <= INLINE_MAX_VALUES) {
    const chunk = runBatchChunk({ items: work.map((w) => w.item), output });
    chunk.forEach((r, i) => (results[work[i].index] = r));
    onProgress?.(total, total);
    return results;
  }
  const chunks: { index: number; item: BatchItem }[][] = [];
  let current: { index: number; item: BatchItem }[] = [];
  let currentSize = 0;
  for (const w of work) {
    current.push(w);
    currentSize += w.item.values?.length ?? 0;
    if (currentSize >= CHUNK_VALUES) {
      chunks.push(current);
      current = [];
      currentSize = 0;
    }
  }
  if (current.length) chunks.push(current);
  let done = total - work.length;
  await Promise.all(
    chunks.map(async (chunk) => {
      const strings = await pool.run({ items: chunk.map((c) => c.item), output });
      strings.forEach((s, i) => (results[chunk[i].index] = s));
      done += chunk.length;
      onProgress?.(done, total);
    }),
  );
  return results;
}

export function validateBatchSize(items: RawItem[]) {
  let values = 0;
  for (const i of items) values += i.values?.length ?? 0;
  if (values > 20_000_000) throw badRequest('batch_too_large', `This batch carries ${values.toLocaleString('en-US')} values; send at most 20 000 000 per request.`);
}
