/**
 * Changing, pausing and removing a feed (PATCH and DELETE /feeds/:id), against the local fake
 * SDMX source: changes checked as at registration and refused whole, header values used but never
 * answered or audited, a paused feed skipped by the scheduler and, once resumed, run at its next
 * scheduled time rather than at once for a time that passed while it was paused; a removed feed
 * takes its run records with it and leaves the vintages it stored; never while it runs.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createBackground } from '../../server/lib/background.js';
import { createLogger } from '../../server/lib/logger.js';
import { createMailer } from '../../server/mail/mailer.js';
import { startFakeSdmxSource, type FakeSdmxSource } from '../../server/sdmx/fake-source.js';
import { tickFeeds } from '../../server/services/feeds/scheduler.js';
import type { FeedDeps } from '../../server/services/feeds/run.js';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';

let t: TestApp;
let source: FakeSdmxSource;
let steward: Awaited<ReturnType<typeof signedIn>>;
let deps: FeedDeps;

beforeAll(async () => {
  source = await startFakeSdmxSource(0);
  t = await makeTestApp({}, { seedDemo: true });
  steward = await signedIn(t, 'steward@demo.test');
  for (const [code, f] of [['FM_GDP', 'Q'], ['FM_HOURS', 'Q']]) {
    await steward.post('/api/v1/series').send({ code, title: `Fake ${code} (invented)`, frequency: f, unit: 'index', seasonalAdjustment: 'sa', source: 'fake SDMX source' }).expect(201);
  }
  const logger = createLogger('silent');
  deps = { db: t.db, config: t.config, mailer: createMailer(t.config, logger, t.mail.port), background: createBackground(logger), logger };
});
afterAll(async () => {
  await t.close();
  await source.close();
});

const flowUrl = (key: string) => `${source.url}/data/EST_STATS,NA_MAIN,1.0/${key}`;
const register = async (name: string, over: Record<string, unknown> = {}) =>
  (await steward.post('/api/v1/feeds').send({ name, url: flowUrl('Q.EST.GDP_VOL'), mappings: [{ key: 'Q.EST.GDP_VOL', series: 'FM_GDP' }], ...over }).expect(201)).body;
const stored = async (id: number) => t.db('feeds').where({ id }).first();

describe('changing a feed', () => {
  it('changes what is sent, keeps the rest, uses the new header value and never answers or audits it', async () => {
    const feed = await register('Estuary accounts', { schedule: '30 9 * * 1-5', headers: [{ name: 'X-Api-Key', value: 'old-key' }] });
    const res = await steward
      .patch(`/api/v1/feeds/${feed.id}`)
      .send({ url: flowUrl('Q.EST.GDP_VOL+HOURS'), mappings: [{ key: 'Q.EST.GDP_VOL', series: 'fm_gdp' }, { key: 'Q.EST.HOURS', series: 'FM_HOURS' }], schedule: '0 8 * * *', headers: [{ name: 'X-Api-Key', value: 'new-key' }] })
      .expect(200);
    expect(res.body).toMatchObject({ id: feed.id, name: 'Estuary accounts', scheduleWords: 'At 08:00 (UTC)', enabled: true, headers: [{ name: 'X-Api-Key' }] });
    expect(res.body.mappings).toEqual([{ key: 'Q.EST.GDP_VOL', series: 'FM_GDP' }, { key: 'Q.EST.HOURS', series: 'FM_HOURS' }]);
    expect(JSON.stringify(res.body)).not.toContain('new-key');
    const audit = await t.db('audit_log').where({ action: 'feed.update', target_id: String(feed.id) }).first();
    expect(JSON.parse(audit.details).fields.sort()).toEqual(['headers', 'mappings', 'schedule', 'url']);
    expect(audit.details).not.toContain('new-key');
    const run = await steward.post(`/api/v1/feeds/${feed.id}/run`).expect(200);
    expect(run.body.outcome).toBe('stored');
    expect(run.body.vintages.map((v: { code: string }) => v.code).sort()).toEqual(['FM_GDP', 'FM_HOURS']);
    expect(source.requests().at(-1)!.headers['x-api-key']).toBe('new-key');
    // On demand only: a schedule of null.
    expect((await steward.patch(`/api/v1/feeds/${feed.id}`).send({ schedule: null }).expect(200)).body.scheduleWords).toBe('On demand only (Run now)');
  });

  it('refuses a change it cannot run, saying what to fix, and changes nothing', async () => {
    const feed = await register('Refusals', { schedule: '30 9 * * *' });
    await register('Taken name');
    const before = await stored(feed.id);
    for (const [body, code, message] of [
      [{}, 'invalid_input', /at least one thing to change/],
      [{ colour: 'blue' }, 'invalid_input', /colour/],
      [{ schedule: '99 9 * * *' }, 'invalid_input', /schedule/i],
      [{ mappings: [{ key: 'Q.EST.GDP_VOL', series: 'NO_SUCH' }] }, 'unknown_series', /NO_SUCH; define it first/],
      [{ name: 'Taken name' }, 'duplicate_name', /already called “Taken name”/],
      [{ stewardId: (await t.db('users').where('email', 'viewer@demo.test').first()).id }, 'not_a_steward', /steward role/],
    ] as const) {
      const res = await steward.patch(`/api/v1/feeds/${feed.id}`).send(body);
      expect([res.status, res.body.error?.code], JSON.stringify(res.body)).toEqual([400, code]);
      expect(JSON.stringify(res.body.error)).toMatch(message);
    }
    expect(await stored(feed.id)).toEqual(before);
    expect((await steward.patch('/api/v1/feeds/999999').send({ enabled: false }).expect(404)).body.error.code).toBe('not_found');
  });
});

describe('pausing a feed', () => {
  it('is skipped by the scheduler while paused, and once resumed runs at its next time, not at once for one it missed', async () => {
    const feed = await register('Hourly', { schedule: '0 * * * *' });
    await t.db('feeds').where('id', feed.id).update({ created_at: t.db.raw('NOW(3) - INTERVAL 1 DAY') });
    // A change that sends enabled: true to a feed that runs already does not skip its due time.
    await steward.patch(`/api/v1/feeds/${feed.id}`).send({ name: 'Hourly feed', enabled: true }).expect(200);
    expect(await tickFeeds(deps, new Date())).toContain(feed.id);
    const ranBefore = (await t.db('feed_runs').where('feed_id', feed.id)).length;
    const paused = (await steward.patch(`/api/v1/feeds/${feed.id}`).send({ enabled: false }).expect(200)).body;
    expect([paused.enabled, paused.nextRunAt]).toEqual([false, null]);
    const now = new Date();
    expect(await tickFeeds(deps, now)).not.toContain(feed.id);
    const resumed = (await steward.patch(`/api/v1/feeds/${feed.id}`).send({ enabled: true }).expect(200)).body;
    expect(resumed.enabled).toBe(true);
    expect(new Date(resumed.nextRunAt).getTime()).toBeGreaterThan(now.getTime());
    // This hour's time passed while the feed was paused: not run now.
    expect(await tickFeeds(deps, now)).not.toContain(feed.id);
    expect(await t.db('feed_runs').where('feed_id', feed.id)).toHaveLength(ranBefore);
    // The next hour's is.
    const next = new Date(Math.floor(now.getTime() / 3_600_000 + 1) * 3_600_000);
    expect(await tickFeeds(deps, next)).toContain(feed.id);
  });
});

describe('removing a feed', () => {
  it('removes the feed and its runs, keeps the vintages it stored, and refuses while it runs', async () => {
    const feed = await register('To remove', { mappings: [{ key: 'Q.EST.HOURS', series: 'FM_HOURS' }], url: flowUrl('Q.EST.HOURS') });
    await steward.post(`/api/v1/feeds/${feed.id}/run`).expect(200);
    const vintages = Number((await t.db('vintages as v').join('series as s', 's.id', 'v.series_id').where('s.code', 'FM_HOURS').count({ n: '*' }))[0].n);
    expect(vintages).toBeGreaterThan(0);
    // A run holds the lease: refused, nothing removed.
    await t.db('feed_leases').where('feed_id', feed.id).update({ holder: 'another-instance', expires_at: t.db.raw('NOW(3) + INTERVAL 60 SECOND') });
    const busy = await steward.delete(`/api/v1/feeds/${feed.id}`).expect(409);
    expect(busy.body.error).toMatchObject({ code: 'feed_running', message: expect.stringMatching(/running now; delete it once the run has finished/) });
    expect(await stored(feed.id)).toBeTruthy();
    await t.db('feed_leases').where('feed_id', feed.id).update({ holder: null, expires_at: null });
    await steward.delete(`/api/v1/feeds/${feed.id}`).expect(204);
    expect(await stored(feed.id)).toBeUndefined();
    expect(await t.db('feed_runs').where('feed_id', feed.id)).toHaveLength(0);
    expect(Number((await t.db('vintages as v').join('series as s', 's.id', 'v.series_id').where('s.code', 'FM_HOURS').count({ n: '*' }))[0].n)).toBe(vintages);
    expect(await t.db('audit_log').where({ action: 'feed.delete', target_id: String(feed.id) }).first()).toBeTruthy();
    await steward.delete(`/api/v1/feeds/${feed.id}`).expect(404);
    const economist = await signedIn(t, 'economist@demo.test');
    await economist.delete(`/api/v1/feeds/${feed.id}`).expect(403);
  });
});
