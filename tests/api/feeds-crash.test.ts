/**
 * A server process killed in the middle of a feed's run (SIGKILL, while it waits for a slow
 * source): nothing of the run is stored, its lease holds other instances off until it expires
 * (FEED_LEASE_SECONDS), and the next run takes over, stores the release and records the dead run
 * as abandoned. Every request stays on 127.0.0.1.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startFakeSdmxSource, type FakeSdmxSource } from '../../server/sdmx/fake-source.js';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { freePort } from '../helpers/ports.js';
import { signedIn } from '../helpers/session.js';

const root = path.resolve(import.meta.dirname, '..', '..');
let t: TestApp;
let source: FakeSdmxSource;

beforeAll(async () => {
  source = await startFakeSdmxSource(0);
  t = await makeTestApp({ FEED_LEASE_SECONDS: '5' }, { seedDemo: true });
  await t.db('series').insert({ code: 'FK_GDP', title: 'Fake GDP (invented)', frequency: 'Q', unit: 'index 2015=100', seasonal_adjustment: 'sa', source: 'fake SDMX source' });
});
afterAll(async () => {
  await t.close();
  await source.close();
});

async function until(check: () => Promise<boolean>, ms: number) {
  const end = Date.now() + ms;
  while (Date.now() < end) {
    if (await check().catch(() => false)) return true;
    await new Promise((r) => setTimeout(r, 200));
  }
  return false;
}

describe('a server killed in the middle of a feed run', () => {
  it('stores nothing, holds the lease until it expires, and the next run takes over', async () => {
    const steward = await signedIn(t, 'steward@demo.test');
    const feed = (await steward.post('/api/v1/feeds').send({ name: 'Slow source', url: `${source.url}/data/EST_STATS,NA_MAIN,1.0/Q.EST.GDP_VOL`, mappings: [{ key: 'Q.EST.GDP_VOL', series: 'FK_GDP' }] }).expect(201)).body;
    const port = await freePort();
    const base = `http://127.0.0.1:${port}`;
    const child: ChildProcess = spawn(process.execPath, ['--import', 'tsx', path.join(root, 'server', 'main.ts')], {
      cwd: root,
      env: { ...process.env, DATABASE_URL: t.testDb.url, PORT: String(port), NODE_ENV: 'test', MAIL_MODE: 'off', LOG_LEVEL: 'silent', PUBLIC_ORIGIN: base, FAKE_SDMX: '0', FEED_SCHEDULER: '0', FEED_LEASE_SECONDS: '5' },
      stdio: 'ignore',
    });
    try {
      expect(await until(async () => (await fetch(`${base}/api/v1/health`)).ok, 30_000)).toBe(true);
      const signIn = await fetch(`${base}/api/v1/auth/sign-in`, { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify({ email: 'steward@demo.test', password: 'tidegauge-demo' }) });
      const cookie = signIn.headers.get('set-cookie')!.split(';')[0];
      source.setFault({ kind: 'slow', ms: 60_000 });
      const run = fetch(`${base}/api/v1/feeds/${feed.id}/run`, { method: 'POST', headers: { Cookie: cookie, Origin: base } }).catch(() => null);
      // The run has taken the lease and is waiting for the source: kill its process.
      expect(await until(async () => (await t.db('feed_runs').where({ feed_id: feed.id, outcome: 'running' })).length === 1, 20_000)).toBe(true);
      child.kill('SIGKILL');
      await new Promise((r) => child.once('exit', r));
      await run;
      source.setFault(null);

      const lease = await t.db('feed_leases').where('feed_id', feed.id).first();
      expect(lease.holder).toMatch(/:\d+:/);
      // Another instance (this process's app) is held off while the dead run's lease lasts.
      const held = await steward.post(`/api/v1/feeds/${feed.id}/run`);
      expect(held.status).toBe(409);
      expect(held.body.error.code).toBe('feed_running');
      expect(await t.db('vintages as v').join('series as s', 's.id', 'v.series_id').where('s.code', 'FK_GDP')).toHaveLength(0);

      // No renewal comes from the dead process: the lease expires and the next run takes over.
      expect(await until(async () => !(await t.db('feed_leases').where('feed_id', feed.id).where('expires_at', '>=', t.db.raw('NOW(3)')).first()), 15_000)).toBe(true);
      const res = await steward.post(`/api/v1/feeds/${feed.id}/run`).expect(200);
      expect(res.body.outcome).toBe('stored');
      const runs = await steward.get(`/api/v1/feeds/${feed.id}/runs`).expect(200);
      expect(runs.body.items.map((r: { outcome: string }) => r.outcome)).toEqual(['stored', 'abandoned']);
      expect(runs.body.items[1].message).toMatch(/stopped before it finished/);
      expect((await t.db('vintages as v').join('series as s', 's.id', 'v.series_id').where('s.code', 'FK_GDP').select('v.number')).map((r) => r.number)).toEqual([1]);
    } finally {
      if (child.exitCode === null) child.kill('SIGKILL');
    }
  }, 120_000);
});
