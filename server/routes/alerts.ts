import type { AppDeps } from '../deps.js';
import type { RouteSpec } from '../lib/http.js';
import { alertSettingsSchema } from '../schemas/alerts.js';
import { alertSettings, updateAlertSettings } from '../services/alerts/settings.js';

export function alertRoutes(deps: AppDeps): RouteSpec[] {
  const { db } = deps;
  return [
    {
      method: 'get',
      path: '/profile/alerts',
      access: 'signedIn',
      summary: 'One’s own alert settings: whether new vintages that move one’s gaps send a mail',
      tags: ['people'],
      handler: ({ auth }) => alertSettings(db, auth!.user.id),
    },
    {
      method: 'put',
      path: '/profile/alerts',
      access: 'signedIn',
      summary: 'Turn one’s release alerts on or off',
      tags: ['people'],
      body: alertSettingsSchema,
      handler: ({ auth, body, req }) => updateAlertSettings(db, auth!.user.id, body, req.ip),
    },
  ];
}
