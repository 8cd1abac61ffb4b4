/**
 * Decompositions over HTTP: one series, or a batch (values sent, or stored series by id and
 * vintage). Large batches go to worker threads; progress can stream as NDJSON.
 */
import { decompose, toJsonResponse, type DecomposeJson, type DecomposeRequest } from '../analysis/index.js';
import { badRequest } from '../lib/errors.js';
import type { AnalysisPool } from '../workers/pool.js';
import { runBatchChunk, type BatchItem } from '../workers/decompose-task.js';

/** One decomposition in its JSON form; an AnalysisError becomes a 400 in the error handler. */
export function decomposeOne(request: DecomposeRequest): DecomposeJson {
  return toJsonResponse(decompose(request));
}

export type { RawItem } from './values.js';
import { resolveItems, type RawItem } from './values.js';
export { resolveItems };

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

const STORED_CHUNK = 250;

/**
 * A large batch of stored series: each worker reads its chunk's observations from the database
 * itself, so the main thread neither parses millions of rows nor copies them to the workers.
 */
export async function runStoredBatch(items: RawItem[], output: 'full' | 'summary', pool: AnalysisPool, databaseUrl: string, onProgress?: (done: number, total: number) => void) {
  const results: string[] = [];
  for (let i = 0; i < items.length; i += STORED_CHUNK) {
    const chunk = items.slice(i, i + STORED_CHUNK);
    const started = performance.now();
    results.push(...(await pool.run({ kind: 'stored', databaseUrl, items: chunk, output })));
    onProgress?.(Math.min(items.length, i + STORED_CHUNK), items.length);
    // Background pace: rest a third of the time the chunk took, so that the database and the
    // request thread keep room for interactive requests while a big batch runs.
    if (i + STORED_CHUNK < items.length) await new Promise((r) => setTimeout(r, (performance.now() - started) / 3));
  }
  return results;
}

/** Stored items only, many of them, and worker threads available: the worker path pays. */
export function preferStoredPath(items: RawItem[], pool: AnalysisPool | undefined): pool is AnalysisPool {
  return !!pool && items.length > 200 && items.every((i) => i.seriesId !== undefined);
}
