/** Issue 12: every /series/:id… route takes the series' code; observations as of a date. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';

let t: TestApp;
let steward: Awaited<ReturnType<typeof signedIn>>;
let viewer: Awaited<ReturnType<typeof signedIn>>;
let id: number;

const CODE = 'T_ASOF.GDP';
const quarters = (n: number, bump: number) => ['period,value', ...Array.from({ length: n }, (_, i) => `${2000 + Math.floor(i / 4)}-Q${(i % 4) + 1},${100 + i + bump}`)].join('\n') + '\n';
// Three releases: 8 quarters on 2020-01-15, 9 on 2020-04-15 (revising the past by +0.5), 10 on 2020-07-15.
const RELEASES = [
  { asOf: '2020-01-15', file: quarters(8, 0) },
  { asOf: '2020-04-15', file: quarters(9, 0.5) },
  { asOf: '2020-07-15', file: quarters(10, 0.25) },
];

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  steward = await signedIn(t, 'steward@demo.test');
  viewer = await signedIn(t, 'viewer@demo.test');
  // Defined and loaded through its code only.
  id = (await steward.post('/api/v1/series').send({ code: CODE, title: 'As-of test', frequency: 'Q', unit: 'index', seasonalAdjustment: 'sa', source: 'test' }).expect(201)).body.id;
  for (const r of RELEASES) {
    await steward.post(`/api/v1/series/${CODE}/vintages`).attach('file', Buffer.from(r.file), 'r.csv').field('asOf', r.asOf).expect(201);
  }
});
afterAll(async () => {
  await t.close();
});

const asOf = (date: string, ref: string | number = CODE) => viewer.get(`/api/v1/series/${ref}/observations?asOf=${date}`);

describe('observations as of a date', () => {
  it('answers the vintage in force on, just before and just after each release date', async () => {
    const cases: [string, number, number][] = [
      ['2020-01-15', 1, 8],
      ['2020-01-16', 1, 8],
      ['2020-04-14', 1, 8],
      ['2020-04-15', 2, 9],
      ['2020-07-14', 2, 9],
      ['2020-07-15', 3, 10],
      ['2031-12-31', 3, 10],
    ];
    for (const [date, number, rows] of cases) {
      const res = await asOf(date).expect(200);
      expect(res.body.vintage, date).toEqual({ number, asOf: RELEASES[number - 1].asOf });
      expect(res.body.periods, date).toHaveLength(rows);
    }
    const second = await asOf('2020-05-01').expect(200);
    expect(second.body.periods.slice(0, 2)).toEqual(['2000-Q1', '2000-Q2']);
    expect(second.body.values.slice(0, 3)).toEqual([100.5, 101.5, 102.5]);
    expect(second.body.periods[8]).toBe('2002-Q1');
  });

  it('answers 404 in the error shape before the first release, by id as by code', async () => {
    for (const ref of [CODE, id]) {
      const res = await asOf('2020-01-14', ref).expect(404);
      expect(res.body.error.code).toBe('not_found');
      expect(res.body.error.message).toMatch(/on or before 2020-01-14/);
    }
  });

  it('refuses a missing or impossible date with 400 and says how to write it', async () => {
    const none = await viewer.get(`/api/v1/series/${CODE}/observations`).expect(400);
    expect(none.body.error.message).toMatch(/YYYY-MM-DD/);
    const bad = await asOf('2020-02-30').expect(400);
    expect(bad.body.error.message).toMatch(/not a real date/);
    expect((await asOf('15.01.2020').expect(400)).body.error.message).toMatch(/YYYY-MM-DD/);
  });

  it('is for the signed-in only', async () => {
    const { default: request } = await import('supertest');
    await request(t.app).get(`/api/v1/series/${CODE}/observations?asOf=2020-05-01`).expect(401);
  });
});

describe('a study pinned to a date', () => {
  it('reads the vintage in force then, keeps the pin through other changes, and drops it for a number', async () => {
    const economist = await signedIn(t, 'economist@demo.test');
    const spec = { title: 'As of May 2020', seriesId: id, transform: 'none', method: 'hp', params: { lambda: 1600 } };
    const created = await economist.post('/api/v1/studies').send({ ...spec, asOf: '2020-05-01' }).expect(201);
    expect(created.body).toMatchObject({ vintage: 'latest', asOf: '2020-05-01' });
    const sid = created.body.id;
    const result = async () => (await economist.get(`/api/v1/studies/${sid}/result`).expect(200)).body;
    expect(await result()).toMatchObject({ vintage: 2, asOf: '2020-04-15' });
    expect((await result()).input).toHaveLength(9);
    const renamed = await economist.patch(`/api/v1/studies/${sid}`).send({ title: 'Renamed' }).expect(200);
    expect(renamed.body).toMatchObject({ title: 'Renamed', asOf: '2020-05-01', method: 'hp', params: { lambda: 1600 } });
    expect((await result()).vintage).toBe(2);
    const early = await economist.patch(`/api/v1/studies/${sid}`).send({ asOf: '2019-12-31' }).expect(404);
    expect(early.body.error.message).toMatch(/on or before 2019-12-31/);
    expect((await economist.get(`/api/v1/studies/${sid}`).expect(200)).body.asOf).toBe('2020-05-01');
    const numbered = await economist.patch(`/api/v1/studies/${sid}`).send({ vintage: 1 }).expect(200);
    expect(numbered.body).toMatchObject({ vintage: 1, asOf: null, title: 'Renamed' });
    expect((await result()).vintage).toBe(1);
    const dated = await economist.patch(`/api/v1/studies/${sid}`).send({ asOf: '2021-01-01' }).expect(200);
    expect(dated.body).toMatchObject({ vintage: 'latest', asOf: '2021-01-01' });
    expect((await result()).vintage).toBe(3);
    await economist.patch(`/api/v1/studies/${sid}`).send({ asOf: '2021-02-30' }).expect(400);
  });
});

describe('every series route takes the code', () => {
  it('reads the series, its vintages, observations, exports and revisions by code as by id', async () => {
    const paths = ['', '/vintages', '/vintages/2', '/vintages/latest/observations', '/revisions?from=1&to=3', '/revisions/triangle'];
    for (const p of paths) {
      const byCode = await viewer.get(`/api/v1/series/${CODE}${p}`).expect(200);
      const byId = await viewer.get(`/api/v1/series/${id}${p}`).expect(200);
      expect(byCode.body, p).toEqual(byId.body);
    }
    expect((await viewer.get(`/api/v1/series/${CODE}`).expect(200)).body).toMatchObject({ id, code: CODE, vintageCount: 3 });
    const exported = await viewer.get(`/api/v1/series/${CODE}/vintages/1/export?format=csv`).expect(200);
    expect(exported.text.split('\n').filter(Boolean)).toHaveLength(9);
  });

  it('corrects and deletes by code; an unknown code or id is a 404 that names it', async () => {
    const other = (await steward.post('/api/v1/series').send({ code: 'T_ASOF_EMPTY', title: 'Empty', frequency: 'A', unit: 'x', seasonalAdjustment: 'nsa' }).expect(201)).body.id;
    const patched = await steward.patch('/api/v1/series/T_ASOF_EMPTY').send({ title: 'Renamed' }).expect(200);
    expect(patched.body).toMatchObject({ id: other, title: 'Renamed' });
    await steward.delete('/api/v1/series/T_ASOF_EMPTY').expect(204);
    expect(await t.db('series').where('id', other).first()).toBeUndefined();
    for (const ref of ['T_ASOF_EMPTY', 'NO_SUCH', '999999', 'bad code!']) {
      const res = await viewer.get(`/api/v1/series/${encodeURIComponent(ref)}/vintages`).expect(404);
      expect(res.body.error.code).toBe('not_found');
    }
    expect((await viewer.get('/api/v1/series/NO_SUCH').expect(404)).body.error.message).toMatch(/NO_SUCH/);
  });
});
