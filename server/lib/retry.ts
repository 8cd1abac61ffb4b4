/**
 * Whole-transaction retries for the errors a database cluster answers when two writers collide.
 *
 * On a MariaDB Galera cluster a row lock taken on one node does not stop a writer on another:
 * both transactions run, and at commit the cluster certifies them in one global order. The loser
 * is rolled back and its client gets `ER_LOCK_DEADLOCK` (1213), exactly like an InnoDB deadlock on
 * a single server. A node that has lost the primary component refuses statements with
 * `ER_UNKNOWN_COM_ERROR` (1047, "WSREP has not yet prepared node for application use").
 * Both leave nothing behind, so the whole transaction can run again: its reads then see the
 * winner's rows (the cluster's nodes run with `wsrep_sync_wait=1`, see README) and, for example,
 * a load takes vintage number n+1 after the other load's n.
 *
 * Only whole transactions are retried, never single statements inside one, and only a bounded
 * number of times with random jitter, so two colliding writers do not collide again in step.
 * When the attempts run out the answer is a 503 in the API's error shape with `Retry-After`,
 * never a 500. Lost connections are not retried here: whether a COMMIT that lost its connection
 * took effect is unknown, so the client is told 503 (see `isDbUnavailable`) and decides.
 *
 * Example:
 *   const id = await transaction(db, async (trx) => {
 *     const [id] = await trx('loads').insert({ … });
 *     await trx('vintages').insert({ … });
 *     return id;
 *   });
 */
import type { Knex } from 'knex';
import { HttpError } from './errors.js';

/** MariaDB error numbers that mean "rolled back, nothing stored: run the transaction again". */
const RETRYABLE_ERRNO = new Set([
  1213, // ER_LOCK_DEADLOCK: an InnoDB deadlock, or a Galera certification conflict / brute-force abort
  1047, // ER_UNKNOWN_COM_ERROR: WSREP has not yet prepared the node for application use
]);

export function isRetryableConflict(error: unknown): boolean {
  const e = error as { errno?: number; code?: string } | null;
  if (!e || typeof e !== 'object') return false;
  return (e.errno !== undefined && RETRYABLE_ERRNO.has(e.errno)) || e.code === 'ER_LOCK_DEADLOCK';
}

/** A deadlock or a lost certification (1213), as opposed to a node that is not ready (1047). */
export function isDeadlock(error: unknown): boolean {
  const e = error as { errno?: number; code?: string } | null;
  return !!e && typeof e === 'object' && (e.errno === 1213 || e.code === 'ER_LOCK_DEADLOCK');
}

export interface RetryOptions {
  /** Attempts in all, the first included (default 5). */
  attempts?: number;
  /** Upper bound of the first pause in ms; each later pause doubles it (default 25). */
  baseDelayMs?: number;
  /** Called before each new attempt, e.g. to log it. */
  onRetry?: (attempt: number, error: unknown) => void;
}

/** The answer when every attempt collided: 503, nothing stored, try again shortly. */
export function conflictExhausted(attempts: number): HttpError {
  return new HttpError(
    503,
    'write_conflict',
    `This change collided with other changes to the same data (${attempts} attempt${attempts === 1 ? '' : 's'}) and was not stored. Try again in a moment.`,
    undefined,
    { 'Retry-After': '1' },
  );
}

/**
 * Runs `work` until it succeeds, fails with an error that is not a retryable conflict, or has
 * been tried `attempts` times. `work` gets the attempt number (1, 2, …) and must be safe to run
 * again: all its effects happen inside the transaction it opens.
 */
export async function withRetry<T>(work: (attempt: number) => Promise<T>, options: RetryOptions = {}): Promise<T> {
  const attempts = Math.max(1, options.attempts ?? 5);
  const base = options.baseDelayMs ?? 25;
  for (let attempt = 1; ; attempt++) {
    try {
      return await work(attempt);
    } catch (error) {
      if (!isRetryableConflict(error)) throw error;
      // A node that stays unready is an outage (503 database_unavailable), not a collision.
      if (attempt >= attempts) throw isDeadlock(error) ? conflictExhausted(attempts) : error;
      options.onRetry?.(attempt, error);
      // Full jitter: a random pause up to base·2^(attempt−1).
      const ceiling = base * 2 ** (attempt - 1);
      await new Promise((resolve) => setTimeout(resolve, Math.random() * ceiling));
    }
  }
}

/** `db.transaction(fn)`, run again as a whole on a certification conflict or deadlock. */
export function transaction<T>(db: Knex, fn: (trx: Knex.Transaction) => Promise<T>, options?: RetryOptions): Promise<T> {
  return withRetry(() => db.transaction(fn), options);
}
