/**
 * Release alerts (issue 15): after a load, one mail per person whose studies follow "latest" or
 * whose boards or exhibits draw on the series, through the fake mail server, with the gap before
 * and after and the largest revision of the last two years, checked against statsmodels'
 * hpfilter (Debian's /usr/bin/python3); the Profile setting turns them off.
 */
import { spawnSync } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { addPerson, signedIn } from '../helpers/session.js';
import type { StoredMessage } from '../../server/mail/fake-smtp.js';

type Agent = Awaited<ReturnType<typeof signedIn>>;
let t: TestApp;
let steward: Agent;
let follower: Agent; // a study on "latest"
let boardOwner: Agent; // a pinned study, shown on a board
let quiet: Agent; // a study on "latest", alerts turned off
let pinnedOnly: Agent; // a pinned study, nothing else
let seriesA: number;
let seriesB: number;

const csv = (values: number[], start = 2000) => Buffer.from(['period,value', ...values.map((v, i) => `${start + Math.floor(i / 4)}-Q${(i % 4) + 1},${v}`)].join('\n') + '\n');
/** An invented quarterly level: a trend with a slow wave and a little noise (deterministic). */
const level = (n: number, shift = 0) => Array.from({ length: n }, (_, i) => Number((100 * Math.exp(0.006 * i + 0.02 * Math.sin(i / 5) + 0.004 * Math.cos(i * 1.7)) + shift).toFixed(3)));

const newSeries = async (code: string) => (await steward.post('/api/v1/series').send({ code, title: `Alert test ${code} (invented)`, frequency: 'Q', unit: 'index', seasonalAdjustment: 'sa', source: 'test' }).expect(201)).body.id as number;
const study = async (who: Agent, seriesId: number, vintage: number | 'latest', title: string) =>
  (await who.post('/api/v1/studies').send({ title, seriesId, vintage, transform: 'log100', method: 'hp', params: { lambda: 1600 } }).expect(201)).body.id as number;
const mailsTo = (email: string) => t.mail.messages().filter((m: StoredMessage) => m.to.includes(email));
const settle = () => (t.app.locals.background as { idle(): Promise<void> }).idle();

/** statsmodels' hpfilter on both vintages: the last gap of each and the largest revision over the last 8 quarters. */
function statsmodelsMove(before: number[], after: number[]) {
  const py = spawnSync(
    '/usr/bin/python3',
    [
      '-c',
      `import json, sys, numpy as np
from statsmodels.tsa.filters.hp_filter import hpfilter
a, b = json.loads(sys.stdin.read())
ca, _ = hpfilter(100 * np.log(np.array(a)), lamb=1600)
cb, _ = hpfilter(100 * np.log(np.array(b)), lamb=1600)
n = len(b); k = max(range(n - 8, n), key=lambda i: abs(cb[i] - ca[i]) if i < len(a) else -1)
print(json.dumps({"before": ca[-1], "after": cb[-1], "k": k, "change": cb[k] - ca[k]}))`,
    ],
    { input: JSON.stringify([before, after]), encoding: 'utf8' },
  );
  expect(py.stderr).toBe('');
  return JSON.parse(py.stdout) as { before: number; after: number; k: number; change: number };
}
const signed = (v: number) => `${v > 0 ? '+' : v < 0 ? '−' : ''}${Math.abs(v).toFixed(2)}`;
const quarter = (i: number) => `${2000 + Math.floor(i / 4)}-Q${(i % 4) + 1}`;

const v1 = level(48);
// The second release revises the last six quarters and adds one.
const v2 = [...v1.slice(0, 42), ...level(49).slice(42).map((v, i) => Number((v * (1 + 0.004 * (i + 1))).toFixed(3)))];

