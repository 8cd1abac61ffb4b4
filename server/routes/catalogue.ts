import multer from 'multer';
import type { Request, RequestHandler } from 'express';
import { z } from 'zod';
import type { AppDeps } from '../deps.js';
import { ACCESS } from '../schemas/access.js';
import { badRequest, conflict } from '../lib/errors.js';
import { parseOr400, sendFile, type RouteSpec } from '../lib/http.js';
import { answerWithProgress } from '../lib/stream.js';
import { asOfQuerySchema, createSeriesSchema, loadFieldsSchema, seriesListQuerySchema, updateSeriesSchema, type ObservationsAsOf } from '../schemas/catalogue.js';
import { listLoads, loadFile, type LoadRequest } from '../services/catalogue/loads.js';
import { revisionTriangle, revisions } from '../services/catalogue/revisions.js';
import { catalogueUnits, createSeries, deleteSeries, listSeries, resolveSeriesRef, updateSeries } from '../services/catalogue/series.js';
import { listVintages, observationsAsOf, resolveVintage, vintageObservations } from '../services/catalogue/vintages.js';
import { vintageExport } from '../services/exports.js';
import { historyExportQuerySchema, historyFieldsSchema } from '../schemas/history.js';
import { loadHistory } from '../services/catalogue/history.js';
import { historyExport } from '../services/catalogue/history-export.js';

const vintageRef = (v: string | undefined) => (v === 'latest' ? 'latest' : Number(v));

function upload(maxBytes: number): RequestHandler {
  const handler = multer({ storage: multer.memoryStorage(), limits: { fileSize: maxBytes, files: 1, fields: 10, fieldSize: 10_000, parts: 12 } }).single('file');
  return (req, res, next) => {
    if (!req.is('multipart/form-data')) return next(badRequest('multipart_required', 'Send the file as multipart/form-data in a field named "file".'));
    handler(req, res, next);
  };
}

/** The multipart fields of a load and the ?dryRun flag, checked. */
function loadInput(req: Request): Pick<LoadRequest, 'file' | 'fields' | 'dryRun' | 'actor'> {
  if (!req.file) throw badRequest('file_missing', 'Attach the file in a field named "file".');
  const fields = parseOr400(loadFieldsSchema, { note: req.body?.note || undefined, asOf: req.body?.asOf || undefined, format: req.body?.format || undefined, expectChecksum: req.body?.expectChecksum || undefined }, 'load');
  const dryRun = ['1', 'true', 'yes'].includes(String(req.query.dryRun ?? '').toLowerCase());
  return { file: { buffer: req.file.buffer, filename: req.file.originalname || 'upload', format: fields.format }, fields, dryRun, actor: { id: req.auth!.user.id, ip: req.ip } };
}

