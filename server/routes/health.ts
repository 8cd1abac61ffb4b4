import type { AppDeps } from '../app.js';
import type { RouteSpec } from '../lib/http.js';
import { version } from '../lib/version.js';

/**
 * Concurrent health checks share one database ping, and a result is reused for half a second:
 * a load balancer probing hard does not become load on the database, and the answer stays fast
 * when the server is busy.
 */
function pinger(db: AppDeps['db']) {
  let inflight: Promise<string> | null = null;
  let last: { at: number; version: string } | null = null;
  return async (): Promise<string> => {
    if (last && Date.now() - last.at < 500) return last.version;
    inflight ??= (async () => {
      try {
        const query = db.raw('SELECT VERSION() AS version');
        const timeout = new Promise<never>((_, reject) => setTimeout(() => reject(new Error('health check timed out')), 2000).unref());
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

export function healthRoutes({ db }: AppDeps): RouteSpec[] {
  const ping = pinger(db);
  return [
    {
      method: 'get',
      path: '/health',
      access: 'public',
      summary: 'Liveness and database reachability',
      tags: ['system'],
      raw: true,
      handler: async ({ res }) => {
        res.setHeader('Cache-Control', 'no-store');
        try {
          res.json({ status: 'ok', version, db: { ok: true, version: await ping() } });
        } catch {
          res.status(503).json({
            status: 'unavailable',
            version,
            db: { ok: false },
            error: {
              code: 'database_unavailable',
              message: 'The database is not reachable right now; the server keeps running and will reconnect by itself.',
            },
          });
        }
      },
    },
  ];
}
