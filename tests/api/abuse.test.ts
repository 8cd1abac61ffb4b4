/**
 * Abuse of compute, logs, versions and the fake mail server (issue 17): large decompositions run
 * off the request thread under a per-account budget; a request the library cannot solve is a 4xx;
 * logs never keep invitation or reset secrets; a missing asset is a 404; only administrators see
 * versions; the fake mail server never sends to a port someone else holds.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { Writable } from 'node:stream';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decompose } from '../../server/analysis/index.js';
import { decomposeWith } from '../../server/analysis/decompose.js';
import { SingularSystemError } from '../../server/analysis/banded.js';
import { hp } from '../../server/analysis/methods/hp.js';
import { createApp } from '../../server/app.js';
import { createLogger } from '../../server/lib/logger.js';
import { seedDemo } from '../../seeds/demo.js';
import { listen, makeTestApp, type TestApp } from '../helpers/app.js';
import { createTestDb } from '../helpers/db.js';
import { signedIn } from '../helpers/session.js';

const root = path.resolve(import.meta.dirname, '..', '..');
const MILLION = 1_000_000;
const wavy = (n: number) => Array.from({ length: n }, (_, i) => 100 + 0.01 * i + 3 * Math.sin(i / 20) + Math.cos(i * 1.7));

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
});
afterAll(async () => {
  await t.close();
});

const tokenOf = async (email: string) => (await (await signedIn(t, email)).post('/api/v1/tokens').send({ name: 'abuse' }).expect(201)).body.token as string;

describe('large decompositions', () => {
  it('run off the request thread, never holding it for long, and their computing time is charged to the account', async () => {
    // ℓ1 trend filtering on 100 000 values (a size under the heavy threshold) takes seconds of
    // arithmetic (4.6 s measured on the 2-core test machine). The app runs in this process: had it
    // computed on the request thread, the event loop would have stood still that long. Off it, the
    // longest stall is reading the 1.5 MB body and sending the answer.
    const own = await makeTestApp({ HEAVY_UNITS_PER_MINUTE: '1' }, { seedDemo: true });
    try {
      const agent = await signedIn(own, 'economist@demo.test');
      const stalls = monitorEventLoopDelay({ resolution: 10 });
      const started = performance.now();
      stalls.enable();
      const res = await agent.post('/api/v1/decompose').send({ frequency: 'M', values: wavy(100_000), method: 'l1-trend', params: { lambda: 10 } });
      stalls.disable();
      const took = performance.now() - started;
      expect(res.status).toBe(200);
      expect(res.body.trend).toHaveLength(100_000);
      expect(res.body.diagnostics.converged).toBe(true);
      const longest = stalls.max / 1e6;
      expect(took).toBeGreaterThan(1_000); // slow work…
      expect(longest, `longest stall ${longest.toFixed(0)} ms of ${took.toFixed(0)} ms`).toBeLessThan(Math.min(1_000, took / 2)); // …that never held the request thread
      // Its seconds of computation were charged: a unit per started second the worker computed
      // (the answer's Server-Timing says how long; under a second costs nothing, as the request
      // is under the heavy size). How long depends on the machine, so the charge is checked
      // against the time the server reports.
      const dur = Number(/compute;dur=([\d.]+)/.exec(String(res.headers['server-timing']))?.[1]);
      expect(dur).toBeGreaterThan(0);
      const charged = Number((await own.db('heavy_requests').sum({ units: 'units' }).first())!.units ?? 0);
      expect(charged).toBe(dur >= 1000 ? Math.ceil(dur / 1000) : 0);
      if (charged >= 1) {
        // The account's budget (1 unit) is spent.
        const refused = await agent.post('/api/v1/decompose').send({ frequency: 'Q', values: wavy(40), method: 'l1-trend', params: { lambda: 10 } }).expect(429);
        expect(refused.body.error.code).toBe('too_many_heavy_requests');
      }
    } finally {
      await own.close();
    }
  }, 120_000);

  it('answer 1 000 000 values (the API’s limit) with the same numbers as the library', async () => {
    const { server, url } = await listen(t.app);
    try {
      const token = await tokenOf('economist@demo.test');
      const values = wavy(MILLION);
      const res = await fetch(`${url}/api/v1/decompose`, { method: 'POST', headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' }, body: JSON.stringify({ frequency: 'M', values, method: 'hp' }) });
      expect(res.status).toBe(200);
      const answer = await res.json();
      const lib = decompose({ frequency: 'M', values, method: 'hp' });
      expect(answer.cycle).toHaveLength(MILLION);
      for (const i of [0, 123_456, MILLION - 1]) expect(answer.trend[i]).toBe(lib.trend[i]);
    } finally {
      server.close();
    }
  }, 120_000);

  it('answer the same numbers as the library', async () => {
    const agent = await signedIn(t, 'economist@demo.test');
    const values = wavy(150_000);
    const res = await agent.post('/api/v1/decompose').send({ frequency: 'M', values, method: 'hp', params: { lambda: 14400 } }).expect(200);
    const lib = decompose({ frequency: 'M', values, method: 'hp', params: { lambda: 14400 } });
    expect(res.headers['content-type']).toMatch(/application\/json/);
    expect(res.body.params).toEqual({ lambda: 14400 });
    for (const i of [0, 1, 77_777, 149_999]) expect(res.body.trend[i]).toBe(lib.trend[i]);
    expect(res.body.warnings).toEqual(lib.warnings);
  }, 60_000);

  it('are limited per account: beyond the budget, 429 with Retry-After; other accounts go on', async () => {
    const small = await makeTestApp({ HEAVY_UNITS_PER_MINUTE: '3' }, { seedDemo: true });
    try {
      const a = await signedIn(small, 'economist@demo.test');
      const b = await signedIn(small, 'viewer@demo.test');
      const body = { frequency: 'M', values: wavy(300_000), method: 'hp' }; // 3 units of 100 000 values
      await a.post('/api/v1/decompose').send(body).expect(200);
      const refused = await a.post('/api/v1/decompose').send(body).expect(429);
      expect(refused.body.error.code).toBe('too_many_heavy_requests');
      expect(Number(refused.headers['retry-after'])).toBeGreaterThan(0);
      expect(Number(refused.headers['retry-after'])).toBeLessThanOrEqual(60);
      // A large batch counts too.
      const batch = await a.post('/api/v1/decompose/batch').send({ items: Array.from({ length: 3 }, () => ({ frequency: 'M', values: wavy(50_000), method: 'hp' })) }).expect(429);
      expect(batch.body.error.code).toBe('too_many_heavy_requests');
      // Small requests are never counted: after several, another account still has its whole
      // budget for one large request. (Whether a small request of an account over its budget is
      // refused depends on how long the large one took on this machine, so it is not asserted.)
      for (let i = 0; i < 4; i++) await b.post('/api/v1/decompose').send({ frequency: 'Q', values: wavy(200), method: 'hp' }).expect(200);
      await b.post('/api/v1/decompose').send(body).expect(200);
    } finally {
      await small.close();
    }
  }, 120_000);

  it('a request the library cannot solve is a 4xx that says what to change (ℓ1 trend on 200 000 values)', async () => {
    const agent = await signedIn(t, 'economist@demo.test');
    const res = await agent.post('/api/v1/decompose').send({ frequency: 'M', values: wavy(200_000), method: 'l1-trend', params: { lambda: 10 } }).expect(400);
    expect(res.body.error.code).toBe('series_too_long');
    expect(res.body.error.message).toMatch(/at most 100,000 observations/);
    expect(res.body.error.message).toMatch(/Hodrick–Prescott/);
  }, 60_000);

  it('a linear system the solver cannot factor is refused as bad input, whatever the method', () => {
    const failing = { ...hp, run: () => { throw new SingularSystemError(41); } };
    let caught: unknown;
    try {
      decomposeWith(failing as never, { frequency: 'Q', values: wavy(100), method: 'hp' });
    } catch (error) {
      caught = error;
    }
    expect((caught as { code?: string }).code).toBe('unsolvable');
    expect((caught as Error).message).toMatch(/shorter series, a smaller smoothing parameter, or another method/);
  });
});

/** An app that logs at info level into memory, serving a small built client from `staticDir`. */
function loggingApp(staticDir: string) {
  let text = '';
  const sink = new Writable({
    write(chunk, _enc, done) {
      text += chunk.toString();
      done();
    },
  });
  const config = { ...t.config, logLevel: 'info', staticDir };
  const app = createApp({ config, db: t.db, logger: createLogger('info', sink), mailbox: t.mail });
  return { app, log: () => text };
}

