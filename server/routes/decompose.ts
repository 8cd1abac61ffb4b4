import { z } from 'zod';
import { describeMethods, findMethod, gainCurve, methodIds, resolveParams, type DecomposeRequest } from '../analysis/index.js';
import { methodIdEnum } from '../analysis/methods/index.js';
import type { AppDeps } from '../deps.js';
import { badRequest } from '../lib/errors.js';
import type { RouteSpec } from '../lib/http.js';
import { streamNdjson, wantsStream } from '../lib/stream.js';
import { decomposeSchemas } from '../schemas/decompose.js';
import { frequencySchema } from '../schemas/frequency.js';
import { cutoffPeriod, lambdaForCutoff } from '../schemas/methods.js';
import { batchDecompose, batchValues, decomposeOnWorker, decomposeOne, inlineWork } from '../services/decompose.js';
import { admitHeavy, chargeCompute, heavyUnits } from '../services/heavy.js';
import type { RawItem } from '../workers/batch-types.js';

export function decomposeRoutes(deps: AppDeps): RouteSpec[] {
  const { decomposeRequestSchema, batchRequestSchema } = decomposeSchemas(methodIdEnum());
  const batch = { db: deps.db, pool: deps.pool, databaseUrl: deps.config.databaseUrl, cacheValues: deps.config.observationCacheValues };
  return [
    {
      method: 'post',
      path: '/decompose',
      access: 'signedIn',
      summary: 'Decompose one series into trend and cycle (stateless)',
      tags: ['analysis'],
      body: decomposeRequestSchema,
      raw: true,
      handler: async ({ body, auth, res }) => {
        const request = body as never as DecomposeRequest;
        const units = heavyUnits(request.values.length);
        await admitHeavy(deps.db, deps.config.heavyUnitsPerMinute, auth!.user.id, units);
        if (inlineWork(request.values.length, [request.method])) return void res.json(decomposeOne(request));
        // Large or costly: computed and serialized off the request thread, its time charged to the account.
        let computeMs = 0;
        const bytes = await decomposeOnWorker(deps.pool, request, (ms) => chargeCompute(deps.db, auth!.user.id, (computeMs = ms), units));
        // The computing time the budget was charged for (the standard Server-Timing header).
        res.setHeader('Server-Timing', `compute;dur=${computeMs}`);
        res.status(200).type('application/json').end(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength));
      },
    },
    {
      method: 'post',
      path: '/decompose/batch',
      access: 'signedIn',
      summary: 'Decompose many series (values, or stored series by id and vintage); large batches run on worker threads',
      tags: ['analysis'],
      body: batchRequestSchema,
      raw: true,
      handler: async ({ body, auth, req, res }) => {
        await admitHeavy(deps.db, deps.config.heavyUnitsPerMinute, auth!.user.id, heavyUnits(batchValues(body.items as never as RawItem[])));
        const run = (progress?: (done: number, total: number) => void) => batchDecompose(batch, body.items as never as RawItem[], body.output, progress);
        if (wantsStream(req)) {
          await streamNdjson(res, async (send) => {
            const strings = await run((done, total) => send({ type: 'progress', phase: 'decomposing', done, total }));
            send({ type: 'result', result: { items: '__ITEMS__' } }, strings);
          });
          return;
        }
        const strings = await run();
        res.status(200).type('application/json').send(`{"items":[${strings.join(',')}]}`);
      },
    },
    {
      method: 'get',
      path: '/methods',
      access: 'signedIn',
      summary: 'The methods: their parameters (kind, bounds, labels), conventional values by frequency, and the λ presets',
      tags: ['analysis'],
      handler: () => describeMethods(),
    },
    {
      method: 'get',
      path: '/gain',
      access: 'signedIn',
      summary: 'Gain of a method’s cycle filter over a grid of periods, with its cut-off',
      tags: ['analysis'],
      query: z.object({
        method: z.enum(methodIds() as [string, ...string[]]),
        frequency: frequencySchema.default('Q'),
        params: z.string().max(2000).optional(),
        n: z.coerce.number().int().min(3).max(100000).optional(),
      }),
      handler: ({ query }) => {
        let params: Record<string, unknown> = {};
        try {
          params = query.params ? JSON.parse(query.params) : {};
        } catch {
          throw badRequest('invalid_params', 'params must be a JSON object, for example {"lambda":1600}.');
        }
        // A method without a gain answers its note whatever the parameters.
        const checked = findMethod(query.method)!.gain ? resolveParams(query.method, query.frequency, params) : params;
        return gainCurve({ method: query.method, params: checked, n: query.n });
      },
    },
    {
      method: 'get',
      path: '/lambda',
      access: 'signedIn',
      summary: 'Convert between λ and the cut-off period (where the trend gain is one half)',
      tags: ['analysis'],
      query: z.object({ lambda: z.coerce.number().positive().optional(), cutoff: z.coerce.number().gt(2).optional(), order: z.coerce.number().int().min(1).max(3).default(2) }),
      handler: ({ query }) => {
        if (query.lambda !== undefined) return { lambda: query.lambda, cutoffPeriod: cutoffPeriod(query.lambda, query.order), order: query.order };
        if (query.cutoff !== undefined) return { lambda: lambdaForCutoff(query.cutoff, query.order), cutoffPeriod: query.cutoff, order: query.order };
        throw badRequest('missing_parameter', 'Give lambda or cutoff (in periods).');
      },
    },
  ];
}
