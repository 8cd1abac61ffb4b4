import type { AppDeps } from '../deps.js';
import type { RouteSpec } from '../lib/http.js';
import { version } from '../lib/version.js';
import { databasePinger } from '../services/health.js';

export function healthRoutes({ db }: AppDeps): RouteSpec[] {
  const ping = databasePinger(db);
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
