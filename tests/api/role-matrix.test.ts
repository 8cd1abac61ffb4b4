/**
 * The role matrix: for every route the app has, each role (by API token), no credentials at all,
 * and a revoked token get the answer the rules give. The matrix is data: a new route fails the
 * "every route is in the matrix" check until it is added here. The reading rule (issue 17) is
 * asserted over the same rows, at the end. Longer than 300 lines because the matrix has a row for
 * every route of the API.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';
import { allows, PAGES, type Access } from '../../server/schemas/access.js';
import { ROLES, type Role } from '../../server/schemas/people.js';

type Who = Role | 'anon' | 'revoked';
const ALL: Role[] = [...ROLES];
const SIGNED_IN = ALL;
const PUBLIC = 'public' as const;
const STEWARDS: Role[] = ['steward', 'admin'];
// Economists, editors and administrators read studies; stewards and readers do not.
const STUDY_READERS: Role[] = ['economist', 'editor', 'admin'];
// An exhibit's review (comments, earlier revisions): its author, editors and administrators.
const REVIEW_RECORD: Role[] = ['economist', 'editor', 'admin'];

interface Row {
  route: string; // "METHOD /api/v1/path" exactly as registered
  path?: string; // a concrete path when the route has parameters
  body?: unknown;
  allow: readonly Role[] | typeof PUBLIC;
}

// Concrete ids that do not exist: an allowed caller gets 404 (or 400), never 401/403.
export const MATRIX: Row[] = [
  { route: 'GET /api/v1/health', allow: PUBLIC },
  { route: 'GET /api/v1/openapi.json', allow: PUBLIC },
  { route: 'POST /api/v1/auth/sign-in', body: {}, allow: PUBLIC },
  { route: 'POST /api/v1/auth/sign-out', allow: SIGNED_IN },
  { route: 'GET /api/v1/auth/me', allow: SIGNED_IN },
  { route: 'POST /api/v1/auth/password-reset', body: {}, allow: PUBLIC },
  { route: 'POST /api/v1/auth/password-reset/complete', body: {}, allow: PUBLIC },
  // Access and abuse (issue 17): changing one's password.
  { route: 'POST /api/v1/auth/password', body: {}, allow: SIGNED_IN },
  { route: 'GET /api/v1/invitations/lookup/:token', path: '/api/v1/invitations/lookup/nothing-here', allow: PUBLIC },
  { route: 'POST /api/v1/invitations/accept', body: {}, allow: PUBLIC },
  { route: 'GET /api/v1/users', allow: ['admin'] },
  { route: 'PATCH /api/v1/users/:id', path: '/api/v1/users/999999', body: { roles: ['viewer'] }, allow: ['admin'] },
  { route: 'GET /api/v1/invitations', allow: ['admin'] },
  { route: 'POST /api/v1/invitations', body: {}, allow: ['admin'] },
  { route: 'POST /api/v1/invitations/:id/resend', path: '/api/v1/invitations/999999/resend', allow: ['admin'] },
  { route: 'DELETE /api/v1/invitations/:id', path: '/api/v1/invitations/999999', allow: ['admin'] },
  { route: 'GET /api/v1/users/:id/tokens', path: '/api/v1/users/999999/tokens', allow: ['admin'] },
  { route: 'GET /api/v1/audit', allow: ['admin'] },
  { route: 'GET /api/v1/settings', allow: SIGNED_IN },
  { route: 'PUT /api/v1/settings', body: {}, allow: ['admin'] },
  { route: 'POST /api/v1/tokens', body: {}, allow: SIGNED_IN },
  { route: 'GET /api/v1/tokens', allow: SIGNED_IN },
  { route: 'DELETE /api/v1/tokens/:id', path: '/api/v1/tokens/999999', allow: SIGNED_IN },
  { route: 'GET /api/v1/dev/mailbox', allow: ['admin'] },
  // Release alerts (issue 15): one's own setting.
  { route: 'GET /api/v1/profile/alerts', allow: SIGNED_IN },
  { route: 'PUT /api/v1/profile/alerts', body: {}, allow: SIGNED_IN },
  // Catalogue: everyone signed in reads; stewards and admins write. Vintages never change (409).
  { route: 'GET /api/v1/series', allow: SIGNED_IN },
  { route: 'GET /api/v1/catalogue/units', allow: SIGNED_IN },
  { route: 'POST /api/v1/series', body: {}, allow: STEWARDS },
  { route: 'GET /api/v1/series/:id', path: '/api/v1/series/999999', allow: SIGNED_IN },
  { route: 'PATCH /api/v1/series/:id', path: '/api/v1/series/999999', body: { title: 'x' }, allow: STEWARDS },
  { route: 'DELETE /api/v1/series/:id', path: '/api/v1/series/999999', allow: STEWARDS },
  { route: 'POST /api/v1/series/:id/vintages', path: '/api/v1/series/999999/vintages', allow: STEWARDS },
  { route: 'GET /api/v1/series/:id/vintages', path: '/api/v1/series/999999/vintages', allow: SIGNED_IN },
  { route: 'GET /api/v1/series/:id/vintages/:number', path: '/api/v1/series/999999/vintages/1', allow: SIGNED_IN },
  { route: 'PUT /api/v1/series/:id/vintages/:number', path: '/api/v1/series/999999/vintages/1', body: {}, allow: SIGNED_IN },
  { route: 'PATCH /api/v1/series/:id/vintages/:number', path: '/api/v1/series/999999/vintages/1', body: {}, allow: SIGNED_IN },
  { route: 'DELETE /api/v1/series/:id/vintages/:number', path: '/api/v1/series/999999/vintages/1', allow: SIGNED_IN },
  { route: 'GET /api/v1/series/:id/vintages/:number/observations', path: '/api/v1/series/999999/vintages/latest/observations', allow: SIGNED_IN },
  { route: 'POST /api/v1/series/:series/history', path: '/api/v1/series/999999/history', allow: STEWARDS },
  { route: 'GET /api/v1/series/:series/history', path: '/api/v1/series/999999/history', allow: SIGNED_IN },
  { route: 'GET /api/v1/series/:series/observations', path: '/api/v1/series/999999/observations?asOf=2020-01-01', allow: SIGNED_IN },
  { route: 'POST /api/v1/series/:series/reliability', path: '/api/v1/series/999999/reliability', body: {}, allow: ['economist'] },
  { route: 'GET /api/v1/series/:id/vintages/:number/export', path: '/api/v1/series/999999/vintages/1/export', allow: SIGNED_IN },
  { route: 'GET /api/v1/series/:id/revisions', path: '/api/v1/series/999999/revisions', allow: SIGNED_IN },
  { route: 'GET /api/v1/series/:id/revisions/triangle', path: '/api/v1/series/999999/revisions/triangle', allow: SIGNED_IN },
  { route: 'POST /api/v1/loads', allow: STEWARDS },
  { route: 'GET /api/v1/loads', allow: SIGNED_IN },
  { route: 'GET /api/v1/feeds', allow: STEWARDS },
  { route: 'GET /api/v1/sdmx/dataflow', allow: SIGNED_IN },
  { route: 'GET /api/v1/sdmx/dataflow/:agency/:id/:version', path: '/api/v1/sdmx/dataflow/NONE/NONE/1.0', allow: SIGNED_IN },
  { route: 'GET /api/v1/sdmx/datastructure', allow: SIGNED_IN },
  { route: 'GET /api/v1/sdmx/datastructure/:agency/:id/:version', path: '/api/v1/sdmx/datastructure/NONE/NONE/1.0', allow: SIGNED_IN },
  { route: 'GET /api/v1/sdmx/data/:flow', path: '/api/v1/sdmx/data/NONE', allow: SIGNED_IN },
  { route: 'GET /api/v1/sdmx/data/:flow/:key', path: '/api/v1/sdmx/data/NONE/all', allow: SIGNED_IN },
  { route: 'POST /api/v1/feeds', body: {}, allow: STEWARDS },
  { route: 'PATCH /api/v1/feeds/:id', path: '/api/v1/feeds/999999', body: { enabled: false }, allow: STEWARDS },
  { route: 'DELETE /api/v1/feeds/:id', path: '/api/v1/feeds/999999', allow: STEWARDS },
  { route: 'POST /api/v1/feeds/:id/run', path: '/api/v1/feeds/999999/run', allow: STEWARDS },
  { route: 'GET /api/v1/feeds/:id/runs', path: '/api/v1/feeds/999999/runs', allow: STEWARDS },
  // Analysis: anyone signed in may compute.
  { route: 'POST /api/v1/decompose', body: {}, allow: SIGNED_IN },
  { route: 'POST /api/v1/decompose/batch', body: {}, allow: SIGNED_IN },
  { route: 'GET /api/v1/methods', allow: SIGNED_IN },
  { route: 'GET /api/v1/gain', path: '/api/v1/gain?method=hp', allow: SIGNED_IN },
  { route: 'GET /api/v1/lambda', path: '/api/v1/lambda?lambda=1600', allow: SIGNED_IN },
  // Studies: economists make and change their own; economists, editors and administrators read them.
  { route: 'GET /api/v1/studies', allow: STUDY_READERS },
  { route: 'POST /api/v1/studies', body: {}, allow: ['economist'] },
  { route: 'POST /api/v1/studies/preview', body: {}, allow: STUDY_READERS },
  { route: 'POST /api/v1/studies/compare', body: {}, allow: STUDY_READERS },
  { route: 'POST /api/v1/studies/range', body: {}, allow: ['economist'] },
  { route: 'GET /api/v1/studies/:id', path: '/api/v1/studies/999999', allow: STUDY_READERS },
  { route: 'PATCH /api/v1/studies/:id', path: '/api/v1/studies/999999', body: { title: 'x' }, allow: ['economist'] },
  { route: 'DELETE /api/v1/studies/:id', path: '/api/v1/studies/999999', allow: ['economist'] },
  { route: 'POST /api/v1/studies/:id/duplicate', path: '/api/v1/studies/999999/duplicate', allow: ['economist'] },
  { route: 'GET /api/v1/studies/:id/result', path: '/api/v1/studies/999999/result', allow: STUDY_READERS },
  { route: 'POST /api/v1/studies/:id/realtime', path: '/api/v1/studies/999999/realtime', allow: STUDY_READERS },
  { route: 'GET /api/v1/studies/:id/export', path: '/api/v1/studies/999999/export', allow: STUDY_READERS },
  { route: 'GET /api/v1/studies/:id/script', path: '/api/v1/studies/999999/script', allow: STUDY_READERS },
  // Boards: economists compose; everyone signed in reads shared boards.
  { route: 'GET /api/v1/boards', allow: SIGNED_IN },
  { route: 'POST /api/v1/boards', body: {}, allow: ['economist'] },
  { route: 'GET /api/v1/boards/:id', path: '/api/v1/boards/999999', allow: SIGNED_IN },
  { route: 'PATCH /api/v1/boards/:id', path: '/api/v1/boards/999999', body: { title: 'x' }, allow: ['economist'] },
  { route: 'DELETE /api/v1/boards/:id', path: '/api/v1/boards/999999', allow: ['economist'] },
  { route: 'POST /api/v1/boards/:id/panels', path: '/api/v1/boards/999999/panels', body: {}, allow: ['economist'] },
  { route: 'PUT /api/v1/boards/:id/panels/order', path: '/api/v1/boards/999999/panels/order', body: { panelIds: [1] }, allow: ['economist'] },
  { route: 'PATCH /api/v1/boards/:id/panels/:panelId', path: '/api/v1/boards/999999/panels/1', body: { title: 'x' }, allow: ['economist'] },
  { route: 'DELETE /api/v1/boards/:id/panels/:panelId', path: '/api/v1/boards/999999/panels/1', allow: ['economist'] },
  { route: 'GET /api/v1/boards/:id/panels/:panelId/data', path: '/api/v1/boards/999999/panels/1/data', allow: SIGNED_IN },
  // Exhibits: economists draft; moves are checked per person by the state machine (exhibits.test.ts).
  { route: 'GET /api/v1/exhibits', allow: SIGNED_IN },
  { route: 'POST /api/v1/exhibits', body: {}, allow: ['economist'] },
  { route: 'GET /api/v1/exhibits/:id', path: '/api/v1/exhibits/999999', allow: SIGNED_IN },
  { route: 'PATCH /api/v1/exhibits/:id', path: '/api/v1/exhibits/999999', body: { title: 'x' }, allow: ['economist'] },
  { route: 'DELETE /api/v1/exhibits/:id', path: '/api/v1/exhibits/999999', allow: ['economist'] },
  { route: 'POST /api/v1/exhibits/:id/transitions', path: '/api/v1/exhibits/999999/transitions', body: {}, allow: SIGNED_IN },
  // Access and abuse (issue 17): what changed between revisions is review (per person: the author, editors, administrators).
  { route: 'POST /api/v1/exhibits/:id/update', path: '/api/v1/exhibits/999999/update', allow: ['economist'] },
  { route: 'GET /api/v1/exhibits/:id/diff', path: '/api/v1/exhibits/999999/diff', allow: REVIEW_RECORD },
  { route: 'GET /api/v1/exhibits/:id/data', path: '/api/v1/exhibits/999999/data', allow: SIGNED_IN },
  { route: 'GET /api/v1/review', allow: ['editor'] },
  { route: 'GET /api/v1/public/exhibits/:slug', path: '/api/v1/public/exhibits/nothing', allow: PUBLIC },
  { route: 'GET /api/v1/public/exhibits/:slug/data', path: '/api/v1/public/exhibits/nothing/data', allow: PUBLIC },
  // Print (issue 14): PDF as the exhibit itself; packs of published exhibits; the reference chronology
  // read by everyone signed in and kept by administrators and editors.
  { route: 'GET /api/v1/exhibits/:id/pdf', path: '/api/v1/exhibits/999999/pdf', allow: SIGNED_IN },
  { route: 'POST /api/v1/exhibits/pack', body: { ids: [999999] }, allow: SIGNED_IN },
  { route: 'GET /api/v1/boards/:id/pack.pdf', path: '/api/v1/boards/999999/pack.pdf', allow: SIGNED_IN },
  { route: 'GET /api/v1/boards/:id/pack.zip', path: '/api/v1/boards/999999/pack.zip', allow: SIGNED_IN },
  { route: 'GET /api/v1/chronologies', allow: SIGNED_IN },
  { route: 'GET /api/v1/chronologies/:id', path: '/api/v1/chronologies/999999', allow: SIGNED_IN },
  { route: 'POST /api/v1/chronologies', body: {}, allow: ['admin', 'editor'] },
  { route: 'PATCH /api/v1/chronologies/:id', path: '/api/v1/chronologies/999999', body: { name: 'x' }, allow: ['admin', 'editor'] },
  { route: 'DELETE /api/v1/chronologies/:id', path: '/api/v1/chronologies/999999', allow: ['admin', 'editor'] },
  { route: 'POST /api/v1/chronologies/from-series', body: { seriesId: 999999 }, allow: ['admin', 'editor'] },
];

let t: TestApp;
const tokens = {} as Record<Who, string | undefined>;

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  for (const role of ALL) {
    const agent = await signedIn(t, `${role}@demo.test`);
    tokens[role] = (await agent.post('/api/v1/tokens').send({ name: 'matrix' })).body.token;
  }
  const agent = await signedIn(t, 'viewer@demo.test');
  const revoked = (await agent.post('/api/v1/tokens').send({ name: 'revoked' })).body;
  await agent.delete(`/api/v1/tokens/${revoked.id}`).expect(204);
  tokens.revoked = revoked.token;
}, 120_000);
afterAll(async () => {
  await t.close();
});

const rolesOf = (access: Access): Role[] => ALL.filter((r) => allows(access, [r]));

describe('the client’s pages and the server agree (server/schemas/access.ts)', () => {
  it('every page’s API routes exist and let in everyone who may open the page; its main route lets in exactly them', () => {
    const access = new Map(t.app.locals.routes.map((r) => [`${r.method.toUpperCase()} ${r.fullPath}`, r.access]));
    for (const page of PAGES) {
      const pageRoles = rolesOf(page.access);
      page.api.forEach((route, k) => {
        expect(access.has(route), `${page.path}: ${route} is not a route`).toBe(true);
        const routeRoles = rolesOf(access.get(route)!);
        expect(pageRoles.filter((r) => !routeRoles.includes(r)), `${page.path} is open to roles that ${route} refuses`).toEqual([]);
        if (k === 0) expect(routeRoles, `${page.path} and its main route ${route}`).toEqual(pageRoles);
      });
    }
  });
});

describe('role matrix', () => {
  it('covers every route the app registers', () => {
    const registered = t.app.locals.routes.map((r) => `${r.method.toUpperCase()} ${r.fullPath}`).sort();
    const inMatrix = MATRIX.map((r) => r.route).sort();
    expect(registered.filter((r) => !inMatrix.includes(r)), 'routes missing from the matrix').toEqual([]);
    expect(inMatrix.filter((r) => !registered.includes(r)), 'matrix rows for routes that do not exist').toEqual([]);
  });

  for (const row of MATRIX) {
    const [method, registeredPath] = row.route.split(' ');
    const path = row.path ?? registeredPath;
    const whos: Who[] = ['anon', 'revoked', ...ALL];
    it(row.route, async () => {
      for (const who of whos) {
        let req = request(t.app)[method.toLowerCase() as 'get'](path);
        if (who !== 'anon') req = req.set('Authorization', `Bearer ${tokens[who]}`);
        const res = row.body !== undefined ? await req.send(row.body as object) : await req;
        const label = `${row.route} as ${who} → ${res.status} ${JSON.stringify(res.body?.error ?? '')}`;
        expect(res.status, label).toBeLessThan(500);
        if (res.status >= 400) expect(res.body.error?.code, label).toBeTruthy();
        if (row.allow === PUBLIC) {
          // Public routes ignore credentials, except that a revoked token is refused outright.
          if (who === 'revoked') expect(res.status, label).toBe(401);
          else expect([401, 403], label).not.toContain(res.status);
        } else if (who === 'anon' || who === 'revoked') {
          expect(res.status, label).toBe(401);
        } else if (row.allow.includes(who)) {
          expect([401, 403], label).not.toContain(res.status);
        } else {
          expect(res.status, label).toBe(403);
          expect(res.body.error.code, label).toBe('role_required');
        }
      }
    });
  }
});

// ---------------------------------------------------------------------------------------------
// Access and abuse (issue 17): the reading rule, asserted for every route that reads.
//
// Work that is not published reaches only those the rule lets read it: economists, editors and
// administrators read studies; an exhibit's author, editors and administrators read its drafts,
// its review and its comments; a private board is its owner's; readers see what is published or
// on a board shared with them. Canary texts are planted in each kind of unpublished work, every
// route that reads (GET, and the POSTs that only compute) is called by every identity on the
// objects that hold them, and each canary must turn up for exactly the roles the rule names —
// never for anyone else, and never on a public route.

/** Writes that only read: they compute from stored work and change nothing. */
const READING_POSTS = new Set(['POST /api/v1/studies/range', 'POST /api/v1/series/:series/reliability', 'POST /api/v1/studies/:id/realtime', 'POST /api/v1/studies/preview', 'POST /api/v1/studies/compare', 'POST /api/v1/decompose', 'POST /api/v1/decompose/batch']);