describe('logs and static files', () => {
  let staticDir: string;
  beforeAll(() => {
    staticDir = fs.mkdtempSync(path.join(os.tmpdir(), 'tg-static-'));
    fs.mkdirSync(path.join(staticDir, 'assets'));
    fs.writeFileSync(path.join(staticDir, 'index.html'), '<!doctype html><title>Tidegauge</title>');
    fs.writeFileSync(path.join(staticDir, 'assets', 'app.js'), 'console.log(1)');
  });
  afterAll(() => fs.rmSync(staticDir, { recursive: true, force: true }));

  it('never keep the secret of an invitation or a reset link', async () => {
    const { app, log } = loggingApp(staticDir);
    try {
      const secrets = ['inviteSecret1234567890', 'resetSecret1234567890', 'lookupSecret1234567890', 'querySecret1234567890'];
      await request(app).get(`/invite/${secrets[0]}`).expect(200);
      await request(app).get(`/reset-password/${secrets[1]}`).expect(200);
      await request(app).get(`/api/v1/invitations/lookup/${secrets[2]}`);
      await request(app).get(`/reset-password?token=${secrets[3]}`).expect(200);
      const text = log();
      expect(text).toMatch(/\/invite\/\[redacted\]/);
      expect(text).toMatch(/invitations\/lookup\/\[redacted\]/);
      for (const s of secrets) expect(text).not.toContain(s);
    } finally {
      await app.locals.shutdown();
    }
  });

  it('answer a missing asset with 404, logging no error and no filesystem path', async () => {
    const { app, log } = loggingApp(staticDir);
    try {
      await request(app).get('/assets/app.js').expect(200);
      const res = await request(app).get('/assets/index-deadbeef.js').expect(404);
      expect(res.text).not.toContain(staticDir);
      expect(log()).not.toContain(staticDir);
      expect(log()).not.toMatch(/"level":50/);
    } finally {
      await app.locals.shutdown();
    }
  });
});