export function catalogueRoutes(deps: AppDeps): RouteSpec[] {
  const { db, config } = deps;
  /** The id of the series a path names by id or code (404 when none). */
  const seriesOf = async (ref: string | undefined) => (await resolveSeriesRef(db, ref)).id;
  const immutable = () => {
    throw conflict('vintage_immutable', 'Vintages never change. To correct a release, load the corrected data: it becomes a new vintage.');
  };
  return [
    {
      method: 'get',
      path: '/series',
      access: 'signedIn',
      summary: 'The Catalogue: the matching series with their latest vintage (one page with limit and offset) and how many match',
      tags: ['catalogue'],
      query: seriesListQuerySchema,
      handler: ({ query }) => listSeries(db, query),
    },
    {
      method: 'get',
      path: '/catalogue/units',
      access: 'signedIn',
      summary: 'The units the series are kept in, with how many series each (for filtering GET /series by unit)',
      tags: ['catalogue'],
      handler: () => catalogueUnits(db),
    },
    {
      method: 'post',
      path: '/series',
      access: ACCESS.catalogueWrite,
      summary: 'Define a series',
      tags: ['catalogue'],
      body: createSeriesSchema,
      status: 201,
      handler: ({ body, auth, req }) => createSeries(db, auth!.user.id, body, req.ip),
    },
    {
      method: 'get',
      path: '/series/:id',
      access: 'signedIn',
      summary: 'A series with its metadata and latest vintage',
      tags: ['catalogue'],
      handler: async ({ params }) => {
        const series = await resolveSeriesRef(db, params.id);
        const vintages = await listVintages(db, series.id);
        return { ...series, vintageCount: vintages.length, latestVintage: vintages[0] ?? null };
      },
    },
    {
      method: 'patch',
      path: '/series/:id',
      access: ACCESS.catalogueWrite,
      summary: 'Correct a series’ metadata',
      tags: ['catalogue'],
      body: updateSeriesSchema,
      handler: async ({ params, body, auth, req }) => updateSeries(db, auth!.user.id, await seriesOf(params.id), body, req.ip),
    },
    {
      method: 'delete',
      path: '/series/:id',
      access: ACCESS.catalogueWrite,
      summary: 'Delete a series that has no vintage yet',
      tags: ['catalogue'],
      handler: async ({ params, auth, req }) => deleteSeries(db, auth!.user.id, await seriesOf(params.id), req.ip),
    },
    {
      method: 'post',
      path: '/series/:id/vintages',
      access: ACCESS.catalogueWrite,
      summary: 'Load a release of a series as a new vintage (?dryRun=1 previews and stores nothing)',
      tags: ['catalogue'],
      before: [upload(config.maxUploadBytes)],
      raw: true,
      handler: async ({ params, req, res }) => {
        const seriesId = await seriesOf(params.id);
        const input = loadInput(req);
        const answer = await loadFile(db, { ...input, seriesId, alerts: deps });
        res.status(input.dryRun ? 200 : 201).json(answer);
      },
    },
    {
      method: 'post',
      path: '/series/:series/history',
      access: ACCESS.catalogueWrite,
      summary: 'Load a whole release history (CSV or XLSX, wide or long) as vintages in release order (?dryRun=1 previews and stores nothing)',
      tags: ['catalogue'],
      before: [upload(config.maxUploadBytes)],
      raw: true,
      handler: async ({ params, req, res }) => {
        const seriesId = await seriesOf(params.series);
        if (!req.file) throw badRequest('file_missing', 'Attach the file in a field named "file".');
        const b = req.body ?? {};
        const fields = parseOr400(historyFieldsSchema, { sheet: b.sheet || undefined, headerRow: b.headerRow || undefined, releaseDateRow: b.releaseDateRow || undefined, layout: b.layout || undefined, note: b.note || undefined }, 'history load');
        const dryRun = ['1', 'true', 'yes'].includes(String(req.query.dryRun ?? '').toLowerCase());
        const answer = await loadHistory(db, { seriesId, file: { buffer: req.file.buffer, filename: req.file.originalname || 'upload' }, fields, dryRun, actor: { id: req.auth!.user.id, ip: req.ip }, alerts: deps });
        res.status(dryRun ? 200 : 201).json(answer);
      },
    },
    {
      method: 'get',
      path: '/series/:series/history',
      access: 'signedIn',
      summary: 'The release table: periods down, one column per vintage, release dates in the row above the header (CSV or XLSX); it loads back to identical vintages',
      tags: ['catalogue'],
      query: historyExportQuerySchema,
      raw: true,
      handler: async ({ params, query, res }) => sendFile(res, await historyExport(db, await seriesOf(params.series), query.format)),
    },
    {
      method: 'get',
      path: '/series/:id/vintages',
      access: 'signedIn',
      summary: 'Every vintage of a series, newest first, with who loaded it and when',
      tags: ['catalogue'],
      handler: async ({ params }) => ({ items: await listVintages(db, await seriesOf(params.id)) }),
    },
    {
      method: 'get',
      path: '/series/:id/vintages/:number',
      access: 'signedIn',
      summary: 'One vintage (its number, or "latest")',
      tags: ['catalogue'],
      handler: async ({ params }) => {
        const { id: _id, ...v } = await resolveVintage(db, await seriesOf(params.id), vintageRef(params.number));
        return v;
      },
    },
    { method: 'put', path: '/series/:id/vintages/:number', access: 'signedIn', summary: 'Refused: vintages are immutable (409)', tags: ['catalogue'], handler: immutable },
    { method: 'patch', path: '/series/:id/vintages/:number', access: 'signedIn', summary: 'Refused: vintages are immutable (409)', tags: ['catalogue'], handler: immutable },
    { method: 'delete', path: '/series/:id/vintages/:number', access: 'signedIn', summary: 'Refused: vintages are immutable (409)', tags: ['catalogue'], handler: immutable },
    {
      method: 'get',
      path: '/series/:id/vintages/:number/observations',
      access: 'signedIn',
      summary: 'The observations of a vintage (its number, or "latest")',
      tags: ['catalogue'],
      handler: ({ params }) => vintageObservations(db, params.id, vintageRef(params.number)),
    },
    {
      method: 'get',
      path: '/series/:series/observations',
      access: 'signedIn',
      summary: 'The observations of the vintage in force on a date (?asOf=YYYY-MM-DD: the latest released on or before it); 404 before the first release',
      tags: ['catalogue'],
      query: asOfQuerySchema,
      handler: ({ params, query }): Promise<ObservationsAsOf> => observationsAsOf(db, params.series, query.asOf),
    },
    {
      method: 'get',
      path: '/series/:id/vintages/:number/export',
      access: 'signedIn',
      summary: 'Download a vintage as CSV, XLSX or SDMX-CSV',
      tags: ['catalogue'],
      query: z.object({ format: z.enum(['csv', 'xlsx', 'sdmx-csv']).default('csv') }),
      raw: true,
      handler: async ({ params, query, res }) => sendFile(res, await vintageExport(db, await seriesOf(params.id), vintageRef(params.number), query.format)),
    },
    {
      method: 'get',
      path: '/series/:id/revisions',
      access: 'signedIn',
      summary: 'Per-period revisions between two vintages (?from=a&to=b; default: the two latest)',
      tags: ['catalogue'],
      query: z.object({ from: z.string().max(10).optional(), to: z.string().max(10).optional() }),
      handler: async ({ params, query }) => {
        const id = await seriesOf(params.id);
        let from = query.from ? vintageRef(query.from) : undefined;
        const to = query.to ? vintageRef(query.to) : 'latest';
        if (from === undefined) {
          const latest = await resolveVintage(db, id, to);
          from = Math.max(1, latest.number - 1);
        }
        return revisions(db, id, from as number | 'latest', to as number | 'latest');
      },
    },
    {
      method: 'get',
      path: '/series/:id/revisions/triangle',
      access: 'signedIn',
      summary: 'The revision triangle: periods down, vintages across',
      tags: ['catalogue'],
      handler: async ({ params }) => revisionTriangle(db, await seriesOf(params.id)),
    },
    {
      method: 'post',
      path: '/loads',
      access: ACCESS.catalogueWrite,
      summary: 'Load an SDMX-CSV (or CSV) file carrying many series; every changed series gets a vintage in one transaction',
      tags: ['catalogue'],
      before: [upload(config.maxUploadBytes)],
      raw: true,
      handler: async ({ req, res }) => {
        const input = loadInput(req);
        await answerWithProgress(req, res, input.dryRun ? 200 : 201, (onProgress) => loadFile(db, { ...input, onProgress, alerts: deps }));
      },
    },
    {
      method: 'get',
      path: '/loads',
      access: 'signedIn',
      summary: 'Recent loads, newest first',
      tags: ['catalogue'],
      handler: async () => ({ items: await listLoads(db) }),
    },
  ];
}