interface Canary {
  text: string;
  /** The demo roles whose accounts may read it (the demo economist is the author and owner of everything below). */
  readers: readonly Role[];
}

const CANARY = {
  studyTitle: { text: 'CANARY study title', readers: STUDY_READERS },
  studyNotes: { text: 'CANARY study notes', readers: STUDY_READERS },
  privateBoard: { text: 'CANARY private board', readers: ['economist'] },
  privatePanel: { text: 'CANARY private panel', readers: ['economist'] },
  draft: { text: 'CANARY draft exhibit', readers: ['economist', 'admin'] },
  inReview: { text: 'CANARY exhibit in review', readers: REVIEW_RECORD },
  returnComment: { text: 'CANARY return comment', readers: REVIEW_RECORD },
  approvalComment: { text: 'CANARY approval comment', readers: REVIEW_RECORD },
  returnedRevision: { text: 'CANARY subtitle of a returned revision', readers: REVIEW_RECORD },
} satisfies Record<string, Canary>;

describe('the reading rule (issue 17): unpublished work reaches only those who may read it', () => {
  const ids = { study: 0, board: 0, panel: 0, series: 0, slug: '', exhibits: [] as number[] };
  const as = (who: Role) => ({ Authorization: `Bearer ${tokens[who]}` });
  const call = (method: string, path: string, who: Who, body?: unknown) => {
    let req = request(t.app)[method.toLowerCase() as 'get'](path);
    if (who !== 'anon') req = req.set('Authorization', `Bearer ${tokens[who]}`);
    req = req.buffer(true).parse((res, cb) => {
      let text = '';
      res.setEncoding('utf8');
      res.on('data', (c: string) => (text += c));
      res.on('end', () => cb(null, text));
    });
    return body !== undefined ? req.send(body as object) : req;
  };

  beforeAll(async () => {
    const econ = as('economist');
    const post = (path: string, body: object, who: Role = 'economist') => request(t.app).post(path).set(as(who)).send(body);
    const move = (id: number, to: string, who: Role, comment?: string) => post(`/api/v1/exhibits/${id}/transitions`, { to, ...(comment ? { comment } : {}) }, who).expect(200);
    ids.series = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
    ids.study = (await post('/api/v1/studies', { title: CANARY.studyTitle.text, notes: CANARY.studyNotes.text, seriesId: ids.series, vintage: 'latest', transform: 'log100', method: 'hp', params: { lambda: 1600 } }).expect(201)).body.id;
    ids.board = (await post('/api/v1/boards', { title: CANARY.privateBoard.text, visibility: 'private' }).expect(201)).body.id;
    ids.panel = (await post(`/api/v1/boards/${ids.board}/panels`, { title: CANARY.privatePanel.text, studyIds: [ids.study] }).expect(201)).body.id;
    const exhibit = async (title: string, subtitle?: string) => (await post('/api/v1/exhibits', { studyId: ids.study, title, ...(subtitle ? { subtitle } : {}) }).expect(201)).body.id as number;
    const draft = await exhibit(CANARY.draft.text);
    const inReview = await exhibit(CANARY.inReview.text);
    await move(inReview, 'in_review', 'economist');
    const published = await exhibit('A published exhibit', CANARY.returnedRevision.text);
    await move(published, 'in_review', 'economist');
    await move(published, 'returned', 'editor', CANARY.returnComment.text);
    await request(t.app).patch(`/api/v1/exhibits/${published}`).set(econ).send({ subtitle: 'The subtitle as published' }).expect(200);
    await move(published, 'in_review', 'economist');
    await move(published, 'approved', 'editor', CANARY.approvalComment.text);
    await move(published, 'published', 'editor');
    ids.exhibits = [draft, inReview, published];
    ids.slug = (await t.db('exhibits').where('id', published).first()).public_slug;
    await request(t.app).put('/api/v1/settings').set(as('admin')).send({ publicExhibitLinks: true }).expect(200);
  }, 120_000);
  afterAll(async () => {
    await request(t.app).put('/api/v1/settings').set(as('admin')).send({ publicExhibitLinks: false });
  });

  /** The paths of a route on the objects holding the canaries (a row's own path where it names none). */
  function canaryPaths(row: Row): string[] {
    const [, registered] = row.route.split(' ');
    if (!registered.includes(':')) return [row.path ?? registered];
    const values: Record<string, string[]> = registered.startsWith('/api/v1/studies/')
      ? { id: [String(ids.study)] }
      : registered.startsWith('/api/v1/boards/')
        ? { id: [String(ids.board)], panelId: [String(ids.panel)] }
        : registered.startsWith('/api/v1/exhibits/')
          ? { id: ids.exhibits.map(String) }
          : registered.startsWith('/api/v1/public/exhibits/')
            ? { slug: [ids.slug] }
            : registered.startsWith('/api/v1/series/')
              ? { id: [String(ids.series)], series: [String(ids.series)], number: ['1'] }
              : {};
    let paths = [registered];
    for (const [name] of registered.matchAll(/:(\w+)/g)) {
      const key = name.slice(1);
      if (!values[key]) return [row.path!];
      paths = paths.flatMap((p) => values[key].map((v) => p.replace(name, v)));
    }
    return paths;
  }

  const readingRows = MATRIX.filter((r) => r.route.startsWith('GET ') || READING_POSTS.has(r.route));

  it('every reading route is scanned (the list of reading POSTs names real routes)', () => {
    const registered = new Set(t.app.locals.routes.map((r) => `${r.method.toUpperCase()} ${r.fullPath}`));
    for (const r of READING_POSTS) expect(registered.has(r), r).toBe(true);
    expect(readingRows.length).toBeGreaterThan(40);
  });

  it('each canary reaches exactly the roles the rule names, through any route, and no public answer', async () => {
    const seenBy = new Map<string, Set<Who>>(Object.values(CANARY).map((c) => [c.text, new Set<Who>()]));
    for (const row of readingRows) {
      const [method] = row.route.split(' ');
      const body = row.route === 'POST /api/v1/studies/:id/realtime' ? undefined : row.body;
      for (const path of canaryPaths(row)) {
        for (const who of ['anon', ...ALL] as Who[]) {
          const res = await call(method, path, who, body);
          expect(res.status, `${method} ${path} as ${who}`).toBeLessThan(500);
          const text = String(res.body ?? '');
          for (const c of Object.values(CANARY)) {
            if (!text.includes(c.text)) continue;
            seenBy.get(c.text)!.add(who);
            const label = `${method} ${path} as ${who} shows “${c.text}”`;
            expect((c.readers as readonly Who[]).includes(who), label).toBe(true);
          }
        }
      }
    }
    for (const c of Object.values(CANARY)) expect([...seenBy.get(c.text)!].sort(), c.text).toEqual([...c.readers].sort());
  }, 300_000);
});
