/**
 * The role matrix: for every route the app has, each role (by API token), no credentials at all,
 * and a revoked token get the answer the rules give. The matrix is data: a new route fails the
 * "every route is in the matrix" check until it is added here.
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
  // Catalogue: everyone signed in reads; stewards and admins write. Vintages never change (409).
  { route: 'GET /api/v1/series', allow: SIGNED_IN },
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
  { route: 'GET /api/v1/series/:id/vintages/:number/export', path: '/api/v1/series/999999/vintages/1/export', allow: SIGNED_IN },
  { route: 'GET /api/v1/series/:id/revisions', path: '/api/v1/series/999999/revisions', allow: SIGNED_IN },
  { route: 'GET /api/v1/series/:id/revisions/triangle', path: '/api/v1/series/999999/revisions/triangle', allow: SIGNED_IN },
  { route: 'POST /api/v1/loads', allow: STEWARDS },
  { route: 'GET /api/v1/loads', allow: SIGNED_IN },
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
  { route: 'GET /api/v1/studies/:id', path: '/api/v1/studies/999999', allow: STUDY_READERS },
  { route: 'PATCH /api/v1/studies/:id', path: '/api/v1/studies/999999', body: { title: 'x' }, allow: ['economist'] },
  { route: 'DELETE /api/v1/studies/:id', path: '/api/v1/studies/999999', allow: ['economist'] },
  { route: 'POST /api/v1/studies/:id/duplicate', path: '/api/v1/studies/999999/duplicate', allow: ['economist'] },
  { route: 'GET /api/v1/studies/:id/result', path: '/api/v1/studies/999999/result', allow: STUDY_READERS },
  { route: 'POST /api/v1/studies/:id/realtime', path: '/api/v1/studies/999999/realtime', allow: STUDY_READERS },
  { route: 'GET /api/v1/studies/:id/export', path: '/api/v1/studies/999999/export', allow: STUDY_READERS },
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
  { route: 'GET /api/v1/exhibits/:id/diff', path: '/api/v1/exhibits/999999/diff', allow: SIGNED_IN },
  { route: 'GET /api/v1/exhibits/:id/data', path: '/api/v1/exhibits/999999/data', allow: SIGNED_IN },
  { route: 'GET /api/v1/review', allow: ['editor'] },
  { route: 'GET /api/v1/public/exhibits/:slug', path: '/api/v1/public/exhibits/nothing', allow: PUBLIC },
  { route: 'GET /api/v1/public/exhibits/:slug/data', path: '/api/v1/public/exhibits/nothing/data', allow: PUBLIC },
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