beforeAll(async () => {
  t = await makeTestApp();
  const admin = await addPerson(t, 'admin@alerts.test', 'Ada Admin', ['admin']);
  void admin;
  steward = await addPerson(t, 'steward@alerts.test', 'Sam Steward', ['steward']);
  follower = await addPerson(t, 'follower@alerts.test', 'Fay Follower', ['economist']);
  boardOwner = await addPerson(t, 'board@alerts.test', 'Bo Board', ['economist']);
  quiet = await addPerson(t, 'quiet@alerts.test', 'Quinn Quiet', ['economist']);
  pinnedOnly = await addPerson(t, 'pinned@alerts.test', 'Pat Pinned', ['economist']);
  await addPerson(t, 'viewer@alerts.test', 'Vic Viewer', ['viewer']);
  seriesA = await newSeries('T_ALERT_A');
  seriesB = await newSeries('T_ALERT_B');
  await steward.post(`/api/v1/series/${seriesA}/vintages`).attach('file', csv(v1), 'a1.csv').field('asOf', '2025-01-10').expect(201);
  await steward.post(`/api/v1/series/${seriesB}/vintages`).attach('file', csv(level(40, 3)), 'b1.csv').field('asOf', '2025-01-10').expect(201);
  await settle();
  await study(follower, seriesA, 'latest', 'Gap of A');
  await study(follower, seriesB, 'latest', 'Gap of B');
  const pinned = await study(boardOwner, seriesA, 1, 'Gap of A as first published');
  const board = (await boardOwner.post('/api/v1/boards').send({ title: 'Monitor', visibility: 'team' }).expect(201)).body;
  await boardOwner.post(`/api/v1/boards/${board.id}/panels`).send({ title: 'A', studyIds: [pinned], width: 1, height: 'm' }).expect(201);
  await study(quiet, seriesA, 'latest', 'Quiet gap of A');
  await study(pinnedOnly, seriesA, 1, 'Pinned gap of A');
  t.mail.clear();
}, 120_000);
afterAll(async () => {
  await t?.close();
});

describe('the alert setting', () => {
  it('is on by default, turned off and on by the person, and a bad body stores nothing', async () => {
    expect((await quiet.get('/api/v1/profile/alerts').expect(200)).body).toEqual({ releaseAlerts: true });
    const bad = await quiet.put('/api/v1/profile/alerts').send({ releaseAlerts: 'no' }).expect(400);
    expect(bad.body.error.message).toMatch(/releaseAlerts/);
    expect((await quiet.get('/api/v1/profile/alerts').expect(200)).body).toEqual({ releaseAlerts: true });
    expect((await quiet.put('/api/v1/profile/alerts').send({ releaseAlerts: false }).expect(200)).body).toEqual({ releaseAlerts: false });
    expect((await quiet.get('/api/v1/profile/alerts').expect(200)).body).toEqual({ releaseAlerts: false });
    // One's own setting only: another person's stays on.
    expect((await follower.get('/api/v1/profile/alerts').expect(200)).body).toEqual({ releaseAlerts: true });
  });
});

