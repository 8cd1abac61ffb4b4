/**
 * The work done on a worker thread for batch decompositions: decompose a chunk of requests and
 * answer each as a ready JSON string, so the main thread only concatenates text.
 */
import { AnalysisError, cycleStatistics, decompose, toJsonResponse } from '../analysis/index.js';
import { createDb, type Db } from '../db.js';
import { finiteRecord } from '../lib/numbers.js';
import { resolveItems } from '../services/batch-items.js';
import { configureObservationCache } from '../services/catalogue/stored-values.js';
import type { BatchSummaryItem } from '../schemas/decompose.js';
import type { BatchItem, BatchTask, SingleResult, SingleTask, StoredTask } from './batch-types.js';

export function runBatchChunk(task: BatchTask): string[] {
  return task.items.map((item) => {
    const head = { ...(item.id !== undefined ? { id: item.id } : {}), ...(item.echo ?? {}) };
    try {
      const r = decompose(item);
      if (task.output === 'summary') {
        let last = r.cycle.length - 1;
        while (last >= 0 && Number.isNaN(r.cycle[last])) last--;
        const stats = cycleStatistics(r.cycle, r.frequency);
        const summary: BatchSummaryItem = {
          ...head,
          method: r.method,
          params: r.params,
          transform: r.transform,
          last: last >= 0 ? { period: r.periods?.[last] ?? null, index: last, trend: r.trend[last], cycle: r.cycle[last] } : null,
          statistics: finiteRecord(stats),
          warnings: r.warnings,
        };
        return JSON.stringify(summary);
      }
      return JSON.stringify({ ...head, ...toJsonResponse(r) });
    } catch (error) {
      const e = error instanceof AnalysisError ? { code: error.code, message: error.message } : { code: 'computation_failed', message: `The computation failed: ${(error as Error).message}.` };
      return JSON.stringify({ ...head, error: e });
    }
  });
}

let workerDb: Db | null = null;

export async function runStoredChunk(task: StoredTask): Promise<string[]> {
  if (!workerDb) {
    workerDb = createDb(task.databaseUrl, 2);
    configureObservationCache(task.cacheValues);
  }
  const resolved = await resolveItems(workerDb, task.items);
  const work = resolved.map((item, index) => ({ item, index }));
  const results: string[] = new Array(resolved.length);
  const ready = work.filter((w) => !('error' in w.item));
  runBatchChunk({ items: ready.map((w) => w.item as BatchItem), output: task.output }).forEach((r, k) => (results[ready[k].index] = r));
  for (const w of work) if ('error' in w.item) results[w.index] = JSON.stringify(w.item);
  return results;
}

/** One decomposition: computed and serialized here, so the request thread only sends the bytes. */
export function runSingle(task: SingleTask): SingleResult {
  const started = performance.now();
  try {
    const body = new TextEncoder().encode(JSON.stringify(toJsonResponse(decompose(task.request))));
    return { ok: true, body, ms: performance.now() - started };
  } catch (error) {
    if (error instanceof AnalysisError) return { ok: false, error: { code: error.code, message: error.message, ...(error.details === undefined ? {} : { details: error.details }) }, ms: performance.now() - started };
    throw error;
  }
}

export default runBatchChunk;
