/** The reference chronology: read by everyone signed in, kept by administrators and editors. */
import type { AppDeps } from '../deps.js';
import { idParam, type RouteSpec } from '../lib/http.js';
import { ACCESS } from '../schemas/access.js';
import { chronologySchema, fromSeriesSchema, updateChronologySchema } from '../schemas/chronology.js';
import * as chronology from '../services/chronology.js';

export function chronologyRoutes({ db }: AppDeps): RouteSpec[] {
  const id = (p: Record<string, string>) => idParam(p.id, 'The reference chronology');
  return [
    { method: 'get', path: '/chronologies', access: 'signedIn', summary: 'Reference chronologies: dated peaks and troughs per economy or area', tags: ['chronology'], handler: async () => ({ items: await chronology.listChronologies(db) }) },
    { method: 'get', path: '/chronologies/:id', access: 'signedIn', summary: 'One reference chronology with its peaks and troughs', tags: ['chronology'], handler: ({ params }) => chronology.getChronology(db, id(params)) },
    { method: 'post', path: '/chronologies', access: ACCESS.chronologyWrite, summary: 'Start a reference chronology (name, area, peaks and troughs)', tags: ['chronology'], body: chronologySchema, status: 201, handler: ({ body, auth, req }) => chronology.createChronology(db, auth!.user, body, req.ip) },
    { method: 'patch', path: '/chronologies/:id', access: ACCESS.chronologyWrite, summary: 'Change a reference chronology (its turns are replaced as a whole, in one transaction)', tags: ['chronology'], body: updateChronologySchema, handler: ({ params, body, auth, req }) => chronology.updateChronology(db, auth!.user, id(params), body, req.ip) },
    {
      method: 'delete',
      path: '/chronologies/:id',
      access: ACCESS.chronologyWrite,
      summary: 'Delete a reference chronology (submitted exhibits keep what they froze)',
      tags: ['chronology'],
      handler: async ({ params, auth, req }) => {
        await chronology.deleteChronology(db, auth!.user, id(params), req.ip);
        return { deleted: true };
      },
    },
    {
      method: 'post',
      path: '/chronologies/from-series',
      access: ACCESS.chronologyWrite,
      summary: 'The Harding–Pagan peaks and troughs of a series’ level, as a starting point (nothing stored)',
      tags: ['chronology'],
      body: fromSeriesSchema,
      handler: ({ body }) => chronology.hardingPaganTurns(db, body.seriesId, body.vintage),
    },
  ];
}
