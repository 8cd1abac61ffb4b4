/**
 * Worker threads for heavy decompositions (piscina), so that large batches do not hold up the
 * event loop: health checks and other requests keep being answered while a batch runs.
 */
import os from 'node:os';
import { fileURLToPath } from 'node:url';
import { Piscina } from 'piscina';
import type { BatchTask, SingleResult, SingleTask, StoredTask } from './batch-types.js';

export interface AnalysisPool {
  run(task: BatchTask | StoredTask): Promise<string[]>;
  /** One decomposition, answered as JSON bytes (or its analysis error), with the milliseconds it computed. */
  runSingle(task: SingleTask): Promise<SingleResult>;
  close(): Promise<void>;
  threads: number;
  /** Tasks queued or running (the shutdown waits for them). */
  readonly active: number;
  /** Tasks finished since the pool was made, failed or not. */
  readonly completed: number;
}

export function createAnalysisPool(threads: number): AnalysisPool {
  const n = Math.max(1, threads || Math.max(1, os.availableParallelism() - 1));
  let pool: Piscina | null = null;
  const get = () =>
    (pool ??= new Piscina({
      filename: fileURLToPath(new URL('./decompose.worker.mjs', import.meta.url)),
      minThreads: 0,
      maxThreads: n,
      idleTimeout: 30_000,
      // The workers' own memory limit: a runaway request ends its worker, not the server.
      resourceLimits: { maxOldGenerationSizeMb: 1024 },
      // Batch threads run at a lower priority (Linux nice +10, through @napi-rs/nice), so the
      // thread that answers requests keeps the CPU when both want it.
      niceIncrement: 10,
    }));
  let active = 0;
  let completed = 0;
  const track = <T>(work: Promise<T>): Promise<T> => {
    active++;
    return work.finally(() => {
      active--;
      completed++;
    });
  };
  return {
    threads: n,
    get active() {
      return active;
    },
    get completed() {
      return completed;
    },
    run: (task) => track(get().run(task) as Promise<string[]>),
    runSingle: (task) => track(get().run(task) as Promise<SingleResult>),
    close: async () => {
      if (pool) await pool.destroy();
      pool = null;
    },
  };
}
