import multer from 'multer';
import type { RequestHandler } from 'express';
import { z } from 'zod';
import type { AppDeps } from '../deps.js';
import { badRequest, conflict, unprocessable } from '../lib/errors.js';
import { idParam, parseOr400, type RouteSpec } from '../lib/http.js';
import { streamNdjson, wantsStream } from '../lib/stream.js';
import { createSeriesSchema, loadFieldsSchema, updateSeriesSchema } from '../schemas/catalogue.js';
import * as catalogue from '../services/catalogue.js';
import { exportVintage } from '../services/exports.js';

const STEWARD = ['steward', 'admin'] as const;

const vintageRef = (v: string | undefined) => (v === 'latest' ? 'latest' : Number(v));

function upload(maxBytes: number): RequestHandler {
  const handler = multer({ storage: multer.memoryStorage(), limits: { fileSize: maxBytes, files: 1, fields: 10, fieldSize: 10_000, parts: 12 } }).single('file');
  return (req, res, next) => {
    if (!req.is('multipart/form-data')) return next(badRequest('multipart_required', 'Send the file as multipart/form-data in a field named "file".'));
    handler(req, res, next);
  };
}

function loadInput(req: Parameters<RequestHandler>[0]) {
  if (!req.file) throw badRequest('file_missing', 'Attach the file in a field named "file".');
  const fields = parseOr400(loadFieldsSchema, { note: req.body?.note || undefined, asOf: req.body?.asOf || undefined, format: req.body?.format || undefined, expectChecksum: req.body?.expectChecksum || undefined }, 'load');
  const dryRun = ['1', 'true', 'yes'].includes(String(req.query.dryRun ?? '').toLowerCase());
  return { file: { buffer: req.file.buffer, filename: req.file.originalname || 'upload', format: fields.format }, fields, dryRun };
}

