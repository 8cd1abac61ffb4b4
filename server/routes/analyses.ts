/** Analyses across methods: the range of estimates on a series, and the real-time reliability table. */
import { methodIdEnum } from '../analysis/methods/index.js';
import type { AppDeps } from '../deps.js';
import type { RouteSpec } from '../lib/http.js';
import { answerWithProgress } from '../lib/stream.js';
import { ACCESS } from '../schemas/access.js';
import { analysesSchemas } from '../schemas/analyses.js';
import { resolveSeriesRef } from '../services/catalogue/series.js';
import { reliabilityTable } from '../services/reliability.js';
import { rangeOfEstimates } from '../services/studies/range.js';

export function analysisRoutes(deps: AppDeps): RouteSpec[] {
  const { db } = deps;
  const { rangeSchema, reliabilitySchema } = analysesSchemas(methodIdEnum());
  return [
    {
      method: 'post',
      path: '/studies/range',
      access: ACCESS.analyses,
      summary: 'The range of gap estimates across methods: each method’s cycle on aligned periods, and per period the median, minimum and maximum',
      tags: ['studies'],
      body: rangeSchema,
      handler: ({ body }) => rangeOfEstimates(db, deps.pool, body),
    },
    {
      method: 'post',
      path: '/series/:series/reliability',
      access: ACCESS.analyses,
      summary: 'Real-time reliability per method over the series’ vintages (Orphanides–van Norden statistics) and the spread of revisions by distance from the end; NDJSON progress with Accept: application/x-ndjson',
      tags: ['catalogue'],
      body: reliabilitySchema,
      raw: true,
      handler: async ({ params, body, req, res }) => {
        const series = await resolveSeriesRef(db, params.series);
        await answerWithProgress(req, res, 200, (onProgress) => reliabilityTable(db, deps.pool, series.id, body, onProgress));
      },
    },
  ];
}
