/**
 * The items and tasks of batch decompositions, shared by the service that cuts a batch into
 * chunks (services/decompose.ts) and the worker threads that run them (workers/decompose-task.ts).
 * Types only: importing this module loads nothing.
 */
import type { DecomposeRequest } from '../analysis/index.js';

/** An item as the batch route takes it: values sent inline, or a stored series by id and vintage. */
export type RawItem = { id?: string; seriesId?: number; vintage?: number | 'latest'; frequency?: string; start?: string; values?: unknown[]; transform?: string; method: string; params?: Record<string, unknown> };

/** An item ready to decompose. */
export interface BatchItem extends DecomposeRequest {
  id?: string;
  /** Extra fields echoed into the answer (stored series: seriesId, vintage). */
  echo?: Record<string, unknown>;
}

/** An item that failed before decomposing (its series or vintage was not found). */
export interface FailedItem {
  id?: string;
  error: { code: string; message: string };
}

export type BatchOutput = 'full' | 'summary';

/** A chunk of ready items for a worker. */
export interface BatchTask {
  items: BatchItem[];
  output: BatchOutput;
}

/** A chunk of stored-series items: the worker reads the observations itself, off the main thread. */
export interface StoredTask {
  kind: 'stored';
  databaseUrl: string;
  /** The worker's own bound for its observation cache (config.observationCacheValues). */
  cacheValues: number;
  items: RawItem[];
  output: BatchOutput;
}

/** One large decomposition (POST /decompose), computed and written as JSON off the request thread. */
export interface SingleTask {
  kind: 'single';
  request: DecomposeRequest;
}

/** Its answer: the JSON body as UTF-8 bytes (moved to the main thread, not copied), or the analysis error; and the milliseconds computed. */
export type SingleResult = { ok: true; body: Uint8Array; ms: number } | { ok: false; error: { code: string; message: string; details?: unknown }; ms: number };
