/**
 * Feeds against the local fake SDMX source and the fake mail server: registering (with clear
 * refusals that store nothing), runs that store a vintage per changed series (values as the
 * source published them, vintage metadata kept), nothing new, failures that store nothing and mail
 * the steward, the lease (one run at a time; a dead run's lease expires) and the scheduler (a
 * scheduled time runs once across two instances). Every request stays on 127.0.0.1.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app.js';
import { createBackground } from '../../server/lib/background.js';
import { createLogger } from '../../server/lib/logger.js';
import { createMailer } from '../../server/mail/mailer.js';
import { FAKE_SERIES, fakeRelease } from '../../server/sdmx/fake-data.js';
import { startFakeSdmxSource, type FakeSdmxSource } from '../../server/sdmx/fake-source.js';
import { tickFeeds } from '../../server/services/feeds/scheduler.js';
import type { FeedDeps } from '../../server/services/feeds/run.js';
import { seedDemoFeed } from '../../seeds/demo-feeds.js';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { ndjsonEvents } from '../helpers/parsers.js';
import { signedIn } from '../helpers/session.js';

let t: TestApp;
let source: FakeSdmxSource;
let steward: Awaited<ReturnType<typeof signedIn>>;
let deps: FeedDeps;
const [GDP, HOURS, RETAIL] = FAKE_SERIES;

beforeAll(async () => {
  source = await startFakeSdmxSource(0);
  t = await makeTestApp({}, { seedDemo: true });
  steward = await signedIn(t, 'steward@demo.test');
  for (const [code, f, unit] of [['FK_GDP', 'Q', GDP.unit], ['FK_HOURS', 'Q', HOURS.unit], ['FK_RETAIL', 'M', RETAIL.unit]]) {
    await steward.post('/api/v1/series').send({ code, title: `Fake ${code} (invented)`, frequency: f, unit, seasonalAdjustment: 'sa', source: 'fake SDMX source' }).expect(201);
  }
  const logger = createLogger('silent');
  deps = { db: t.db, config: t.config, mailer: createMailer(t.config, logger, t.mail.port), background: createBackground(logger), logger };
});
afterAll(async () => {
  await t.close();
  await source.close();
});

const flowUrl = (key: string, query = '') => `${source.url}/data/EST_STATS,NA_MAIN,1.0/${key}${query}`;
const counts = async () => ({
  vintages: Number((await t.db('vintages').count({ n: '*' }))[0].n),
  observations: Number((await t.db('observations').count({ n: '*' }))[0].n),
  loads: Number((await t.db('loads').count({ n: '*' }))[0].n),
});
const observations = async (code: string, number: number) => {
  const v = await t.db('vintages as v').join('series as s', 's.id', 'v.series_id').where({ 's.code': code, 'v.number': number }).first('v.id');
  const rows = await t.db('observations').where('vintage_id', v.id).orderBy('period');
  return { periods: rows.map((r) => r.period), values: rows.map((r) => Number(r.value)) };
};

let csvFeed: number;
let xmlFeed: number;

describe('registering a feed', () => {
  it('refuses what it cannot run, saying what to fix, and stores nothing', async () => {
    const good = { name: 'x', url: flowUrl('Q.EST.GDP_VOL'), mappings: [{ key: 'Q.EST.GDP_VOL', series: 'FK_GDP' }] };
    const cases: [object, RegExp][] = [
      [{ ...good, schedule: '61 9 * * *' }, /minute/i],
      [{ ...good, schedule: '0 9 * *' }, /five fields/],
      [{ ...good, url: 'ftp://example.invalid/data/X/Y' }, /https?:\/\//],
      [{ ...good, url: `${source.url}/dataflow/ALL` }, /data\/\{flow\}\/\{key\}/],
      [{ ...good, mappings: [] }, /at least one key/],
      [{ ...good, mappings: [good.mappings[0], good.mappings[0]] }, /listed twice/],
      [{ ...good, headers: [{ name: 'Host', value: 'x' }] }, /set by the connection/],
      [{ ...good, mappings: [{ key: 'Q.EST.GDP_VOL', series: 'NO_SUCH' }] }, /No series in the Catalogue has the code NO_SUCH/],
    ];
    for (const [body, message] of cases) {
      const res = await steward.post('/api/v1/feeds').send(body);
      expect(res.status, JSON.stringify(res.body)).toBe(400);
      expect(JSON.stringify(res.body.error)).toMatch(message);
    }
    expect(Number((await t.db('feeds').count({ n: '*' }))[0].n)).toBe(0);
  });

  it('registers feeds: the schedule in words, header names but never their values', async () => {
    const res = await steward
      .post('/api/v1/feeds')
      .send({ name: 'Estuary national accounts', url: flowUrl('Q.EST.GDP_VOL+HOURS'), schedule: '30 9 * * 1-5', headers: [{ name: 'X-Api-Key', value: 'secret-key-1' }], mappings: [{ key: 'Q.EST.GDP_VOL', series: 'FK_GDP' }, { key: 'Q.EST.HOURS', series: 'fk_hours' }] })
      .expect(201);
    expect(res.body.scheduleWords).toBe('At 09:30, Monday through Friday (UTC)');
    expect(res.body.headers).toEqual([{ name: 'X-Api-Key' }]);
    expect(res.body.mappings[1]).toEqual({ key: 'Q.EST.HOURS', series: 'FK_HOURS' });
    expect(JSON.stringify(res.body)).not.toContain('secret-key-1');
    expect(new Date(res.body.nextRunAt).getUTCHours()).toBe(9);
    csvFeed = res.body.id;
    const xml = await steward.post('/api/v1/feeds').send({ name: 'Estuary retail (SDMX-ML)', url: flowUrl('M.EST.RETAIL_VOL', '?format=xml'), mappings: [{ key: 'M.EST.RETAIL_VOL', series: 'FK_RETAIL' }] }).expect(201);
    expect(xml.body.scheduleWords).toBe('On demand only (Run now)');
    xmlFeed = xml.body.id;
    const list = await steward.get('/api/v1/feeds').expect(200);
    expect(list.body.items.map((f: { name: string }) => f.name)).toEqual(['Estuary national accounts', 'Estuary retail (SDMX-ML)']);
    expect(JSON.stringify(list.body)).not.toContain('secret-key-1');
  });
});

describe('running a feed', () => {
  it('stores a vintage per series with the values the source published, through the load path', async () => {
    source.requireHeader('X-Api-Key', 'secret-key-1');
    const res = await steward.post(`/api/v1/feeds/${csvFeed}/run`).expect(200);
    source.requireHeader(null);
    expect(res.body.outcome).toBe('stored');
    expect(res.body.vintages.map((v: { code: string; number: number }) => `${v.code} ${v.number}`).sort()).toEqual(['FK_GDP 1', 'FK_HOURS 1']);
    expect(await observations('FK_GDP', 1)).toEqual(fakeRelease(GDP, 1));
    expect(await observations('FK_HOURS', 1)).toEqual(fakeRelease(HOURS, 1));
    const load = await t.db('loads').where('id', res.body.loadId).first();
    expect(load.format).toBe('sdmx-csv');
    expect(Number((await t.db('vintage_metadata as m').join('vintages as v', 'v.id', 'm.vintage_id').where('v.load_id', load.id).count({ n: '*' }))[0].n)).toBe(2);
    expect(source.requests().at(-1)!.headers.accept).toMatch(/vnd\.sdmx\.data\+csv/);
  });

  it('reads SDMX-ML 2.1 answers as well', async () => {
    const res = await steward.post(`/api/v1/feeds/${xmlFeed}/run`).expect(200);
    expect(res.body.outcome).toBe('stored');
    expect((await t.db('loads').where('id', res.body.loadId).first()).format).toBe('sdmx-ml');
    expect(await observations('FK_RETAIL', 1)).toEqual(fakeRelease(RETAIL, 1));
  });

  it('stores nothing when nothing changed, and says so', async () => {
    const before = await counts();
    const res = await steward.post(`/api/v1/feeds/${csvFeed}/run`).expect(200);
    expect(res.body.outcome).toBe('unchanged');
    expect(res.body.message).toMatch(/Nothing new/);
    expect(await counts()).toEqual(before);
  });

  it('after a new release, stores the revised series as new vintages, with progress on request', async () => {
    source.publish();
    const res = await steward.post(`/api/v1/feeds/${csvFeed}/run`).set('Accept', 'application/x-ndjson').expect(200);
    const events = ndjsonEvents(res.text);
    expect(events.filter((e) => e.type === 'progress').map((e) => e.phase)).toEqual(expect.arrayContaining(['fetching', 'storing']));
    const run = events.at(-1)!.result;
    expect(run.outcome).toBe('stored');
    expect(run.vintages.map((v: { number: number }) => v.number)).toEqual([2, 2]);
    expect(await observations('FK_GDP', 2)).toEqual(fakeRelease(GDP, 2));
  });

  it('a bad value fails the whole run: nothing stored, the problem by series, a mail to the steward', async () => {
    source.publish();
    source.setFault({ kind: 'bad-value', key: 'Q.EST.HOURS' });
    const before = await counts();
    const res = await steward.post(`/api/v1/feeds/${csvFeed}/run`).expect(200);
    source.setFault(null);
    expect(res.body.outcome).toBe('failed');
    expect(res.body.message).toMatch(/1 problem to fix at the source; nothing was stored/);
    const hours = res.body.problems.find((p: { series: string }) => p.series === 'FK_HOURS');
    expect(hours.key).toBe('Q.EST.HOURS');
    expect(hours.problems[0]).toMatchObject({ column: 'OBS_VALUE', severity: 'error', message: '"n/a" is not a number.' });
    expect(res.body.problems.some((p: { series: string; problems: { severity: string }[] }) => p.series === 'FK_GDP' && p.problems.some((x) => x.severity === 'error'))).toBe(false);
    expect(await counts()).toEqual(before);
    const mail = await t.mail.waitFor((m) => m.subject === 'Feed “Estuary national accounts” failed; nothing was stored');
    expect(mail.to).toEqual(['steward@demo.test']);
    expect(mail.text).toContain('FK_HOURS (key Q.EST.HOURS)');
    expect(mail.text).toContain('"n/a" is not a number.');
  });

  it('an unavailable source or a key missing from the answer fails with the reason', async () => {
    source.setFault({ kind: 'unavailable' });
    const down = await steward.post(`/api/v1/feeds/${csvFeed}/run`).expect(200);
    source.setFault(null);
    expect(down.body.outcome).toBe('failed');
    expect(down.body.message).toMatch(/^The source answered 503 Service Unavailable: The source is down for maintenance/);
    const feed = await steward.post('/api/v1/feeds').send({ name: 'Wrong key', url: flowUrl('Q.EST.'), mappings: [{ key: 'Q.EST.GDP', series: 'FK_GDP' }] }).expect(201);
    const res = await steward.post(`/api/v1/feeds/${feed.body.id}/run`).expect(200);
    expect(res.body.outcome).toBe('failed');
    expect(res.body.problems[0].problems[0].message).toMatch(/^The answer has no series with the key Q.EST.GDP \(it has Q.EST.GDP_VOL, Q.EST.HOURS\)/);
  });

  it('lists the runs newest first, with durations and who started them', async () => {
    const res = await steward.get(`/api/v1/feeds/${csvFeed}/runs`).expect(200);
    expect(res.body.items.map((r: { outcome: string }) => r.outcome)).toEqual(['failed', 'failed', 'stored', 'unchanged', 'stored']);
    const name = (await t.db('users').where('email', 'steward@demo.test').first()).name;
    for (const r of res.body.items) {
      expect(r.durationMs).toBeGreaterThanOrEqual(0);
      expect(Date.parse(r.finishedAt)).toBeGreaterThanOrEqual(Date.parse(r.startedAt));
      expect(r.startedBy).toBe(name);
      expect(r.trigger).toBe('manual');
    }
  });
});

describe('one run at a time', () => {
  it('refuses a second run while the lease is held, and takes over once a dead run’s lease expires', async () => {
    await t.db('feed_leases').where('feed_id', xmlFeed).update({ holder: 'dead-host:1:x', expires_at: t.db.raw('NOW(3) + INTERVAL 1 HOUR') });
    const [deadRun] = await t.db('feed_runs').insert({ feed_id: xmlFeed, trigger: 'schedule', outcome: 'running', holder: 'dead-host:1:x', started_at: t.db.raw('NOW(3) - INTERVAL 2 MINUTE') });
    const refused = await steward.post(`/api/v1/feeds/${xmlFeed}/run`).expect(409);
    expect(refused.body.error.code).toBe('feed_running');
    // The process holding it died: it renews no more, and its lease runs out.
    await t.db('feed_leases').where('feed_id', xmlFeed).update({ expires_at: t.db.raw('NOW(3) - INTERVAL 1 SECOND') });
    source.publish();
    const res = await steward.post(`/api/v1/feeds/${xmlFeed}/run`).expect(200);
    expect(res.body.outcome).toBe('stored');
    const dead = await t.db('feed_runs').where('id', deadRun).first();
    expect(dead.outcome).toBe('abandoned');
    expect(dead.message).toMatch(/nothing of it was stored/);
    const lease = await t.db('feed_leases').where('feed_id', xmlFeed).first();
    expect(lease.holder).toBeNull();
  });

  it('two instances asked to run the same feed at once: one runs, the other is refused', async () => {
    const second = createApp({ config: t.config, db: t.db, logger: createLogger('silent'), mailbox: t.mail });
    const token = (await steward.post('/api/v1/tokens').send({ name: 'two instances' }).expect(201)).body.token;
    const runsBefore = (await t.db('feed_runs').where({ feed_id: xmlFeed })).length;
    source.publish();
    source.setFault({ kind: 'slow', ms: 1500 });
    const [a, b] = await Promise.all([t.app, second].map((app) => request(app).post(`/api/v1/feeds/${xmlFeed}/run`).set('Authorization', `Bearer ${token}`)));
    source.setFault(null);
    await second.locals.shutdown();
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const refused = a.status === 409 ? a : b;
    expect(refused.body.error.code).toBe('feed_running');
    expect((a.status === 200 ? a : b).body.outcome).toBe('stored');
    expect(await t.db('feed_runs').where({ feed_id: xmlFeed })).toHaveLength(runsBefore + 1);
  });

  it('the scheduler runs a scheduled time once, though two instances tick at once', async () => {
    const feed = await steward.post('/api/v1/feeds').send({ name: 'Every five minutes', url: flowUrl('M.EST.RETAIL_VOL'), schedule: '*/5 * * * *', mappings: [{ key: 'M.EST.RETAIL_VOL', series: 'FK_RETAIL' }] }).expect(201);
    const id = feed.body.id as number;
    await t.db('feeds').where('id', id).update({ created_at: t.db.raw('NOW(3) - INTERVAL 1 DAY') });
    const now = new Date();
    const [a, b] = await Promise.all([tickFeeds(deps, now), tickFeeds(deps, now)]);
    expect([...a, ...b].filter((x) => x === id)).toEqual([id]);
    expect(await tickFeeds(deps, now)).not.toContain(id);
    const runs = await t.db('feed_runs').where('feed_id', id);
    expect(runs).toHaveLength(1);
    expect(runs[0].trigger).toBe('schedule');
    const slot = new Date((await t.db('feed_leases').where('feed_id', id).first()).last_slot);
    expect(slot.getUTCMinutes() % 5).toBe(0);
    expect(now.getTime() - slot.getTime()).toBeLessThan(5 * 60_000);
    // The next scheduled time runs again.
    const later = new Date(slot.getTime() + 5 * 60_000);
    expect(await tickFeeds(deps, later)).toContain(id);
  });
});

describe('the demo feed', () => {
  it('fills its three invented series from the fake source on its first run', async () => {
    const stewardId = (await t.db('users').where('email', 'steward@demo.test').first()).id;
    const feed = await seedDemoFeed(t.db, stewardId, source.url);
    expect(feed.scheduleWords).toBe('At 09:30, Monday through Friday (UTC)');
    const res = await steward.post(`/api/v1/feeds/${feed.id}/run`).expect(200);
    expect(res.body.outcome, JSON.stringify(res.body)).toBe('stored');
    expect(res.body.vintages.map((v: { code: string }) => v.code).sort()).toEqual(['EST_NA_GDP_VOL', 'EST_NA_HOURS', 'EST_RETAIL_VOL']);
    expect(await observations('EST_RETAIL_VOL', 1)).toEqual(fakeRelease(RETAIL, source.release()));
  });
});
