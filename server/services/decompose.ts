/**
 * Decompositions for the routes: one series, or a batch (values sent, or stored series by id and
 * vintage). Anything but small work with cheap methods goes to the worker threads; large batches
 * report progress.
 */
import { AnalysisError, decompose, toJsonResponse, type DecomposeJson, type DecomposeRequest } from '../analysis/index.js';
import type { Db } from '../db.js';
import { badRequest } from '../lib/errors.js';
import type { AnalysisPool } from '../workers/pool.js';
import type { BatchItem, BatchOutput, FailedItem, RawItem } from '../workers/batch-types.js';
import { runBatchChunk } from '../workers/decompose-task.js';
import { resolveItems } from './batch-items.js';
import { STORED_ITEM_VALUES } from './heavy.js';

/**
 * Methods whose cost grows linearly with a small constant (measured on the 2-core test machine:
 * 0.1–0.3 s for 1 000 000 values, Christiano–Fitzgerald 2.2 s). Work with these methods on at most
 * INLINE_MAX_VALUES values is done on the request thread (a few tens of milliseconds at most);
 * everything else — other methods, whose cost per value is far higher (ℓ1 trend filtering, boosted
 * HP's BIC, Hamilton's regressions), and any method added later — runs on the worker threads, so
 * that no request holds the thread that answers everyone else.
 */
const CHEAP_METHODS = new Set(['hp', 'hp-one-sided', 'whittaker', 'baxter-king', 'christiano-fitzgerald']);
const INLINE_MAX_VALUES = 50_000;

/** Whether work on `values` values with these methods is small enough for the request thread. */
export function inlineWork(values: number, methods: Iterable<string>): boolean {
  if (values > INLINE_MAX_VALUES) return false;
  for (const m of methods) if (!CHEAP_METHODS.has(m)) return false;
  return true;
}

/** One decomposition in its JSON form; an AnalysisError becomes a 400 in the error handler. */
export function decomposeOne(request: DecomposeRequest): DecomposeJson {
  return toJsonResponse(decompose(request));
}

/**
 * One decomposition on a worker thread, computed and written as JSON there: the request thread
 * stays free for other requests (health checks included) and only sends the bytes. `spent` hears
 * how many milliseconds the computation took on the worker, failed or not (the per-account budget).
 */
export async function decomposeOnWorker(pool: AnalysisPool, request: DecomposeRequest, spent: (ms: number) => Promise<void>): Promise<Uint8Array> {
  const answer = await pool.runSingle({ kind: 'single', request });
  await spent(answer.ms);
  if (!answer.ok) throw new AnalysisError(answer.error.code, answer.error.message, answer.error.details);
  return answer.body;
}

/** The values a batch carries (stored series counted at an estimate), for the heavy-request budget. */
export function batchValues(items: RawItem[]): number {
  return items.reduce((n, i) => n + (i.values?.length ?? (i.seriesId !== undefined ? STORED_ITEM_VALUES : 0)), 0);
}

export interface BatchContext {
  db: Db;
  pool: AnalysisPool;
  /** For worker threads that read stored series themselves. */
  databaseUrl: string;
  cacheValues: number;
}

/**
 * A batch: values sent inline, or stored series by id and vintage, answered in order as one JSON
 * string per item (an item that fails carries its error; the others still run). Large batches of
 * stored series are read and decomposed on the worker threads; other large batches are decomposed
 * there after the stored values are read here.
 */
export async function batchDecompose(ctx: BatchContext, items: RawItem[], output: BatchOutput, onProgress?: (done: number, total: number) => void): Promise<string[]> {
  validateBatchSize(items);
  if (preferStoredPath(items, ctx.pool)) return runStoredBatch(items, output, ctx.pool, ctx, onProgress);
  return runBatch(await resolveItems(ctx.db, items), output, ctx.pool, onProgress);
}

const CHUNK_VALUES = 250_000;

/**
 * Runs the items, in order, and returns one JSON string per item. Small batches of cheap methods
 * run here (inlineWork); the rest is cut into chunks for the worker pool (all threads busy at once).
 */
export async function runBatch(
  items: (BatchItem | FailedItem)[],
  output: BatchOutput,
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
  if (!pool || inlineWork(size, work.map((w) => w.item.method))) {
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

function validateBatchSize(items: RawItem[]) {
  let values = 0;
  for (const i of items) values += i.values?.length ?? 0;
  if (values > 20_000_000) throw badRequest('batch_too_large', `This batch carries ${values.toLocaleString('en-US')} values; send at most 20 000 000 per request.`);
}

const STORED_CHUNK = 250;

/**
 * A large batch of stored series: each worker reads its chunk's observations from the database
 * itself, so the main thread neither parses millions of rows nor copies them to the workers.
 */
async function runStoredBatch(items: RawItem[], output: BatchOutput, pool: AnalysisPool, db: { databaseUrl: string; cacheValues: number }, onProgress?: (done: number, total: number) => void) {
  const results: string[] = [];
  for (let i = 0; i < items.length; i += STORED_CHUNK) {
    const chunk = items.slice(i, i + STORED_CHUNK);
    const started = performance.now();
    results.push(...(await pool.run({ kind: 'stored', databaseUrl: db.databaseUrl, cacheValues: db.cacheValues, items: chunk, output })));
    onProgress?.(Math.min(items.length, i + STORED_CHUNK), items.length);
    // Background pace: rest a third of the time the chunk took, so that the database and the
    // request thread keep room for interactive requests while a big batch runs.
    if (i + STORED_CHUNK < items.length) await new Promise((r) => setTimeout(r, (performance.now() - started) / 3));
  }
  return results;
}

/** Stored items only, many of them, and worker threads available: the worker path pays. */
function preferStoredPath(items: RawItem[], pool: AnalysisPool | undefined): pool is AnalysisPool {
  return !!pool && items.length > 200 && items.every((i) => i.seriesId !== undefined);
}
