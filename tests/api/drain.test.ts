/**
 * Graceful drain: a real server process (server/main.ts) with a single database connection gets
 * SIGTERM while requests are in flight and others wait for that connection. It must stop
 * accepting connections at once, give every request in flight a real answer (its result, or a
 * 503 `shutting_down` in the error shape when it waited for the database past the pool's
 * timeout), exit by itself with code 0, and log no error and nothing "aborted".
 */
import { spawn, type ChildProcess } from 'node:child_process';
import http from 'node:http';
import path from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { seedDemo } from '../../seeds/demo.js';
import { createTestDb, type TestDb } from '../helpers/db.js';
import { bigSdmxLoad, insertMonthlySeries, readNdjson } from '../helpers/loads.js';
import { freePort, waitFor } from '../helpers/ports.js';

const root = path.resolve(import.meta.dirname, '..', '..');
let t: TestDb;
let server: { child: ChildProcess; base: string; log: () => string; exited: Promise<number | null>; cookie: string } | undefined;

beforeAll(async () => {
  t = await createTestDb();
  await seedDemo(t.db, { onlyIfEmpty: false, work: false });
  await insertMonthlySeries(t.db, 'D', 300);
}, 120_000);

afterEach(() => {
  if (server && server.child.exitCode === null && server.child.signalCode === null) server.child.kill('SIGKILL');
  server = undefined;
});

afterAll(async () => {
  await t?.drop();
});

/** Starts server/main.ts with one database connection and signs the steward in. */
async function startServer() {
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  let log = '';
  const child = spawn(process.execPath, ['--import', 'tsx', path.join(root, 'server', 'main.ts')], {
    cwd: root,
    env: { ...process.env, DATABASE_URL: t.url, PORT: String(port), PUBLIC_ORIGIN: base, NODE_ENV: 'test', MAIL_MODE: 'off', LOG_LEVEL: 'info', DB_POOL_MAX: '1', SHUTDOWN_GRACE_SECONDS: '60' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout!.on('data', (b) => (log += b));
  child.stderr!.on('data', (b) => (log += b));
  const exited = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)));
  expect(await waitFor(async () => (await fetch(`${base}/api/v1/health`)).ok, 30_000)).toBe(true);
  const signIn = await fetch(`${base}/api/v1/auth/sign-in`, { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify({ email: 'steward@demo.test', password: 'tidegauge-demo' }) });
  expect(signIn.status).toBe(200);
  server = { child, base, log: () => log, exited, cookie: signIn.headers.get('set-cookie')!.split(';')[0] };
  return server;
}

interface Client {
  answers: { status: number; code?: string; items?: number; connection?: string; at: number }[];
  end: string;
}

/** A load-test style client: reads the Catalogue over one keep-alive connection, request after request, until one fails. */
function readLoop(base: string, cookie: string): Promise<Client> {
  const agent = new http.Agent({ keepAlive: true, maxSockets: 1 });
  const answers: Client['answers'] = [];
  const once = () =>
    new Promise<void>((resolve, reject) => {
      const req = http.get(`${base}/api/v1/series`, { agent, headers: { Cookie: cookie } }, (res) => {
        let body = '';
        res.setEncoding('utf8');
        res.on('data', (d) => (body += d));
        res.on('end', () => {
          const json = JSON.parse(body);
          answers.push({ status: res.statusCode!, code: json.error?.code, items: json.items?.length, connection: res.headers.connection, at: Date.now() });
          resolve();
        });
        res.on('error', reject);
      });
      req.on('error', reject);
    });
  return (async () => {
    for (;;) {
      try {
        await once();
      } catch (error) {
        agent.destroy();
        return { answers, end: (error as { code?: string }).code ?? String(error) };
      }
    }
  })();
}

const newConnection = (base: string) =>
  fetch(`${base}/api/v1/health`).then(
    (r) => r.status,
    (e) => (e as { cause?: { code?: string } }).cause?.code ?? String(e),
  );

/**
 * Every read sent got a real answer (data, or 503 shutting_down in the error shape); answers given
 * while draining close their connection; each client's next connection is refused. Returns the
 * answers given after the signal.
 */
function checkClients(results: Client[], signalAt: number) {
  const after: Client['answers'] = [];
  for (const c of results) {
    expect(c.end).toBe('ECONNREFUSED');
    for (const a of c.answers) {
      if (a.status === 200) expect(a.items).toBeGreaterThan(300);
      else expect([a.status, a.code]).toEqual([503, 'shutting_down']);
      if (a.at > signalAt + 50) {
        after.push(a);
        expect(a.connection).toBe('close');
      }
    }
  }
  return after;
}

/** The process exited by itself with 0, said why, and logged no error: nothing was aborted by the pool closing. */
async function checkCleanExit(s: NonNullable<typeof server>) {
  expect(await s.exited).toBe(0);
  const lines = s.log().split('\n').filter((l) => l.startsWith('{')).map((l) => JSON.parse(l) as { level: number; msg: string });
  expect(lines.some((l) => /^SIGTERM: closing/.test(l.msg))).toBe(true);
  expect(lines.filter((l) => l.level >= 50)).toEqual([]);
  // (A client that hangs up is logged at info as "request aborted"; a request cut off by the pool is an error "aborted".)
  expect(s.log()).not.toMatch(/"message":"aborted"/);
}

