/** Feeds: scheduled SDMX pulls (registered, changed, paused, removed), "Run now" (with progress as NDJSON) and their run records (stewards). */
import { z } from 'zod';
import type { AppDeps } from '../deps.js';
import { ACCESS } from '../schemas/access.js';
import { idParam, type RouteSpec } from '../lib/http.js';
import { answerWithProgress } from '../lib/stream.js';
import { createFeedSchema, updateFeedSchema } from '../schemas/feeds.js';
import { createFeed, deleteFeed, listFeeds, listRuns, updateFeed } from '../services/feeds/registry.js';
import { runFeed } from '../services/feeds/run.js';

export function feedRoutes(deps: AppDeps): RouteSpec[] {
  const { db } = deps;
  return [
    {
      method: 'get',
      path: '/feeds',
      access: ACCESS.catalogueWrite,
      summary: 'Feeds: scheduled pulls from SDMX REST sources, with their last run',
      tags: ['feeds'],
      handler: async () => ({ items: await listFeeds(db) }),
    },
    {
      method: 'post',
      path: '/feeds',
      access: ACCESS.catalogueWrite,
      summary: 'Register a feed: an SDMX REST data URL, the series it fills (key → series code), a cron schedule (UTC) and optional headers',
      tags: ['feeds'],
      body: createFeedSchema,
      status: 201,
      handler: ({ body, auth, req }) => createFeed(db, auth!.user.id, body, req.ip),
    },
    {
      method: 'patch',
      path: '/feeds/:id',
      access: ACCESS.catalogueWrite,
      summary: 'Change a feed: name, address, series, schedule, headers (the whole list, with values), steward; enabled: false pauses its schedule',
      tags: ['feeds'],
      body: updateFeedSchema,
      handler: ({ params, body, auth, req }) => updateFeed(db, auth!.user.id, idParam(params.id, 'Feed'), body, req.ip),
    },
    {
      method: 'delete',
      path: '/feeds/:id',
      access: ACCESS.catalogueWrite,
      summary: 'Remove a feed and its run records (the vintages it stored stay); 409 while it runs',
      tags: ['feeds'],
      status: 204,
      handler: ({ params, auth, req }) => deleteFeed(db, auth!.user.id, idParam(params.id, 'Feed'), req.ip),
    },
    {
      method: 'post',
      path: '/feeds/:id/run',
      access: ACCESS.catalogueWrite,
      summary: 'Run a feed now: fetch, check as a load, store a vintage per changed series; the run record (NDJSON progress on request)',
      tags: ['feeds'],
      raw: true,
      handler: async ({ params, auth, req, res }) => {
        const id = idParam(params.id, 'Feed');
        await answerWithProgress(req, res, 200, async (onProgress) => (await runFeed(deps, id, { trigger: 'manual', actorId: auth!.user.id, onProgress }))!.run);
      },
    },
    {
      method: 'get',
      path: '/feeds/:id/runs',
      access: ACCESS.catalogueWrite,
      summary: "A feed's run records, newest first: when, how long, outcome, vintages stored, problems by series",
      tags: ['feeds'],
      query: z.object({ limit: z.coerce.number().int().min(1).max(500).default(100) }),
      handler: async ({ params, query }) => ({ items: await listRuns(db, idParam(params.id, 'Feed'), query.limit) }),
    },
  ];
}
