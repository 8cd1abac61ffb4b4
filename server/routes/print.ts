/** Exhibits to print: one exhibit as vector PDF, and publication packs (PDF and a ZIP of data files). */
import { z } from 'zod';
import type { AppDeps } from '../deps.js';
import { idParam, sendFile, type RouteSpec } from '../lib/http.js';
import { exhibitPdf, packPdf, packZip } from '../services/exhibits/pack.js';

export const packSchema = z.object({
  ids: z.array(z.number().int().positive()).min(1, 'Choose at least one published exhibit.').max(60, 'A pack holds at most 60 exhibits.'),
  format: z.enum(['pdf', 'zip']).default('pdf'),
});

export function printRoutes(deps: AppDeps): RouteSpec[] {
  return [
    {
      method: 'get',
      path: '/exhibits/:id/pdf',
      access: 'signedIn',
      summary: 'The exhibit as vector PDF (A4 landscape, fonts embedded): its frozen snapshot, or a draft’s live content; as the exhibit itself',
      tags: ['exhibits'],
      raw: true,
      handler: async ({ params, auth, res }) => sendFile(res, await exhibitPdf(deps, auth!.user, idParam(params.id, 'The exhibit'))),
    },
    {
      method: 'post',
      path: '/exhibits/pack',
      access: 'signedIn',
      summary: 'Publication pack of chosen published exhibits, in the order given: one PDF numbered Chart 1, 2, … (format pdf) or a ZIP of their data files (format zip)',
      tags: ['exhibits'],
      body: packSchema,
      raw: true,
      handler: async ({ body, auth, res }) => sendFile(res, body.format === 'zip' ? await packZip(deps, auth!.user, { ids: body.ids }) : await packPdf(deps, auth!.user, { ids: body.ids })),
    },
    {
      method: 'get',
      path: '/boards/:id/pack.pdf',
      access: 'signedIn',
      summary: 'Publication pack of a board: its published exhibits in the order of its panels, one PDF numbered Chart 1, 2, …',
      tags: ['boards'],
      raw: true,
      handler: async ({ params, auth, res }) => sendFile(res, await packPdf(deps, auth!.user, { boardId: idParam(params.id, 'The board') })),
    },
    {
      method: 'get',
      path: '/boards/:id/pack.zip',
      access: 'signedIn',
      summary: 'The data files (CSV and XLSX) of a board’s published exhibits, as one ZIP',
      tags: ['boards'],
      raw: true,
      handler: async ({ params, auth, res }) => sendFile(res, await packZip(deps, auth!.user, { boardId: idParam(params.id, 'The board') })),
    },
  ];
}