/**
 * The test holds a series row in a transaction of its own; the server's update of that series
 * then waits for it on the server's only connection, until `holder.commit()`.
 */
async function heldUpdate(s: NonNullable<typeof server>, code: string, title: string) {
  const [series] = await t.db('series').where('code', code).select('id');
  const holder = await t.db.transaction();
  await holder('series').where('id', series.id).forUpdate().select('id');
  const update = fetch(`${s.base}/api/v1/series/${series.id}`, { method: 'PATCH', headers: { Cookie: s.cookie, Origin: s.base, 'Content-Type': 'application/json' }, body: JSON.stringify({ title }) });
  await new Promise((r) => setTimeout(r, 300));
  return { holder, update };
}

describe('SIGTERM with requests in flight', () => {
  it('lets a large load being stored finish, answers the reads queued behind it, refuses new connections', async () => {
    const s = await startServer();
    const form = new FormData();
    form.append('file', new Blob([bigSdmxLoad({ prefix: 'D', count: 300, months: 600 })]), 'drain.csv');
    const clients: Promise<Client>[] = [];
    let signalAt = 0;
    let refusedNew: unknown = null;
    const load = await fetch(`${s.base}/api/v1/loads`, { method: 'POST', headers: { Cookie: s.cookie, Origin: s.base, Accept: 'application/x-ndjson' }, body: form });
    const loaded = await readNdjson(load, /"phase":"storing","done":[1-9]/, async () => {
      // The load holds the only connection; the reads queue behind it.
      for (let i = 0; i < 6; i++) clients.push(readLoop(s.base, s.cookie));
      await new Promise((r) => setTimeout(r, 300));
      signalAt = Date.now();
      s.child.kill('SIGTERM');
      await new Promise((r) => setTimeout(r, 300));
      refusedNew = await newConnection(s.base);
    });
    expect(loaded.matched).toBe(true);
    expect(refusedNew).toBe('ECONNREFUSED');
    // The load in flight finished and was stored whole.
    expect(loaded.last.type).toBe('result');
    expect(loaded.last.result.vintages).toHaveLength(300);
    const [{ n }] = await t.db('observations as o').join('vintages as v', 'v.id', 'o.vintage_id').join('series as ser', 'ser.id', 'v.series_id').where('ser.code', 'like', 'D\\_%').count({ n: '*' });
    expect(Number(n)).toBe(300 * 600);
    expect(checkClients(await Promise.all(clients), signalAt).length).toBeGreaterThanOrEqual(6);
    await checkCleanExit(s);
  }, 120_000);

  it('answers 503 shutting_down to requests that wait for a database connection past the pool timeout, and still lets the write holding it finish', async () => {
    const s = await startServer();
    const { holder, update } = await heldUpdate(s, 'D_001', 'Renamed while the server drains');
    const clients = Array.from({ length: 4 }, () => readLoop(s.base, s.cookie));
    await new Promise((r) => setTimeout(r, 300));
    const signalAt = Date.now();
    s.child.kill('SIGTERM');
    await new Promise((r) => setTimeout(r, 300));
    expect(await newConnection(s.base)).toBe('ECONNREFUSED');
    // Past the pool's 5 s acquire timeout the waiting reads have their 503; then the row is freed.
    await new Promise((r) => setTimeout(r, 6000));
    await holder.commit();
    const updated = await update;
    expect(updated.status).toBe(200);
    expect((await updated.json()).title).toBe('Renamed while the server drains');
    const after = checkClients(await Promise.all(clients), signalAt);
    expect(after.filter((a) => a.status === 503)).toHaveLength(4);
    await checkCleanExit(s);
  }, 120_000);

  it('finishes the work of requests whose clients went away (the end of a load test) before closing the pool', async () => {
    const s = await startServer();
    const { holder, update } = await heldUpdate(s, 'D_002', 'Renamed at the end of a load test');
    // Twenty new series queue behind the update for the only connection; then their clients hang up.
    const gone = Array.from({ length: 20 }, (_, i) => {
      const body = JSON.stringify({ code: `GONE_${i}`, title: `Sent by a client that went away ${i}`, frequency: 'Q', unit: 'index', seasonalAdjustment: 'sa' });
      const req = http.request(`${s.base}/api/v1/series`, { method: 'POST', headers: { Cookie: s.cookie, Origin: s.base, 'Content-Type': 'application/json', 'Content-Length': Buffer.byteLength(body) } });
      req.on('error', () => {});
      req.end(body);
      return req;
    });
    await new Promise((r) => setTimeout(r, 300));
    for (const req of gone) req.destroy();
    await new Promise((r) => setTimeout(r, 100));
    s.child.kill('SIGTERM');
    await new Promise((r) => setTimeout(r, 1500));
    await holder.commit();
    expect((await update).status).toBe(200);
    await checkCleanExit(s);
    // Their work was done, not cut off when the pool closed.
    expect(Number((await t.db('series').where('code', 'like', 'GONE\\_%').count({ n: '*' }))[0].n)).toBe(20);
  }, 120_000);
});
