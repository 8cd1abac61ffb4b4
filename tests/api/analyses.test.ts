/**
 * POST /studies/range and POST /series/:series/reliability (API.md, second round): the range of
 * estimates across methods on aligned periods, and the real-time reliability table over a
 * series' vintages, with progress. The statistics are recomputed here from the library's
 * decompositions of each vintage with textbook formulas written out in this file.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decompose } from '../../server/analysis/index.js';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { ndjsonEvents } from '../helpers/parsers.js';
import { references as R } from '../helpers/references.js';
import { signedIn } from '../helpers/session.js';

let t: TestApp;
let economist: Awaited<ReturnType<typeof signedIn>>;
let steward: Awaited<ReturnType<typeof signedIn>>;
let gdpId: number;
let relId: number;
const gdp = R.series.realgdp as number[];
const periods = R.periods as string[];
const FIRST_END = 140; // the first vintage ends at periods[139] (1993-Q4); one more quarter per vintage
const VINTAGES = 12;

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  economist = await signedIn(t, 'economist@demo.test');
  steward = await signedIn(t, 'steward@demo.test');
  gdpId = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
  relId = (await steward.post('/api/v1/series').send({ code: 'REL_USGDP', title: 'US real GDP (statsmodels macro data), one quarter more per vintage', frequency: 'Q', unit: 'USD billion', seasonalAdjustment: 'sa', source: 'test' }).expect(201)).body.id;
  for (let k = 0; k < VINTAGES; k++) {
    const end = FIRST_END + k;
    const csv = ['period,value', ...periods.slice(0, end).map((p, i) => `${p},${gdp[i]}`)].join('\n');
    const asOf = `2001-${String(1 + (k % 12)).padStart(2, '0')}-15`;
    await steward.post(`/api/v1/series/${relId}/vintages`).attach('file', Buffer.from(csv), `v${k + 1}.csv`).field('asOf', asOf).expect(201);
  }
}, 120_000);
afterAll(async () => {
  await t.close();
});

describe('POST /api/v1/studies/range', () => {
  it('aligns the methods’ cycles and gives the median, minimum and maximum of those present at each period', async () => {
    const methods = [{ method: 'hp' }, { method: 'hamilton' }, { method: 'bn-filter', params: { delta: 0.3 } }, { method: 'hp-forecast', params: { horizon: 4 } }];
    const res = await economist.post('/api/v1/studies/range').send({ seriesId: gdpId, vintage: 4, transform: 'log100', methods }).expect(200);
    const b = res.body;
    expect(b.items.map((i: { method: string }) => i.method)).toEqual(['hp', 'hamilton', 'bn-filter', 'hp-forecast']);
    expect(b.items[2].params).toEqual({ p: 12, delta: 0.3 });
    expect(b.items.map((i: { name: string }) => i.name)).toContain('Beveridge–Nelson filter');
    // The forecast extension's 4 periods, on which no method has a cycle, are not part of the range.
    const preview = (await economist.post('/api/v1/studies/preview').send({ seriesId: gdpId, vintage: 4, transform: 'log100', method: 'hp' }).expect(200)).body;
    expect(b.periods).toEqual(preview.periods);
    expect(b.items[0].cycle).toEqual(preview.cycle);
    expect(b.count.at(-1)).toBeGreaterThan(0);
    expect(b.median.at(-1)).not.toBeNull();
    for (let i = 0; i < b.periods.length; i++) {
      const present = b.items.map((it: { cycle: (number | null)[] }) => it.cycle[i]).filter((v: number | null) => v !== null).sort((x: number, y: number) => x - y);
      expect(b.count[i]).toBe(present.length);
      if (!present.length) continue;
      const k = present.length;
      const median = k % 2 ? present[(k - 1) / 2] : (present[k / 2 - 1] + present[k / 2]) / 2;
      expect(b.min[i]).toBe(present[0]);
      expect(b.max[i]).toBe(present[k - 1]);
      expect(b.median[i]).toBeCloseTo(median, 12);
    }
    expect(b.count.filter((c: number) => c === 4).length).toBeGreaterThan(40);
    expect(b.cautions.some((c: string) => /not a forecast/.test(c))).toBe(true);
  });

  it('refuses one method, an unknown method, and a method that fails, saying which', async () => {
    const one = await economist.post('/api/v1/studies/range').send({ seriesId: gdpId, methods: [{ method: 'hp' }] }).expect(400);
    expect(one.body.error.message).toMatch(/at least two methods/);
    const unknown = await economist.post('/api/v1/studies/range').send({ seriesId: gdpId, methods: [{ method: 'hp' }, { method: 'magic' }] }).expect(400);
    expect(unknown.body.error.message).toMatch(/Choose a method/);
    const bad = await economist.post('/api/v1/studies/range').send({ seriesId: gdpId, methods: [{ method: 'hp' }, { method: 'hamilton', params: { h: 120 } }] }).expect(400);
    expect(bad.body.error.message).toMatch(/^methods\[1\] \(Hamilton regression filter\)/);
  });

  it('is for economists', async () => {
    const editor = await signedIn(t, 'editor@demo.test');
    await editor.post('/api/v1/studies/range').send({ seriesId: gdpId, methods: [{ method: 'hp' }, { method: 'hamilton' }] }).expect(403);
  });
});

const mean = (a: number[]) => a.reduce((s, v) => s + v, 0) / a.length;
const sd = (a: number[]) => Math.sqrt(a.reduce((s, v) => s + (v - mean(a)) ** 2, 0) / (a.length - 1));
const pearson = (a: number[], b: number[]) => a.reduce((s, v, i) => s + (v - mean(a)) * (b[i] - mean(b)), 0) / ((a.length - 1) * sd(a) * sd(b));

describe('POST /api/v1/series/:series/reliability', () => {
  it('gives each method’s Orphanides–van Norden statistics over the vintages, by series code, with progress', async () => {
    const methods = [{ method: 'hp' }, { method: 'hamilton' }];
    const res = await economist.post('/api/v1/series/REL_USGDP/reliability').set('Accept', 'application/x-ndjson').send({ transform: 'log100', methods }).expect(200);
    const events = ndjsonEvents(res.text);
    const progress = events.filter((e) => e.type === 'progress');
    expect(progress.at(-1)).toMatchObject({ done: 2, total: 2 });
    const result = events.find((e) => e.type === 'result').result;
    expect(result.vintages).toBe(VINTAGES);
    const logged = gdp.map((v) => 100 * Math.log(v));
    for (const [k, m] of methods.entries()) {
      const final = decompose({ frequency: 'Q', values: logged.slice(0, FIRST_END + VINTAGES - 1), method: m.method }).cycle;
      const rt: number[] = [];
      const fi: number[] = [];
      for (let v = 0; v < VINTAGES - 1; v++) {
        const end = FIRST_END + v;
        const c = decompose({ frequency: 'Q', values: logged.slice(0, end), method: m.method }).cycle;
        rt.push(c[end - 1]);
        fi.push(final[end - 1]);
      }
      const rev = rt.map((v, i) => v - fi[i]);
      const s = result.items[k].statistics;
      expect(s.periods).toBe(VINTAGES - 1);
      expect(s.correlation).toBeCloseTo(pearson(rt, fi), 10);
      expect(s.noiseToSignal).toBeCloseTo(sd(rev) / sd(fi), 10);
      expect(s.meanAbsoluteRevision).toBeCloseTo(mean(rev.map(Math.abs)), 10);
      expect(s.signChangeShare).toBeCloseTo(rt.filter((v, i) => Math.sign(v) !== Math.sign(fi[i])).length / rt.length, 12);
      // The revision band: distance 0 is the spread of the end-point revisions final − real-time.
      const spread0 = result.items[k].revisionSpread[0];
      expect(spread0.count).toBe(VINTAGES - 1);
      expect(spread0.sd).toBeCloseTo(sd(rev.map((r) => -r)), 10);
      const last = result.items[k].revisionBand.at(-1);
      expect(last.distance).toBe(0);
      // …drawn around the latest estimate at its last period: value + the 5 % and 95 % quantiles (numpy's linear rule).
      const sorted = rev.map((r) => -r).sort((x, y) => x - y);
      const q = (p: number) => sorted[Math.floor((sorted.length - 1) * p)] + ((sorted.length - 1) * p - Math.floor((sorted.length - 1) * p)) * (sorted[Math.floor((sorted.length - 1) * p) + 1] - sorted[Math.floor((sorted.length - 1) * p)]);
      expect(last.value).toBeCloseTo(final[FIRST_END + VINTAGES - 2], 10);
      expect(last.lower).toBeCloseTo(last.value + q(0.05), 10);
      expect(last.upper).toBeCloseTo(last.value + q(0.95), 10);
    }
    // The study option: a saved study's real-time analysis carries the same band for its method.
    const study = (await economist.post('/api/v1/studies').send({ title: 'band', seriesId: relId, vintage: 'latest', transform: 'log100', method: 'hp' }).expect(201)).body;
    const realtime = (await economist.post(`/api/v1/studies/${study.id}/realtime`).expect(200)).body;
    expect(realtime.revisionBand).toHaveLength(8);
    expect(realtime.revisionBand).toEqual(result.items[0].revisionBand);
    // A one-sided filter holds up better in real time than the two-sided HP filter on the same vintages.
    expect(result.items[1].statistics.noiseToSignal).toBeLessThan(result.items[0].statistics.noiseToSignal);
    expect(result.notes.some((n: string) => /not a forecast/.test(n))).toBe(true);
  });

  it('refuses a series with too few vintages (409) and a series that does not exist (404)', async () => {
    const missing = await economist.post('/api/v1/series/NO_SUCH/reliability').send({ methods: [{ method: 'hp' }] }).expect(404);
    expect(missing.body.error.message).toMatch(/NO_SUCH/);
    const few = (await steward.post('/api/v1/series').send({ code: 'REL_FEW', title: 'few (invented)', frequency: 'Q', unit: 'index', seasonalAdjustment: 'sa', source: 'test' }).expect(201)).body.id;
    await steward.post(`/api/v1/series/${few}/vintages`).attach('file', Buffer.from(['period,value', ...periods.slice(0, 40).map((p, i) => `${p},${gdp[i]}`)].join('\n')), 'a.csv').field('asOf', '2001-01-01').expect(201);
    const res = await economist.post(`/api/v1/series/${few}/reliability`).send({ methods: [{ method: 'hp' }] }).expect(409);
    expect(res.body.error.message).toMatch(/at least three vintages/);
  });
});
