/**
 * SDMX REST out (SDMX 2.1): our series as the dataflow TIDEGAUGE:SERIES(1.0). Structure queries
 * answer SDMX-ML 2.1 structure messages; data queries answer SDMX-ML 2.1 structure-specific data
 * or SDMX-CSV, by `format` or the Accept header. Any person signed in, or a token.
 */
import type { Response } from 'express';
import { z } from 'zod';
import type { AppDeps } from '../deps.js';
import type { RouteSpec } from '../lib/http.js';
import { notFound } from '../lib/errors.js';
import { chooseDataFormat, SDMX_MEDIA, writeSdmxCsv, writeStructureSpecific } from '../importers/sdmx-out.js';
import { dataMessage } from '../services/sdmx/data.js';
import { dataStructureMessage, dataflowMessage, DSD, FLOW, matchesRef } from '../services/sdmx/structure.js';

const send = (res: Response, type: string, body: string) => void res.status(200).setHeader('Content-Type', type).send(body);

const dataQuery = z.object({
  startPeriod: z.string().max(20).optional(),
  endPeriod: z.string().max(20).optional(),
  updatedAfter: z.string().max(40).optional(),
  asOf: z.string().max(30).optional(),
  format: z.enum(['csv', 'sdmx-csv', 'xml', 'sdmx-ml', 'structurespecificdata']).optional(),
  dimensionAtObservation: z.literal('TIME_PERIOD').optional(),
  detail: z.literal('full').optional(),
});

export function sdmxRoutes(deps: AppDeps): RouteSpec[] {
  const { db } = deps;
  const structure = (path: string, which: 'dataflow' | 'datastructure'): RouteSpec => ({
    method: 'get',
    path,
    access: 'signedIn',
    summary: which === 'dataflow' ? 'SDMX: the dataflow (SDMX-ML 2.1 structure message)' : 'SDMX: the data structure with its codelists and concepts (SDMX-ML 2.1 structure message)',
    tags: ['sdmx'],
    raw: true,
    handler: async ({ params, res }) => {
      const ref = which === 'dataflow' ? FLOW : DSD;
      if (!matchesRef(ref, params.agency, params.id, params.version)) throw notFound(`The ${which} ${[params.agency, params.id, params.version].join(',')} (this service has ${ref.agency},${ref.id},${ref.version})`);
      const body = which === 'dataflow' ? dataflowMessage() : dataStructureMessage(await db('series').orderBy('code').select('code', 'title'));
      send(res, SDMX_MEDIA.structure, body);
    },
  });
  const data = (path: string): RouteSpec<unknown, z.infer<typeof dataQuery>> => ({
    method: 'get',
    path,
    access: 'signedIn',
    summary: 'SDMX: data for a flow and key (FREQ.SERIES_CODE; "+" between alternatives, empty for any, "all"), with startPeriod, endPeriod, updatedAfter and asOf (YYYY-MM-DD: the vintages in force that day); SDMX-ML 2.1 structure-specific data or SDMX-CSV by Accept or format',
    tags: ['sdmx'],
    query: dataQuery,
    raw: true,
    handler: async ({ params, query, req, res }) => {
      const message = await dataMessage(db, { flow: params.flow, key: params.key, ...query });
      const format = chooseDataFormat(query.format, req.headers.accept);
      if (format === 'csv') send(res, SDMX_MEDIA.csv, writeSdmxCsv(message));
      else send(res, SDMX_MEDIA.structureSpecific, writeStructureSpecific(message));
    },
  });
  return [
    structure('/sdmx/dataflow', 'dataflow'),
    structure('/sdmx/dataflow/:agency/:id/:version', 'dataflow'),
    structure('/sdmx/datastructure', 'datastructure'),
    structure('/sdmx/datastructure/:agency/:id/:version', 'datastructure'),
    data('/sdmx/data/:flow'),
    data('/sdmx/data/:flow/:key'),
  ];
}