describe('versions', () => {
  it('are shown by /health to signed-in administrators only', async () => {
    const anon = (await request(t.app).get('/api/v1/health').expect(200)).body;
    expect(anon).toEqual({ status: 'ok', db: { ok: true } });
    for (const role of ['viewer', 'steward', 'economist', 'editor']) {
      const body = (await (await signedIn(t, `${role}@demo.test`)).get('/api/v1/health').expect(200)).body;
      expect(body.version, role).toBeUndefined();
      expect(body.db.version, role).toBeUndefined();
    }
    const admin = (await (await signedIn(t, 'admin@demo.test')).get('/api/v1/health').expect(200)).body;
    expect(admin.version).toMatch(/^\d+\.\d+\.\d+/);
    expect(admin.db.version).toMatch(/MariaDB/);
    const byToken = (await request(t.app).get('/api/v1/health').set('Authorization', `Bearer ${await tokenOf('admin@demo.test')}`).expect(200)).body;
    expect(byToken.db.version).toMatch(/MariaDB/);
    // The OpenAPI document names the API's version, not the software's.
    expect((await request(t.app).get('/api/v1/openapi.json').expect(200)).body.info.version).toBe('1');
  });
});

describe('the fake mail server', () => {
  it('takes a free port when its own is taken, says which, and never mails whoever holds the port', async () => {
    // Someone else listens on the configured port and notes every connection.
    const connections: string[] = [];
    const squatter = net.createServer((socket) => {
      connections.push('connected');
      socket.destroy();
    });
    await new Promise<void>((r) => squatter.listen(0, '127.0.0.1', () => r()));
    const taken = (squatter.address() as net.AddressInfo).port;
    const db = await createTestDb();
    await seedDemo(db.db, { onlyIfEmpty: false });
    const appPort = await new Promise<number>((resolve) => {
      const s = net.createServer().listen(0, '127.0.0.1', () => {
        const p = (s.address() as net.AddressInfo).port;
        s.close(() => resolve(p));
      });
    });
    const base = `http://127.0.0.1:${appPort}`;
    let out = '';
    const child = spawn(process.execPath, ['--import', 'tsx', path.join(root, 'server', 'main.ts')], {
      cwd: root,
      env: { ...process.env, DATABASE_URL: db.url, PORT: String(appPort), NODE_ENV: 'test', MAIL_MODE: 'fake', FAKE_SMTP_PORT: String(taken), LOG_LEVEL: 'warn', PUBLIC_ORIGIN: base },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    child.stdout!.on('data', (c) => (out += c));
    child.stderr!.on('data', (c) => (out += c));
    try {
      const deadline = Date.now() + 30_000;
      while (Date.now() < deadline && !(await fetch(`${base}/api/v1/health`).then((r) => r.ok, () => false))) await new Promise((r) => setTimeout(r, 200));
      const said = new RegExp(`Port ${taken} \\(FAKE_SMTP_PORT\\) is taken.*listens on 127\\.0\\.0\\.1:(\\d+)`).exec(out);
      expect(said, out).not.toBeNull();
      expect(Number(said![1])).not.toBe(taken);
      // A reset mail goes to the fake server the app really runs, and reaches the Mailbox.
      await fetch(`${base}/api/v1/auth/password-reset`, { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify({ email: 'viewer@demo.test' }) });
      const signIn = await fetch(`${base}/api/v1/auth/sign-in`, { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify({ email: 'admin@demo.test', password: 'tidegauge-demo' }) });
      const cookie = signIn.headers.get('set-cookie')!.split(';')[0];
      let found = false;
      for (let i = 0; i < 50 && !found; i++) {
        const box = await (await fetch(`${base}/api/v1/dev/mailbox`, { headers: { Cookie: cookie } })).json();
        found = box.items.some((m: { to: string[] }) => m.to.includes('viewer@demo.test'));
        if (!found) await new Promise((r) => setTimeout(r, 200));
      }
      expect(found).toBe(true);
      expect(connections).toEqual([]);
    } finally {
      child.kill('SIGTERM');
      await new Promise((r) => child.once('exit', r));
      squatter.close();
      await db.drop();
    }
  }, 90_000);
});
