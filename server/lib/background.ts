/**
 * Work done after the answer is sent (a password-reset mail): the request path answers at once,
 * whatever the work finds, and a failure is logged, never shown to the person asking. Pending
 * work lives only in this process; what it does must be safe to lose when the process ends.
 */
import type { Logger } from './logger.js';

export interface Background {
  /** Starts `work` now, without waiting for it. */
  run(name: string, work: () => Promise<unknown>): void;
  /** Resolves when no work is pending (tests, and a clean shutdown). */
  idle(): Promise<void>;
  /** Pieces of work not finished yet (the shutdown's drain waits for them). */
  readonly pending: number;
}

export function createBackground(logger: Logger): Background {
  const pending = new Set<Promise<unknown>>();
  return {
    run(name, work) {
      const p: Promise<unknown> = Promise.resolve()
        .then(work)
        .catch((err) => logger.error({ err, work: name }, 'background work failed'))
        .finally(() => pending.delete(p));
      pending.add(p);
    },
    async idle() {
      while (pending.size) await Promise.allSettled([...pending]);
    },
    get pending() {
      return pending.size;
    },
  };
}
