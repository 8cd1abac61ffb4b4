import { z } from 'zod';
import { methodIdEnum } from '../analysis/methods/index.js';
import type { AppDeps } from '../deps.js';
import { ACCESS } from '../schemas/access.js';
import { idParam, sendFile, type RouteSpec } from '../lib/http.js';
import { answerWithProgress } from '../lib/stream.js';
import { studySchemas } from '../schemas/studies.js';
import { studyExport } from '../services/exports.js';
import { studyScript } from '../services/studies/script.js';
import { realtimeAnalysis } from '../services/studies/realtime.js';
import { compare, computeSpec, studyAnswer } from '../services/studies/results.js';
import { createStudy, deleteStudy, duplicateStudy, getStudy, listStudies, updateStudy } from '../services/studies/studies.js';

export function studyRoutes(deps: AppDeps): RouteSpec[] {
  const { db } = deps;
  const { compareSchema, createStudySchema, studySpecSchema, updateStudySchema } = studySchemas(methodIdEnum());
  return [
    {
      method: 'get',
      path: '/studies',
      access: ACCESS.studiesRead,
      summary: 'Saved studies, newest first (?mine=1, ?seriesId=, ?method=, ?q=)',
      tags: ['studies'],
      query: z.object({ mine: z.string().optional(), seriesId: z.coerce.number().int().positive().optional(), method: z.string().max(32).optional(), q: z.string().max(100).optional() }),
      handler: async ({ query, auth }) => ({
        items: await listStudies(db, { owner: query.mine === '1' ? auth!.user.id : undefined, seriesId: query.seriesId, method: query.method, q: query.q }),
      }),
    },
    {
      method: 'post',
      path: '/studies',
      access: ACCESS.studiesWrite,
      summary: 'Save a study: a series, a vintage pin (a number or "latest"), a transform, a method and its parameters; or kind "range" with a list of methods',
      tags: ['studies'],
      body: createStudySchema,
      status: 201,
      handler: ({ body, auth, req }) => createStudy(db, auth!.user, body, req.ip, deps.pool),
    },
    {
      method: 'post',
      path: '/studies/preview',
      access: ACCESS.studiesRead,
      summary: 'The result a study would give, without saving it (the study page recomputes with this)',
      tags: ['studies'],
      body: studySpecSchema,
      handler: ({ body }) => computeSpec(db, body, { pool: deps.pool }),
    },
    {
      method: 'post',
      path: '/studies/compare',
      access: ACCESS.studiesRead,
      summary: 'Cycles of several methods or series on aligned periods, with cross-correlations against a reference',
      tags: ['studies'],
      body: compareSchema,
      handler: ({ body }) => compare(db, body, deps.pool),
    },
    {
      method: 'get',
      path: '/studies/:id',
      access: ACCESS.studiesRead,
      summary: 'A study',
      tags: ['studies'],
      handler: ({ params }) => getStudy(db, idParam(params.id, 'The study')),
    },
    {
      method: 'patch',
      path: '/studies/:id',
      access: ACCESS.studiesWrite,
      summary: 'Change one’s own study',
      tags: ['studies'],
      body: updateStudySchema,
      handler: ({ params, body, auth }) => updateStudy(db, auth!.user, idParam(params.id, 'The study'), body, deps.pool),
    },
    {
      method: 'delete',
      path: '/studies/:id',
      access: ACCESS.studiesWrite,
      summary: 'Delete one’s own study',
      tags: ['studies'],
      handler: ({ params, auth, req }) => deleteStudy(db, auth!.user, idParam(params.id, 'The study'), req.ip),
    },
    {
      method: 'post',
      path: '/studies/:id/duplicate',
      access: ACCESS.studiesWrite,
      summary: 'Copy a study into one’s own',
      tags: ['studies'],
      status: 201,
      handler: ({ params, auth }) => duplicateStudy(db, auth!.user, idParam(params.id, 'The study'), deps.pool),
    },
    {
      method: 'get',
      path: '/studies/:id/result',
      access: ACCESS.studiesRead,
      summary: 'The decomposition of the study’s data, with the vintage used, statistics, turning points and gain; for a range study (kind "range") the range across its methods',
      tags: ['studies'],
      handler: ({ params }) => studyAnswer(db, deps.pool, idParam(params.id, 'The study')),
    },
    {
      method: 'post',
      path: '/studies/:id/realtime',
      access: ACCESS.studiesRead,
      summary: 'Real-time revision analysis: the method on every vintage, real-time against final, and the quasi-real-time variant',
      tags: ['studies'],
      raw: true,
      handler: async ({ params, req, res }) => {
        const id = idParam(params.id, 'The study');
        await answerWithProgress(req, res, 200, (onProgress) => realtimeAnalysis(db, deps.pool, id, onProgress));
      },
    },
    {
      method: 'get',
      path: '/studies/:id/export',
      access: ACCESS.studiesRead,
      summary: 'The study’s numbers as CSV or XLSX, with the method line and the vintage stamp; for a range study each method’s cycle and the median, lowest and highest across them',
      tags: ['studies'],
      query: z.object({ format: z.enum(['csv', 'xlsx']).default('csv') }),
      raw: true,
      handler: async ({ params, query, res }) => sendFile(res, await studyExport(db, idParam(params.id, 'The study'), query.format, deps.pool)),
    },
    {
      method: 'get',
      path: '/studies/:id/script',
      access: ACCESS.studiesRead,
      summary: 'The study as a rerunnable Python script: fetches its vintage (token from TIDEGAUGE_TOKEN), recomputes with statsmodels or POST /decompose, prints the largest difference',
      tags: ['studies'],
      raw: true,
      handler: async ({ params, res }) => sendFile(res, await studyScript(db, idParam(params.id, 'The study'), deps.config.publicOrigin, deps.pool)),
    },
  ];
}
