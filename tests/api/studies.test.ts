import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import ExcelJS from 'exceljs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { relativeError } from '../helpers/references.js';
import { signedIn } from '../helpers/session.js';
import { asBytes, asText, ndjsonEvents } from '../helpers/parsers.js';

const fixture = JSON.parse(fs.readFileSync(path.join(path.dirname(fileURLToPath(import.meta.url)), '..', 'fixtures', 'realtime-demo.json'), 'utf8'));

let t: TestApp;
let economist: Awaited<ReturnType<typeof signedIn>>;
let steward: Awaited<ReturnType<typeof signedIn>>;
let gdpId: number;

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  economist = await signedIn(t, 'economist@demo.test');
  steward = await signedIn(t, 'steward@demo.test');
  gdpId = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
});
afterAll(async () => {
  await t.close();
});

const study = (over: Record<string, unknown> = {}) => ({ title: 'Output gap', seriesId: gdpId, vintage: 'latest', transform: 'log100', method: 'hp', params: { lambda: 1600 }, ...over });

describe('studies', () => {
  it('saves a study with its defaults filled in, and reads it back', async () => {
    const res = await economist.post('/api/v1/studies').send(study({ params: {} })).expect(201);
    expect(res.body).toMatchObject({ title: 'Output gap', vintage: 'latest', method: 'hp', params: { lambda: 1600 }, series: { code: 'EST_GDP_REAL' } });
    const back = await economist.get(`/api/v1/studies/${res.body.id}`).expect(200);
    expect(back.body.owner.name).toBe('Erin Economist');
  });

  it('refuses a bad specification and saves nothing', async () => {
    const before = (await t.db('studies').count({ n: '*' }))[0].n;
    const a = await economist.post('/api/v1/studies').send(study({ params: { lambda: -5 } })).expect(400);
    expect(a.body.error.code).toBe('invalid_parameter');
    await economist.post('/api/v1/studies').send(study({ vintage: 99 })).expect(404);
    await economist.post('/api/v1/studies').send(study({ title: '' })).expect(400);
    expect((await t.db('studies').count({ n: '*' }))[0].n).toBe(before);
  });

  it('a study pinned to a vintage keeps its numbers after a new load; one pinned to "latest" follows it', async () => {
    const pinned = (await economist.post('/api/v1/studies').send(study({ title: 'pinned', vintage: 4 })).expect(201)).body;
    const latest = (await economist.post('/api/v1/studies').send(study({ title: 'latest' })).expect(201)).body;
    const p1 = (await economist.get(`/api/v1/studies/${pinned.id}/result`).expect(200)).body;
    const l1 = (await economist.get(`/api/v1/studies/${latest.id}/result`).expect(200)).body;
    expect(p1.vintage).toBe(4);
    expect(l1.vintage).toBe(4);
    expect(l1.vintageStamp).toBe('data as of 2025-08-14, vintage 4');

    // A new release: vintage 4 with one more quarter and the last value revised.
    const obs = (await steward.get(`/api/v1/series/${gdpId}/vintages/4/observations`).expect(200)).body;
    const lines = ['period,value', ...obs.periods.map((p: string, i: number) => `${p},${i === obs.periods.length - 1 ? obs.values[i] * 1.004 : obs.values[i]}`), '2025-Q3,350000'];
    await steward.post(`/api/v1/series/${gdpId}/vintages`).attach('file', Buffer.from(lines.join('\n')), 'q3.csv').field('asOf', '2025-11-14').expect(201);

    const p2 = (await economist.get(`/api/v1/studies/${pinned.id}/result`).expect(200)).body;
    const l2 = (await economist.get(`/api/v1/studies/${latest.id}/result`).expect(200)).body;
    expect(p2.vintage).toBe(4);
    expect(p2.cycle).toEqual(p1.cycle);
    expect(p2.periods).toEqual(p1.periods);
    expect(l2.vintage).toBe(5);
    expect(l2.periods[l2.periods.length - 1]).toBe('2025-Q3');
    expect(l2.cycle).not.toEqual(l1.cycle);
  });

  it('only the owner changes or deletes a study; others duplicate it', async () => {
    const s = (await economist.post('/api/v1/studies').send(study({ title: 'mine' })).expect(201)).body;
    const admin = await signedIn(t, 'admin@demo.test');
    await admin.patch(`/api/v1/users/${(await t.db('users').where('email', 'editor@demo.test').first()).id}`).send({ roles: ['editor', 'economist'] }).expect(200);
    const other = await signedIn(t, 'editor@demo.test');
    const refused = await other.patch(`/api/v1/studies/${s.id}`).send({ title: 'theirs' }).expect(403);
    expect(refused.body.error.code).toBe('not_owner');
    const copy = (await other.post(`/api/v1/studies/${s.id}/duplicate`).expect(201)).body;
    expect(copy.owner.name).toBe('Eddie Editor');
    await other.patch(`/api/v1/studies/${copy.id}`).send({ method: 'hamilton' }).expect(200);
    const changed = (await other.get(`/api/v1/studies/${copy.id}`).expect(200)).body;
    expect(changed.params).toEqual({ h: 8, p: 4 });
    await other.delete(`/api/v1/studies/${copy.id}`).expect(204);
    await other.get(`/api/v1/studies/${copy.id}`).expect(404);
    const viewer = await signedIn(t, 'viewer@demo.test');
    await viewer.post('/api/v1/studies').send(study()).expect(403);
  });

  it('PATCH with a title alone keeps the vintage, transform, method and parameters', async () => {
    const s = (await economist.post('/api/v1/studies').send({ title: 'pinned, logged', seriesId: gdpId, vintage: 3, transform: 'log100', method: 'hp', params: { lambda: 400 } }).expect(201)).body;
    const renamed = (await economist.patch(`/api/v1/studies/${s.id}`).send({ title: 'renamed' }).expect(200)).body;
    expect(renamed).toMatchObject({ title: 'renamed', vintage: 3, transform: 'log100', method: 'hp', params: { lambda: 400 } });
    expect((await t.db('studies').where('id', s.id).first()).vintage_number).toBe(3);
    // A change of one field keeps the others too.
    const relogged = (await economist.patch(`/api/v1/studies/${s.id}`).send({ transform: 'log' }).expect(200)).body;
    expect(relogged).toMatchObject({ title: 'renamed', vintage: 3, transform: 'log', params: { lambda: 400 } });
  });

  it('previews unsaved parameters with statistics, turning points, gain and the cautions', async () => {
    const res = await economist.post('/api/v1/studies/preview').send({ seriesId: gdpId, vintage: 4, transform: 'log100', method: 'hp', params: { lambda: 1600 } }).expect(200);
    expect(res.body.methodLine).toBe('Hodrick–Prescott, λ = 1 600; 100 × log');
    expect(res.body.statistics.sd).toBeGreaterThan(0);
    expect(res.body.turningPoints.length).toBeGreaterThan(2);
    expect(res.body.gain.cutoff).toBeCloseTo(39.7, 1);
    expect(res.body.endOfSamplePeriods).toBe(8);
    expect(res.body.unitOfCycle).toBe('% of trend');
    // The two-sided caution names this frequency's two years; a one-sided method carries none and shades nothing.
    expect(res.body.warnings[0]).toBe('Two-sided filter: the last 8 quarters (two years) use data that do not exist yet and will be revised as new data arrive.');
    const oneSided = await economist.post('/api/v1/studies/preview').send({ seriesId: gdpId, vintage: 4, transform: 'log100', method: 'hamilton' }).expect(200);
    expect(oneSided.body.endOfSamplePeriods).toBe(0);
    expect(oneSided.body.warnings.some((w: string) => /Two-sided/.test(w))).toBe(false);
  });

  it('compares methods on one series and one method across series, with cross-correlations', async () => {
    const cg = (await t.db('series').where('code', 'EST_CREDIT_GDP').first()).id;
    const methods = await economist
      .post('/api/v1/studies/compare')
      .send({ items: ['hp', 'hp-one-sided', 'hamilton', 'christiano-fitzgerald'].map((m) => ({ seriesId: gdpId, vintage: 4, transform: 'log100', method: m })) })
      .expect(200);
    expect(methods.body.items).toHaveLength(4);
    expect(methods.body.items[1].crossCorrelations).toHaveLength(17);
    // The one-sided HP (item 1) against the two-sided HP (item 0, the reference), recomputed here from
    // the aligned cycles the answer carries: corr(cₜ, referenceₜ₊ₖ) over the periods where both exist.
    const pearson = (x: number[], y: number[]) => {
      const mx = x.reduce((a, b) => a + b, 0) / x.length;
      const my = y.reduce((a, b) => a + b, 0) / y.length;
      let sxy = 0;
      let sxx = 0;
      let syy = 0;
      x.forEach((v, i) => {
        sxy += (v - mx) * (y[i] - my);
        sxx += (v - mx) ** 2;
        syy += (y[i] - my) ** 2;
      });
      return sxy / Math.sqrt(sxx * syy);
    };
    const [ref, one] = [methods.body.items[0].cycle, methods.body.items[1].cycle] as (number | null)[][];
    for (const k of [-3, 0, 2]) {
      const xs: number[] = [];
      const ys: number[] = [];
      one.forEach((c, t) => {
        const r = ref[t + k];
        if (c !== null && r !== null && r !== undefined) {
          xs.push(c);
          ys.push(r);
        }
      });
      const got = methods.body.items[1].crossCorrelations.find((x: { lag: number }) => x.lag === k);
      expect(got.n).toBe(xs.length);
      expect(got.r).toBeCloseTo(pearson(xs, ys), 10);
    }
    // Real-time and two-sided gaps move together, but the end points differ: correlated, not identical.
    const lag0 = methods.body.items[1].crossCorrelations.find((x: { lag: number }) => x.lag === 0).r;
    expect(lag0).toBeGreaterThan(0.3);
    expect(lag0).toBeLessThan(0.999);
    const series = await economist
      .post('/api/v1/studies/compare')
      .send({ items: [{ seriesId: gdpId, transform: 'log100', method: 'hp' }, { seriesId: cg, transform: 'none', method: 'hp', params: { lambda: 400000 } }], reference: 0, maxLag: 4 })
      .expect(200);
    expect(series.body.items[1].crossCorrelations.map((x: { lag: number }) => x.lag)).toEqual([-4, -3, -2, -1, 0, 1, 2, 3, 4]);
    expect(series.body.items[1].statistics.relativeSd).toBeGreaterThan(0);
  });

  it('exports the numbers with the method line and the vintage stamp', async () => {
    const s = (await economist.post('/api/v1/studies').send(study({ title: 'export', vintage: 2 })).expect(201)).body;
    const csv = await economist.get(`/api/v1/studies/${s.id}/export?format=csv`).expect(200);
    const lines = csv.text.trim().split('\n').filter((l) => !l.startsWith('#'));
    expect(csv.text).toMatch(/^# Caution: end-of-sample estimates are revised/m);
    expect(csv.text).not.toMatch(/Caution: Caution/);
    expect(lines[0]).toBe('period,"input, EST$ million, chained 2020 prices (100 × log)","trend, EST$ million, chained 2020 prices (100 × log)","cycle, % of trend (100 × log)",method,vintage');
    expect(lines[1]).toMatch(/^1995-Q1,/);
    expect(lines[1]).toContain('"Hodrick–Prescott, λ = 1 600; 100 × log",');
    expect(lines[1]).toContain('data as of 2025-02-14, vintage 2');
    const x = await economist.get(`/api/v1/studies/${s.id}/export?format=xlsx`).buffer(true).parse(asBytes as never);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(x.body as never);
    expect(wb.worksheets.map((w) => w.name)).toEqual(['Observations', 'About']);
    expect(wb.worksheets[1].getSheetValues().some((r) => Array.isArray(r) && r[1] === 'Caution' && /^end-of-sample estimates are revised/.test(String(r[2])))).toBe(true);
  });
});

describe('real-time revision analysis', () => {
  it('matches numpy and statsmodels on the demo GDP (fixture from scripts/make_realtime_reference.py)', async () => {
    const own = await makeTestApp({}, { seedDemo: true });
    try {
      const a = await signedIn(own, 'economist@demo.test');
      const id = (await own.db('series').where('code', 'EST_GDP_REAL').first()).id;
      const s = (await a.post('/api/v1/studies').send({ title: 'rt', seriesId: id, vintage: 'latest', transform: 'log100', method: 'hp', params: { lambda: 1600 } }).expect(201)).body;
      const res = await a.post(`/api/v1/studies/${s.id}/realtime`).expect(200);
      expect(res.body.realTime.map((p: { period: string }) => p.period)).toEqual(fixture.realTime.map((p: { period: string }) => p.period));
      expect(relativeError(res.body.realTime.map((p: { value: number }) => p.value), fixture.realTime.map((p: { value: number }) => p.value))).toBeLessThan(1e-8);
      expect(relativeError(res.body.quasiRealTime.map((q: { value: number }) => q.value), fixture.quasiRealTime.map((q: { value: number }) => q.value))).toBeLessThan(1e-8);
      for (const which of ['realTime', 'quasiRealTime'] as const) {
        const ours = res.body.statistics[which];
        const ref = fixture.statistics[which];
        expect(ours.n).toBe(ref.n);
        for (const k of ['correlation', 'noiseToSignal', 'oppositeSign', 'meanAbsoluteRevision', 'meanRevision', 'rmseToSd']) {
          expect(Math.abs(ours[k] - ref[k]), `${which}.${k}`).toBeLessThan(1e-8 * Math.max(1, Math.abs(ref[k])));
        }
      }
      expect(res.body.fan).toHaveLength(4);
      expect(res.body.note).toMatch(/few periods/);
    } finally {
      await own.close();
    }
  });

  it('streams its progress', async () => {
    const s = (await economist.post('/api/v1/studies').send(study({ title: 'rt2', method: 'hamilton', params: {} })).expect(201)).body;
    const res = await economist
      .post(`/api/v1/studies/${s.id}/realtime`)
      .set('Accept', 'application/x-ndjson')
      .buffer(true)
      .parse(asText as never)
      .expect(200);
    const events = ndjsonEvents(res.body);
    expect(events.filter((e) => e.type === 'progress').length).toBeGreaterThan(1);
    const result = events[events.length - 1];
    expect(result.type).toBe('result');
    expect(result.result.statistics.quasiRealTime.n).toBeGreaterThan(50);
  });
});
