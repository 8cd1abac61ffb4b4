/**
 * An instance remembers an API token it has checked for TOKEN_RECHECK_MS, for reads only. These
 * tests run two instances on one database, as a deployment behind a load balancer does: a change
 * through one instance takes effect there at once, through the other within the recheck time, and
 * writes are always checked against the database.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app.js';
import { createLogger } from '../../server/lib/logger.js';
import { makeTestApp, testConfig, type TestApp } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';
import { TokenMemory } from '../../server/auth/token-memory.js';

const RECHECK_MS = 400;
let t: TestApp;
let other: ReturnType<typeof createApp>;
beforeAll(async () => {
  t = await makeTestApp({ TOKEN_RECHECK_MS: String(RECHECK_MS) }, { seedDemo: true });
  other = createApp({ config: testConfig({ DATABASE_URL: t.testDb.url, TOKEN_RECHECK_MS: String(RECHECK_MS) }), db: t.db, logger: createLogger('silent') });
});
afterAll(async () => {
  await other.locals.shutdown();
  await t.close();
});

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const newToken = async (email: string) => {
  const agent = await signedIn(t, email);
  const { body } = await agent.post('/api/v1/tokens').send({ name: 'memory test' }).expect(201);
  return { agent, token: body.token as string, id: body.id as number };
};
const read = (app: typeof other, token: string, path = '/api/v1/auth/me') => request(app).get(path).set('Authorization', `Bearer ${token}`);

describe('API tokens remembered for reads', () => {
  it('a revocation through the instance that answers is refused at once', async () => {
    const { agent, token, id } = await newToken('steward@demo.test');
    await read(t.app, token).expect(200);
    await agent.delete(`/api/v1/tokens/${id}`).expect(204);
    expect((await read(t.app, token).expect(401)).body.error.code).toBe('invalid_token');
  });

  it('a revocation through another instance reaches reads within the recheck time', async () => {
    const { agent, token, id } = await newToken('economist@demo.test');
    await read(other, token).expect(200);
    const revokedAt = performance.now();
    await agent.delete(`/api/v1/tokens/${id}`).expect(204); // through the first instance
    // Every read answered 200 began within the recheck time of the last check before the revocation.
    for (let began = performance.now(), r = await read(other, token); r.status === 200; began = performance.now(), r = await read(other, token)) {
      expect(began - revokedAt).toBeLessThan(RECHECK_MS);
      await sleep(25);
    }
    await read(other, token).expect(401);
  });

  it('a write asks the database even when the token was checked a moment ago', async () => {
    const { token, id } = await newToken('economist@demo.test');
    await read(other, token).expect(200);
    await t.db('api_tokens').where('id', id).update({ revoked_at: new Date() }); // as another instance would
    const write = await request(other).post('/api/v1/tokens').set('Authorization', `Bearer ${token}`).send({ name: 'child' });
    expect([write.status, write.body.error?.code]).toEqual([401, 'invalid_token']);
  });

  it('a role taken away through the instance applies to its next read', async () => {
    const { token } = await newToken('editor@demo.test');
    await read(t.app, token, '/api/v1/studies').expect(200);
    const admin = await signedIn(t, 'admin@demo.test');
    const editor = await t.db('users').where('email', 'editor@demo.test').first();
    await admin.patch(`/api/v1/users/${editor.id}`).send({ roles: ['viewer'] }).expect(200);
    expect((await read(t.app, token, '/api/v1/studies').expect(403)).body.error.code).toBe('role_required');
    await admin.patch(`/api/v1/users/${editor.id}`).send({ roles: ['editor'] }).expect(200);
  });

  it('with TOKEN_RECHECK_MS=0 every read asks the database', async () => {
    const strict = createApp({ config: testConfig({ DATABASE_URL: t.testDb.url, TOKEN_RECHECK_MS: '0' }), db: t.db, logger: createLogger('silent') });
    try {
      const { token, id } = await newToken('viewer@demo.test');
      await read(strict, token).expect(200);
      await t.db('api_tokens').where('id', id).update({ revoked_at: new Date() });
      await read(strict, token).expect(401);
    } finally {
      await strict.locals.shutdown();
    }
  });
});

describe('TokenMemory', () => {
  const owner = { user: { id: 1, email: 'a@b.test', name: 'A', roles: ['viewer' as const] }, tokenId: 7 };

  it('does not keep a check begun before it was told to forget', () => {
    const memory = new TokenMemory(60_000);
    const begun = performance.now();
    memory.forget();
    memory.keep('tg_x', owner, begun);
    expect(memory.recall('tg_x')).toBeUndefined();
    memory.keep('tg_x', owner, performance.now());
    expect(memory.recall('tg_x')).toEqual(owner);
  });

  it('holds at most 10 000 tokens, dropping the oldest check first', () => {
    const memory = new TokenMemory(60_000);
    for (let i = 0; i <= 10_000; i++) memory.keep(`tg_${i}`, owner, performance.now());
    expect(memory.recall('tg_0')).toBeUndefined();
    expect(memory.recall('tg_1')).toEqual(owner);
    expect(memory.recall('tg_10000')).toEqual(owner);
  });
});
