import { z } from 'zod';
import type { AppDeps } from '../deps.js';
import { ACCESS } from '../schemas/access.js';
import { idParam, sendFile, type RouteSpec } from '../lib/http.js';
import { createExhibitSchema, transitionSchema, updateExhibitSchema } from '../schemas/exhibits.js';
import { exhibitDiff } from '../services/exhibits/diff.js';
import { createExhibit, deleteExhibit, updateExhibit } from '../services/exhibits/drafts.js';
import { getExhibit, listExhibits, publicExhibit } from '../services/exhibits/read.js';
import { reviewQueue, transition } from '../services/exhibits/review.js';
import { prepareUpdate } from '../services/exhibits/updates.js';
import { exhibitExport } from '../services/exports.js';

export function exhibitRoutes(deps: AppDeps): RouteSpec[] {
  const { db } = deps;
  const download = (slug?: boolean): RouteSpec => ({
    method: 'get',
    path: slug ? '/public/exhibits/:slug/data' : '/exhibits/:id/data',
    access: slug ? 'public' : 'signedIn',
    summary: slug ? 'The data behind a published exhibit, by its public link' : 'The data behind an exhibit as CSV or XLSX, stamped with vintage and method',
    tags: ['exhibits'],
    query: z.object({ format: z.enum(['csv', 'xlsx']).default('csv') }),
    raw: true,
    handler: async ({ params, query, auth, res }) => {
      const who = slug ? { slug: z.string().max(64).parse(params.slug) } : { user: auth!.user, id: idParam(params.id, 'The exhibit') };
      sendFile(res, await exhibitExport(deps, who, query.format));
    },
  });
  return [
    {
      method: 'get',
      path: '/exhibits',
      access: 'signedIn',
      summary: 'Exhibits the user may see (readers: published ones), newest first',
      tags: ['exhibits'],
      query: z.object({ status: z.string().max(16).optional(), mine: z.string().optional() }),
      handler: async ({ query, auth }) => ({ items: await listExhibits(db, auth!.user, { status: query.status, mine: query.mine === '1' }) }),
    },
    {
      method: 'post',
      path: '/exhibits',
      access: ACCESS.exhibitsDraft,
      summary: 'Draft an exhibit from a study or a board panel',
      tags: ['exhibits'],
      body: createExhibitSchema,
      status: 201,
      handler: ({ body, auth, req }) => createExhibit(deps, auth!.user, body, req.ip),
    },
    {
      method: 'get',
      path: '/exhibits/:id',
      access: 'signedIn',
      summary: 'An exhibit with its status, snapshot (once submitted) and events',
      tags: ['exhibits'],
      handler: ({ params, auth }) => getExhibit(deps, auth!.user, idParam(params.id, 'The exhibit')),
    },
    {
      method: 'patch',
      path: '/exhibits/:id',
      access: ACCESS.exhibitsDraft,
      summary: 'Edit one’s own draft or returned exhibit (409 once approved or published)',
      tags: ['exhibits'],
      body: updateExhibitSchema,
      handler: ({ params, body, auth }) => updateExhibit(deps, auth!.user, idParam(params.id, 'The exhibit'), body),
    },
    {
      method: 'delete',
      path: '/exhibits/:id',
      access: ACCESS.exhibitsDraft,
      summary: 'Delete one’s own draft',
      tags: ['exhibits'],
      handler: ({ params, auth }) => deleteExhibit(deps, auth!.user, idParam(params.id, 'The exhibit')),
    },
    {
      method: 'post',
      path: '/exhibits/:id/transitions',
      access: 'signedIn',
      summary: 'Move an exhibit: submit (in_review), return (comment), approve, publish, withdraw (reason)',
      tags: ['exhibits'],
      body: transitionSchema,
      handler: ({ params, body, auth, req }) => transition(deps, auth!.user, idParam(params.id, 'The exhibit'), body.to, body.comment || undefined, req.ip),
    },
    {
      method: 'post',
      path: '/exhibits/:id/update',
      access: ACCESS.exhibitsDraft,
      summary: 'Prepare an update of a published exhibit: a new draft linked to it, same settings, on the newest vintage',
      tags: ['exhibits'],
      status: 201,
      handler: ({ params, auth, req }) => prepareUpdate(deps, auth!.user, idParam(params.id, 'The exhibit'), req.ip),
    },
    {
      method: 'get',
      path: '/exhibits/:id/diff',
      access: ACCESS.reviewRecord,
      summary: 'What changed between the latest revision and the one before (data, parameters, text)',
      tags: ['exhibits'],
      handler: ({ params, auth }) => exhibitDiff(deps, auth!.user, idParam(params.id, 'The exhibit')),
    },
    download(false),
    {
      method: 'get',
      path: '/review',
      access: ACCESS.review,
      summary: 'The Review desk: exhibits in review, oldest first',
      tags: ['exhibits'],
      handler: async ({ auth }) => ({ items: await reviewQueue(deps, auth!.user) }),
    },
    {
      method: 'get',
      path: '/public/exhibits/:slug',
      access: 'public',
      summary: 'A published exhibit by its public link, when an administrator allows public links',
      tags: ['exhibits'],
      handler: ({ params }) => publicExhibit(deps, z.string().max(64).parse(params.slug)),
    },
    download(true),
  ];
}
