/**
 * Database reachability for the health route. Concurrent checks share one ping, and a result is
 * reused for half a second: a load balancer probing hard does not become load on the database,
 * and the answer stays fast when the server is busy.
 */
import type { Db } from '../db.js';

const REUSE_MS = 500;
const TIMEOUT_MS = 2000;

/** Returns a function that answers the database's version, or throws when it is unreachable. */
export function databasePinger(db: Db): () => Promise<string> {
  let inflight: Promise<string> | null = null;
  let last: { at: number; version: string } | null = null;
  return async (): Promise<string> => {
    if (last && Date.now() - last.at < REUSE_MS) return last.version;
    inflight ??= (async () => {
      try {
        const query = db.raw('SELECT VERSION() AS version');
        const timeout = new Promise<never>((_, reject) => setTimeout(() => reject(new Error('health check timed out')), TIMEOUT_MS).unref());
        const [rows] = (await Promise.race([query, timeout])) as [Array<{ version: string }>];
        last = { at: Date.now(), version: rows[0]?.version ?? 'unknown' };
        return last.version;
      } catch (error) {
        last = null;
        throw error;
      } finally {
        inflight = null;
      }
    })();
    return inflight;
  };
}