export function catalogueRoutes(deps: AppDeps): RouteSpec[] {
  const { db, config } = deps;
  const immutable = () => {
    throw conflict('vintage_immutable', 'Vintages never change. To correct a release, load the corrected data: it becomes a new vintage.');
  };
  return [
    {
      method: 'get',
      path: '/series',
      access: 'signedIn',
      summary: 'The Catalogue: every series with its latest vintage',
      tags: ['catalogue'],
      query: z.object({ q: z.string().max(100).optional(), frequency: z.enum(['A', 'Q', 'M']).optional(), unit: z.string().max(120).optional() }),
      handler: async ({ query }) => ({ items: await catalogue.listSeries(db, query) }),
    },
    {
      method: 'post',
      path: '/series',
      access: STEWARD,
      summary: 'Define a series',
      tags: ['catalogue'],
      body: createSeriesSchema,
      status: 201,
      handler: ({ body, auth, req }) => catalogue.createSeries(db, auth!.user.id, body, req.ip),
    },
    {
      method: 'get',
      path: '/series/:id',
      access: 'signedIn',
      summary: 'A series with its metadata and latest vintage',
      tags: ['catalogue'],
      handler: async ({ params }) => {
        const id = idParam(params.id, 'The series');
        const series = await catalogue.getSeries(db, id);
        const vintages = await catalogue.listVintages(db, id);
        return { ...series, vintageCount: vintages.length, latestVintage: vintages[0] ?? null };
      },
    },
    {
      method: 'patch',
      path: '/series/:id',
      access: STEWARD,
      summary: 'Correct a series’ metadata',
      tags: ['catalogue'],
      body: updateSeriesSchema,
      handler: ({ params, body, auth, req }) => catalogue.updateSeries(db, auth!.user.id, idParam(params.id, 'The series'), body, req.ip),
    },
    {
      method: 'delete',
      path: '/series/:id',
      access: STEWARD,
      summary: 'Delete a series that has no vintage yet',
      tags: ['catalogue'],
      handler: ({ params, auth, req }) => catalogue.deleteSeries(db, auth!.user.id, idParam(params.id, 'The series'), req.ip),
    },
    {
      method: 'post',
      path: '/series/:id/vintages',
      access: STEWARD,
      summary: 'Load a release of a series as a new vintage (?dryRun=1 previews and stores nothing)',
      tags: ['catalogue'],
      before: [upload(config.maxUploadBytes)],
      raw: true,
      handler: async ({ params, req, res, auth }) => {
        const seriesId = idParam(params.id, 'The series');
        const { file, fields, dryRun } = loadInput(req);
        const preview = await catalogue.previewLoad(db, file, seriesId);
        if (dryRun) {
          res.status(200).json({ preview: catalogue.previewJson(preview, { withObservations: preview.observations <= 5000 }) });
          return;
        }
        if (preview.errors > 0) {
          throw unprocessable('file_has_errors', `The file has ${preview.errors} problem${preview.errors === 1 ? '' : 's'} to fix; nothing was stored.`, catalogue.allProblems(preview).filter((p) => p.severity === 'error').slice(0, 200));
        }
        const stored = await catalogue.storeLoad(db, auth!.user.id, preview, fields, req.ip);
        const v = stored.vintages[0];
        res.status(201).json({
          vintage: { number: v.number, asOf: v.asOf, rowCount: v.rowCount, checksum: v.checksum },
          loadId: stored.loadId,
          preview: catalogue.previewJson(preview, { withObservations: false }),
        });
      },
    },
    {
      method: 'get',
      path: '/series/:id/vintages',
      access: 'signedIn',
      summary: 'Every vintage of a series, newest first, with who loaded it and when',
      tags: ['catalogue'],
      handler: async ({ params }) => ({ items: await catalogue.listVintages(db, idParam(params.id, 'The series')) }),
    },
    {
      method: 'get',
      path: '/series/:id/vintages/:number',
      access: 'signedIn',
      summary: 'One vintage (its number, or "latest")',
      tags: ['catalogue'],
      handler: async ({ params }) => {
        const { id: _id, ...v } = await catalogue.resolveVintage(db, idParam(params.id, 'The series'), vintageRef(params.number));
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
      handler: async ({ params }) => {
        const v = await catalogue.resolveVintage(db, idParam(params.id, 'The series'), vintageRef(params.number));
        const obs = await catalogue.observationsOf(db, v.id);
        return { vintage: v.number, asOf: v.asOf, ...obs };
      },
    },
    {
      method: 'get',
      path: '/series/:id/vintages/:number/export',
      access: 'signedIn',
      summary: 'Download a vintage as CSV, XLSX or SDMX-CSV',
      tags: ['catalogue'],
      query: z.object({ format: z.enum(['csv', 'xlsx', 'sdmx-csv']).default('csv') }),
      raw: true,
      handler: async ({ params, query, res }) => {
        const file = await exportVintage(db, idParam(params.id, 'The series'), vintageRef(params.number), query.format);
        res.setHeader('Content-Type', file.contentType);
        res.setHeader('Content-Disposition', `attachment; filename="${file.filename}"`);
        res.send(file.body);
      },
    },
    {
      method: 'get',
      path: '/series/:id/revisions',
      access: 'signedIn',
      summary: 'Per-period revisions between two vintages (?from=a&to=b; default: the two latest)',
      tags: ['catalogue'],
      query: z.object({ from: z.string().max(10).optional(), to: z.string().max(10).optional() }),
      handler: async ({ params, query }) => {
        const id = idParam(params.id, 'The series');
        let from = query.from ? vintageRef(query.from) : undefined;
        const to = query.to ? vintageRef(query.to) : 'latest';
        if (from === undefined) {
          const latest = await catalogue.resolveVintage(db, id, to);
          from = Math.max(1, latest.number - 1);
        }
        return catalogue.revisions(db, id, from as number | 'latest', to as number | 'latest');
      },
    },
    {
      method: 'get',
      path: '/series/:id/revisions/triangle',
      access: 'signedIn',
      summary: 'The revision triangle: periods down, vintages across',
      tags: ['catalogue'],
      handler: ({ params }) => catalogue.revisionTriangle(db, idParam(params.id, 'The series')),
    },
    {
      method: 'post',
      path: '/loads',
      access: STEWARD,
      summary: 'Load an SDMX-CSV (or CSV) file carrying many series; every changed series gets a vintage in one transaction',
      tags: ['catalogue'],
      before: [upload(config.maxUploadBytes)],
      raw: true,
      handler: async ({ req, res, auth }) => {
        const { file, fields, dryRun } = loadInput(req);
        const work = async (progress?: (phase: string, done: number, total: number) => void) => {
          const preview = await catalogue.previewLoad(db, file, undefined, progress);
          const json = catalogue.previewJson(preview, { withObservations: false });
          if (dryRun) return { preview: json };
          const stored = await catalogue.storeLoad(db, auth!.user.id, preview, { note: fields.note, asOf: fields.asOf }, req.ip, progress);
          return {
            load: { id: stored.loadId },
            vintages: stored.vintages,
            unchanged: preview.series.filter((s) => s.identicalToLatest).map((s) => s.series?.code),
            preview: { ...json, series: json.series.slice(0, 200) },
          };
        };
        if (wantsStream(req)) {
          await streamNdjson(res, async (send) => {
            const result = await work((phase, done, total) => send({ type: 'progress', phase, done, total }));
            send({ type: 'result', result });
          });
          return;
        }
        const result = await work();
        res.status(dryRun ? 200 : 201).json(result);
      },
    },
    {
      method: 'get',
      path: '/loads',
      access: 'signedIn',
      summary: 'Recent loads, newest first',
      tags: ['catalogue'],
      handler: async () => ({ items: await catalogue.listLoads(db) }),
    },
  ];
}