describe('alerts after a load', () => {
  it('mails each affected person once, with the gap before and after and the largest revision (statsmodels hpfilter)', async () => {
    await steward.post(`/api/v1/series/${seriesA}/vintages`).attach('file', csv(v2), 'a2.csv').field('asOf', '2025-04-10').expect(201);
    await settle();
    const toFollower = mailsTo('follower@alerts.test');
    expect(toFollower).toHaveLength(1);
    const mail = toFollower[0];
    expect(mail.subject).toBe('New data: T_ALERT_A (vintage 2)');
    const ref = statsmodelsMove(v1, v2);
    const text = mail.text.replace(/\s+/g, ' ');
    expect(text).toContain('“Gap of A” (T_ALERT_A; Hodrick–Prescott, λ = 1 600; 100 × log; your study)');
    expect(text).toContain(`Last gap estimate: ${signed(ref.before)} in 2011-Q4 on vintage 1, now ${signed(ref.after)} in 2012-Q1 on vintage 2 (% of trend).`);
    expect(text).toContain(`Largest revision of the gap in the last two years: ${signed(ref.change)} in ${quarter(ref.k)}`);
    expect(text).not.toContain('Gap of B');
    expect(text).toMatch(/end-of-sample estimates are revised/);
    expect(text).toMatch(/Profile page/);

    // The board's owner hears of the pinned study the board shows; the person who turned alerts
    // off, the one whose pinned study is on no board or exhibit, the steward and the reader do not.
    const toBoard = mailsTo('board@alerts.test');
    expect(toBoard).toHaveLength(1);
    expect(toBoard[0].text.replace(/\s+/g, ' ')).toContain('“Gap of A as first published” (T_ALERT_A; Hodrick–Prescott, λ = 1 600; 100 × log; on your board)');
    for (const nobody of ['quiet@alerts.test', 'pinned@alerts.test', 'steward@alerts.test', 'viewer@alerts.test']) expect(mailsTo(nobody)).toHaveLength(0);
    expect(t.mail.messages()).toHaveLength(2);
  });

  it('a load of several series sends one mail per person covering all of them', async () => {
    t.mail.clear();
    const lines = ['STRUCTURE,STRUCTURE_ID,ACTION,FREQ,SERIES_CODE,TIME_PERIOD,OBS_VALUE'];
    const a3 = [...v2, 113.5];
    const b2 = [...level(40, 3), 130.25];
    a3.forEach((v, i) => lines.push(`df,X:Y(1.0),I,Q,T_ALERT_A,${quarter(i)},${v}`));
    b2.forEach((v, i) => lines.push(`df,X:Y(1.0),I,Q,T_ALERT_B,${quarter(i)},${v}`));
    const res = await steward.post('/api/v1/loads').attach('file', Buffer.from(lines.join('\n') + '\n'), 'both.csv').field('asOf', '2025-07-10').expect(201);
    expect(res.body.vintages).toHaveLength(2);
    await settle();
    const toFollower = mailsTo('follower@alerts.test');
    expect(toFollower).toHaveLength(1);
    expect(toFollower[0].subject).toBe('New data: T_ALERT_A (vintage 3), T_ALERT_B (vintage 2)');
    expect(toFollower[0].text).toMatch(/2 studies you follow moved/);
    expect(toFollower[0].text).toContain('“Gap of A”');
    expect(toFollower[0].text).toContain('“Gap of B”');
    expect(mailsTo('board@alerts.test')).toHaveLength(1);
    expect(mailsTo('quiet@alerts.test')).toHaveLength(0);
  });

  it('a history load of several releases sends one mail, comparing the vintage before the first release with the last', async () => {
    t.mail.clear();
    const a3 = [...v2, 113.5];
    const a4 = [...a3.slice(0, -1), 113.9];
    const a5 = [...a4, 114.6];
    const rows = [['release date', '2025-08-01', '2025-09-01'], ['period', '2025Q2', '2025Q3'], ...a5.map((v, i) => [quarter(i), i < a4.length ? a4[i] : '', v])];
    const file = Buffer.from(rows.map((r) => r.join(',')).join('\n') + '\n');
    const res = await steward.post('/api/v1/series/T_ALERT_A/history').attach('file', file, 'history.csv').expect(201);
    expect(res.body.vintages.map((v: { number: number }) => v.number)).toEqual([4, 5]);
    await settle();
    const toFollower = mailsTo('follower@alerts.test');
    expect(toFollower).toHaveLength(1);
    expect(toFollower[0].subject).toBe('New data: T_ALERT_A (vintages 4, 5)');
    const text = toFollower[0].text.replace(/\s+/g, ' ');
    expect(text).toMatch(/through a history load of history\.csv/);
    expect(text).toMatch(/on vintage 3, now [+−][0-9.]+ in 2012-Q3 on vintage 5/);
    expect(mailsTo('board@alerts.test')).toHaveLength(1);
    expect(t.mail.messages()).toHaveLength(2);
  });

  it('studies whose method is heavy (unobserved components) are computed on the worker threads, with the numbers POST /decompose gives', async () => {
    const uc = (await boardOwner.post('/api/v1/studies').send({ title: 'UC gap of A', seriesId: seriesA, vintage: 'latest', transform: 'log100', method: 'uc', params: { trend: 'local-linear' } }).expect(201)).body.id as number;
    t.mail.clear();
    const before = (await steward.get(`/api/v1/series/${seriesA}/vintages/latest/observations`).expect(200)).body;
    const after = [...before.values.slice(0, -2), before.values.at(-2) * 1.003, before.values.at(-1) * 0.997, before.values.at(-1) * 1.002].map((v: number) => Number(v.toFixed(3)));
    await steward.post(`/api/v1/series/${seriesA}/vintages`).attach('file', csv(after), 'a-uc.csv').expect(201);
    await settle();
    const mail = mailsTo('board@alerts.test');
    expect(mail).toHaveLength(1);
    const text = mail[0].text.replace(/\s+/g, ' ');
    const gap = async (values: number[]) => {
      const r = (await boardOwner.post('/api/v1/decompose').send({ frequency: 'Q', start: '2000-Q1', values, transform: 'log100', method: 'uc', params: { trend: 'local-linear' } }).expect(200)).body;
      return r.cycle.at(-1) as number;
    };
    expect(text).toContain(`“UC gap of A” (T_ALERT_A; Unobserved components, local linear trend, AR(2) cycle, 90 % band; 100 × log; your study). Last gap estimate: ${signed(await gap(before.values))} in ${quarter(before.values.length - 1)} on vintage`);
    expect(text).toContain(`now ${signed(await gap(after))} in ${quarter(after.length - 1)} on vintage`);
    await boardOwner.delete(`/api/v1/studies/${uc}`).expect(204);
  }, 60_000);

  it('a dry run and a refused load send nothing', async () => {
    t.mail.clear();
    const latest = (await steward.get(`/api/v1/series/${seriesA}/vintages/latest/observations`).expect(200)).body.values as number[];
    await steward.post(`/api/v1/series/${seriesA}/vintages?dryRun=1`).attach('file', csv([...latest, 115]), 'dry.csv').expect(200);
    await steward.post(`/api/v1/series/${seriesA}/vintages`).attach('file', csv(latest), 'same.csv').expect(409);
    await settle();
    expect(t.mail.messages()).toHaveLength(0);
  });
});
