import type { AppDeps } from '../app.js';
import type { RouteSpec } from '../lib/http.js';
import { version } from '../lib/version.js';

export function healthRoutes({ db }: AppDeps): RouteSpec[] {
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
          const query = db.raw('SELECT VERSION() AS version');
          const timeout = new Promise<never>((_, reject) => setTimeout(() => reject(new Error('health check timed out')), 2000).unref());
          const [rows] = (await Promise.race([query, timeout])) as [Array<{ version: string }>];
          res.json({ status: 'ok', version, db: { ok: true, version: rows[0]?.version ?? 'unknown' } });
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
