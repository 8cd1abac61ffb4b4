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
      summary: 'Liveness and database reachability (the software and database versions for signed-in administrators only)',
      tags: ['system'],
      raw: true,
      handler: async ({ res, auth }) => {
        res.setHeader('Cache-Control', 'no-store');
        // Versions tell an attacker which known flaws to try: only administrators see them. For
        // everyone else the keys are absent (not a placeholder a script could mistake for a version).
        const admin = !!auth?.user.roles.includes('admin');
        try {
          const dbVersion = await ping();
          res.json({ status: 'ok', ...(admin ? { version } : {}), db: { ok: true, ...(admin ? { version: dbVersion } : {}) } });
        } catch {
          res.status(503).json({
            status: 'unavailable',
            ...(admin ? { version } : {}),
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
