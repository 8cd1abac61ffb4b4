/**
 * Studies of kind "range" (issue 13): saved with their list of methods, read back with every
 * default filled, their result equal to POST /studies/range's for the same body; changes keep
 * what they are not sent; duplicates; refusals that store nothing; what only single-method
 * studies have refuses a range study with what to do instead; its download holds each method's
 * cycle and the range. Single-method studies unchanged.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';

let t: TestApp;
let economist: Awaited<ReturnType<typeof signedIn>>;
let gdpId: number;

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  economist = await signedIn(t, 'economist@demo.test');
  gdpId = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
});
afterAll(async () => {
  await t.close();
});

const methods = [{ method: 'hp' }, { method: 'hamilton' }, { method: 'bn-filter', params: { delta: 0.3 } }];
const rangeStudy = (over: Record<string, unknown> = {}) => ({ kind: 'range', title: 'Range of gaps', seriesId: gdpId, vintage: 4, transform: 'log100', methods, ...over });
const count = async () => Number((await t.db('studies').count({ n: '*' }))[0].n);

describe('range studies', () => {
  it('saves a range study with its methods’ defaults filled in; its result is POST /studies/range’s', async () => {
    const s = (await economist.post('/api/v1/studies').send(rangeStudy()).expect(201)).body;
    expect(s).toMatchObject({ kind: 'range', method: 'range', params: {}, vintage: 4, transform: 'log100', series: { code: 'EST_GDP_REAL' } });
    expect(s.methods.map((m: { method: string }) => m.method)).toEqual(['hp', 'hamilton', 'bn-filter']);
    expect(s.methods[0].params).toEqual({ lambda: 1600 });
    expect(s.methods[2].params).toEqual({ p: 12, delta: 0.3 });
    expect((await economist.get(`/api/v1/studies/${s.id}`).expect(200)).body).toEqual(s);

    const result = (await economist.get(`/api/v1/studies/${s.id}/result`).expect(200)).body;
    const direct = (await economist.post('/api/v1/studies/range').send({ seriesId: gdpId, vintage: 4, transform: 'log100', methods }).expect(200)).body;
    expect(result.kind).toBe('range');
    expect(result.study.id).toBe(s.id);
    for (const key of ['periods', 'items', 'median', 'min', 'max', 'count', 'vintage', 'unitOfCycle']) expect(result[key]).toEqual(direct[key]);
    expect(result.cautions.join(' ')).toMatch(/not a forecast/i);
    expect((await economist.get('/api/v1/studies?method=range').expect(200)).body.items.map((i: { id: number }) => i.id)).toContain(s.id);
  });

  it('leaves single-method studies as they were (kind "single", no methods)', async () => {
    const s = (await economist.post('/api/v1/studies').send({ title: 'one', seriesId: gdpId, transform: 'log100', method: 'hp', params: {} }).expect(201)).body;
    expect(s).toMatchObject({ kind: 'single', method: 'hp', params: { lambda: 1600 }, methods: null });
    const r = (await economist.get(`/api/v1/studies/${s.id}/result`).expect(200)).body;
    expect(r.kind).toBe('single');
    expect(r.cycle.length).toBe(r.periods.length);
  });

  it('refuses a bad range study with what to fix, and stores nothing', async () => {
    const before = await count();
    const one = await economist.post('/api/v1/studies').send(rangeStudy({ methods: [{ method: 'hp' }] })).expect(400);
    expect(one.body.error.message).toMatch(/at least two methods/);
    const none = await economist.post('/api/v1/studies').send(rangeStudy({ methods: undefined })).expect(400);
    expect(none.body.error.message).toMatch(/needs its methods/);
    const both = await economist.post('/api/v1/studies').send(rangeStudy({ method: 'hp' })).expect(400);
    expect(both.body.error.message).toMatch(/not one method/);
    const single = await economist.post('/api/v1/studies').send({ title: 'x', seriesId: gdpId, methods }).expect(400);
    expect(single.body.error.message).toMatch(/Choose a method/);
    const bad = await economist.post('/api/v1/studies').send(rangeStudy({ methods: [{ method: 'hp' }, { method: 'hamilton', params: { h: 120 } }] })).expect(400);
    expect(bad.body.error.message).toMatch(/^methods\[1\] \(Hamilton regression filter\)/);
    await economist.post('/api/v1/studies').send(rangeStudy({ vintage: 99 })).expect(404);
    expect(await count()).toBe(before);
  });

  it('a change keeps what it is not sent; a range study changes its methods, not method/params', async () => {
    const s = (await economist.post('/api/v1/studies').send(rangeStudy({ title: 'to change', notes: 'kept' })).expect(201)).body;
    const renamed = (await economist.patch(`/api/v1/studies/${s.id}`).send({ title: 'renamed' }).expect(200)).body;
    expect(renamed).toMatchObject({ title: 'renamed', notes: 'kept', kind: 'range', vintage: 4, transform: 'log100', methods: s.methods });
    const changed = (await economist.patch(`/api/v1/studies/${s.id}`).send({ methods: [{ method: 'hp', params: { lambda: 400 } }, { method: 'hamilton' }] }).expect(200)).body;
    expect(changed.methods).toEqual([{ method: 'hp', params: { lambda: 400 } }, { method: 'hamilton', params: { h: 8, p: 4 } }]);
    expect(changed).toMatchObject({ title: 'renamed', notes: 'kept', vintage: 4 });
    const latest = (await economist.patch(`/api/v1/studies/${s.id}`).send({ vintage: 'latest' }).expect(200)).body;
    expect(latest).toMatchObject({ vintage: 'latest', methods: changed.methods });
    const wrong = await economist.patch(`/api/v1/studies/${s.id}`).send({ method: 'hp' }).expect(400);
    expect(wrong.body.error.code).toBe('range_study');
    await economist.patch(`/api/v1/studies/${s.id}`).send({ methods: [{ method: 'hp' }] }).expect(400);
    const bad = await economist.patch(`/api/v1/studies/${s.id}`).send({ methods: [{ method: 'hp' }, { method: 'hamilton', params: { h: 120 } }] }).expect(400);
    expect(bad.body.error.message).toMatch(/Hamilton/);
    expect((await economist.get(`/api/v1/studies/${s.id}`).expect(200)).body).toEqual(latest);

    const single = (await economist.post('/api/v1/studies').send({ title: 'one', seriesId: gdpId, method: 'hp' }).expect(201)).body;
    const refused = await economist.patch(`/api/v1/studies/${single.id}`).send({ methods }).expect(400);
    expect(refused.body.error.code).toBe('single_study');
  });

  it('duplicates into a range study of one’s own; only the owner changes it; stewards do not read it', async () => {
    const s = (await economist.post('/api/v1/studies').send(rangeStudy({ title: 'shared' })).expect(201)).body;
    const admin = await signedIn(t, 'admin@demo.test');
    const editorId = (await t.db('users').where('email', 'editor@demo.test').first()).id;
    await admin.patch(`/api/v1/users/${editorId}`).send({ roles: ['editor', 'economist'] }).expect(200);
    const other = await signedIn(t, 'editor@demo.test');
    expect((await other.patch(`/api/v1/studies/${s.id}`).send({ title: 'theirs' }).expect(403)).body.error.code).toBe('not_owner');
    const copy = (await other.post(`/api/v1/studies/${s.id}/duplicate`).expect(201)).body;
    expect(copy).toMatchObject({ kind: 'range', title: 'shared (copy)', methods: s.methods, vintage: 4, owner: { name: 'Eddie Editor' } });
    expect(copy.id).not.toBe(s.id);
    const steward = await signedIn(t, 'steward@demo.test');
    await steward.get(`/api/v1/studies/${s.id}`).expect(403);
    await steward.post('/api/v1/studies').send(rangeStudy()).expect(403);
  });

  it('downloads a range study: each method’s cycle and the median, lowest and highest, as /result gives them, with both cautions', async () => {
    const s = (await economist.post('/api/v1/studies').send(rangeStudy({ title: 'Range to download' })).expect(201)).body;
    const result = (await economist.get(`/api/v1/studies/${s.id}/result`).expect(200)).body;
    const res = await economist.get(`/api/v1/studies/${s.id}/export?format=csv`).expect(200);
    expect(res.headers['content-disposition']).toMatch(/study-\d+-EST_GDP_REAL-range\.csv/);
    const lines = res.text.trim().split('\n');
    const about = lines.filter((l) => l.startsWith('#')).join('\n');
    expect(about).toMatch(/^# Study: Range to download$/m);
    expect(about).toMatch(/end-of-sample estimates are revised/);
    expect(about).toMatch(/not a forecast/);
    const [header, ...rows] = lines.filter((l) => !l.startsWith('#'));
    // Headers are quoted when they hold commas: split on commas outside quotes.
    const cells = (line: string) => line.match(/("[^"]*"|[^,]*)(,|$)/g)!.map((c) => c.replace(/,$/, '').replace(/^"|"$/g, '')).slice(0, -1);
    const names = [...result.items.map((it: { name: string }) => it.name), 'median across methods', 'lowest across methods', 'highest across methods'];
    expect(cells(header)).toEqual(['period', ...names.map((n) => `cycle, ${n}, ${result.unitOfCycle}`), 'vintage']);
    expect(rows.map((r) => cells(r)[0])).toEqual(result.periods);
    const columns = [...result.items.map((it: { cycle: (number | null)[] }) => it.cycle), result.median, result.min, result.max];
    rows.forEach((row, i) => {
      const c = cells(row);
      columns.forEach((col: (number | null)[], j: number) => {
        if (col[i] === null) expect(c[j + 1]).toBe('');
        else expect(Number(c[j + 1])).toBeCloseTo(col[i]!, 8);
      });
      expect(c.at(-1)).toBe(`data as of ${result.asOf}, vintage 4`);
    });
    const xlsx = await economist.get(`/api/v1/studies/${s.id}/export?format=xlsx`).expect(200);
    expect(xlsx.headers['content-type']).toMatch(/spreadsheetml/);
    // A method listed twice is told apart by its parameters, in the answer and so in every legend and download.
    const twice = (await economist.post('/api/v1/studies/range').send({ seriesId: gdpId, vintage: 4, transform: 'log100', methods: [{ method: 'hp', params: { lambda: 1600 } }, { method: 'hp', params: { lambda: 400 } }, { method: 'hamilton' }] }).expect(200)).body;
    const twiceNames = twice.items.map((it: { name: string }) => it.name);
    expect(new Set(twiceNames).size).toBe(3);
    expect(twiceNames[0]).toMatch(/1 600/);
    expect(twiceNames[1]).toMatch(/400/);
    expect(twiceNames[2]).toBe('Hamilton regression filter');
  });

  it('what only a study of one method has refuses a range study and says what to do', async () => {
    const s = (await economist.post('/api/v1/studies').send(rangeStudy({ title: 'no script' })).expect(201)).body;
    for (const res of [
      await economist.post(`/api/v1/studies/${s.id}/realtime`).expect(400),
    ]) {
      expect(res.body.error.code).toBe('range_study');
      expect(res.body.error.message).toMatch(/range study.*save a study of one of its methods/);
    }
  });
});
