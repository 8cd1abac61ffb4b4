/**
 * Release alerts survive a server that stops between storing a load and sending its mails: the
 * job is written in the load's transaction, delivered after the commit and marked done; a job the
 * stopped server never delivered, or claimed and never finished, is delivered by the next sweep,
 * once; a refused load queues nothing. Real MariaDB and the fake mail server.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Background } from '../../server/lib/background.js';
import { createLogger } from '../../server/lib/logger.js';
import { createMailer } from '../../server/mail/mailer.js';
import type { StoredMessage } from '../../server/mail/fake-smtp.js';
import type { AlertDeps } from '../../server/services/alerts/landed.js';
import { sweepReleaseAlerts } from '../../server/services/alerts/outbox.js';
import { loadFile } from '../../server/services/catalogue/loads.js';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { addPerson } from '../helpers/session.js';

let t: TestApp;
let steward: Awaited<ReturnType<typeof addPerson>>;
let deps: AlertDeps;
let seriesId: number;
let stewardId: number;

const level = (n: number, bump = 0) => Array.from({ length: n }, (_, i) => Number((100 * Math.exp(0.006 * i + 0.02 * Math.sin(i / 5)) + bump).toFixed(3)));
const csv = (values: number[]) => Buffer.from(['period,value', ...values.map((v, i) => `${2000 + Math.floor(i / 4)}-Q${(i % 4) + 1},${v}`)].join('\n') + '\n');
const mailsTo = (email: string) => t.mail.messages().filter((m: StoredMessage) => m.to.includes(email));
const jobs = () => t.db('alert_jobs').orderBy('id');
const settle = () => (t.app.locals.background as { idle(): Promise<void> }).idle();
/** The background of a server that stopped right after its commit: its work never runs. */
const stopped: Background = { run() {}, idle: async () => {}, pending: 0 };

beforeAll(async () => {
  t = await makeTestApp();
  steward = await addPerson(t, 'steward@outbox.test', 'Sam Steward', ['steward']);
  const follower = await addPerson(t, 'follower@outbox.test', 'Fay Follower', ['economist']);
  seriesId = (await steward.post('/api/v1/series').send({ code: 'T_OUTBOX', title: 'Outbox test (invented)', frequency: 'Q', unit: 'index', seasonalAdjustment: 'sa', source: 'test' }).expect(201)).body.id;
  stewardId = (await t.db('users').where('email', 'steward@outbox.test').first()).id;
  await steward.post(`/api/v1/series/${seriesId}/vintages`).attach('file', csv(level(40)), 'v1.csv').expect(201);
  await follower.post('/api/v1/studies').send({ title: 'Gap on latest', seriesId, vintage: 'latest', transform: 'log100', method: 'hp', params: {} }).expect(201);
  const logger = createLogger('silent');
  deps = { db: t.db, config: t.config, mailer: createMailer(t.config, logger, t.mail.port), background: stopped, logger };
  await settle();
  t.mail.clear();
});
afterAll(async () => {
  await t.close();
});

describe('release alerts through the outbox', () => {
  it('a load queues its alerts with its vintages; they are delivered after the commit and the job marked done', async () => {
    await steward.post(`/api/v1/series/${seriesId}/vintages`).attach('file', csv(level(41)), 'v2.csv').expect(201);
    await settle();
    expect(mailsTo('follower@outbox.test')).toHaveLength(1);
    const job = (await jobs()).at(-1);
    expect(JSON.parse(job.payload)).toMatchObject({ source: 'load', series: [{ seriesId, numbers: [2] }] });
    expect(job.done_at).not.toBeNull();
    expect(job.attempts).toBe(1);
    // A sweep finds nothing to do.
    expect(await sweepReleaseAlerts({ ...deps, background: t.app.locals.background })).toBe(0);
    expect(mailsTo('follower@outbox.test')).toHaveLength(1);
  });

  it('a server that stopped right after its commit: the next sweep delivers the alerts, once', async () => {
    t.mail.clear();
    const before = (await jobs()).length;
    await loadFile(t.db, { file: { buffer: csv(level(42)), filename: 'v3.csv' }, fields: {}, dryRun: false, seriesId, actor: { id: stewardId }, alerts: deps });
    const queued = (await jobs()).slice(before);
    expect(queued).toHaveLength(1);
    expect([queued[0].done_at, queued[0].attempts]).toEqual([null, 0]);
    expect(t.mail.messages()).toHaveLength(0);
    expect(await sweepReleaseAlerts(deps)).toBe(1);
    expect(mailsTo('follower@outbox.test')).toHaveLength(1);
    expect(mailsTo('follower@outbox.test')[0].text).toMatch(/vintage 3/);
    expect(await sweepReleaseAlerts(deps)).toBe(0);
    expect(mailsTo('follower@outbox.test')).toHaveLength(1);
  });

  it('a job claimed by a server that died is delivered once its claim runs out, not before', async () => {
    t.mail.clear();
    await loadFile(t.db, { file: { buffer: csv(level(43)), filename: 'v4.csv' }, fields: {}, dryRun: false, seriesId, actor: { id: stewardId }, alerts: deps });
    const job = (await jobs()).at(-1);
    await t.db('alert_jobs').where('id', job.id).update({ claimed_by: 'a-server-that-died:1', claimed_until: t.db.raw('NOW(3) + INTERVAL 60 SECOND'), attempts: 1 });
    expect(await sweepReleaseAlerts(deps)).toBe(0);
    await t.db('alert_jobs').where('id', job.id).update({ claimed_until: t.db.raw('NOW(3) - INTERVAL 1 SECOND') });
    expect(await sweepReleaseAlerts(deps)).toBe(1);
    expect(mailsTo('follower@outbox.test')).toHaveLength(1);
    expect((await t.db('alert_jobs').where('id', job.id).first()).attempts).toBe(2);
  });

  it('a mail the mail server does not take is sent by a later sweep, once', async () => {
    t.mail.clear();
    // A mail server that is away: nothing listens on the port.
    const away = { ...deps, mailer: createMailer(t.config, createLogger('silent'), 9) };
    await loadFile(t.db, { file: { buffer: csv(level(44)), filename: 'v5.csv' }, fields: {}, dryRun: false, seriesId, actor: { id: stewardId }, alerts: away });
    expect(await sweepReleaseAlerts(away)).toBe(0);
    const job = (await jobs()).at(-1);
    expect([job.done_at, job.attempts]).toEqual([null, 1]);
    expect(job.last_error).toMatch(/did not take 1 of 1 messages/);
    expect(t.mail.messages()).toHaveLength(0);
    // Its retry time comes; the mail server is back.
    await t.db('alert_jobs').where('id', job.id).update({ claimed_until: t.db.raw('NOW(3) - INTERVAL 1 SECOND') });
    expect(await sweepReleaseAlerts(deps)).toBe(1);
    expect(mailsTo('follower@outbox.test')).toHaveLength(1);
    expect(JSON.parse((await t.db('alert_jobs').where('id', job.id).first()).payload).served).toEqual(['follower@outbox.test']);
  });

  it('a refused load queues nothing', async () => {
    const before = (await jobs()).length;
    await steward.post(`/api/v1/series/${seriesId}/vintages`).attach('file', csv(level(44)), 'same.csv').expect(409);
    await steward.post(`/api/v1/series/${seriesId}/vintages`).attach('file', Buffer.from('period,value\n2000-Q1,abc\n'), 'bad.csv').expect(422);
    expect(await jobs()).toHaveLength(before);
  });
});
