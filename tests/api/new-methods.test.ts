/**
 * The methods bn-filter, uc, hp-forecast and hamilton-average through POST /decompose (API.md,
 * second round): parameters echoed with the defaults of the frequency, the extra outputs and
 * diagnostics, and clear 400s. Numbers are checked against statsmodels/numpy in
 * tests/unit/methods-references.test.ts; here the answers must equal the library's.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decompose } from '../../server/analysis/index.js';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { references as R } from '../helpers/references.js';
import { signedIn } from '../helpers/session.js';

let t: TestApp;
let agent: Awaited<ReturnType<typeof signedIn>>;
beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  agent = await signedIn(t, 'economist@demo.test');
});
afterAll(async () => {
  await t.close();
});

const gdp = R.series.realgdp as number[];
const post = (body: object) => agent.post('/api/v1/decompose').send({ frequency: 'Q', start: '1959-Q1', values: gdp, transform: 'log100', ...body });

describe('new methods through POST /api/v1/decompose', () => {
  it('GET /methods lists them with their parameters and defaults by frequency', async () => {
    const res = await agent.get('/api/v1/methods').expect(200);
    const byId = Object.fromEntries(res.body.methods.map((m: { id: string }) => [m.id, m]));
    expect(byId['bn-filter'].defaults).toEqual({ Q: { p: 12, delta: 'auto' }, M: { p: 36, delta: 'auto' }, A: { p: 4, delta: 'auto' } });
    expect(byId['hp-forecast'].defaults.M).toEqual({ lambda: 14400, arOrder: 'bic', horizon: 36 });
    expect(byId['hamilton-average'].defaults.A).toEqual({ hMin: 1, hMax: 3, p: 1 });
    expect(byId.uc.defaults.Q).toEqual({ trend: 'local-linear', bandLevel: 0.9 });
    expect(byId.uc.twoSided).toBe(true);
    expect(byId['bn-filter'].twoSided).toBe(false);
  });

  it('bn-filter: δ "auto" echoed, the chosen δ and the AR coefficients in diagnostics, as the library computes', async () => {
    const res = await post({ method: 'bn-filter' }).expect(200);
    expect(res.body.params).toEqual({ p: 12, delta: 'auto' });
    expect(res.body.diagnostics.delta).toBeCloseTo(0.232, 6);
    expect(res.body.diagnostics.arCoefficients).toHaveLength(12);
    const lib = decompose({ frequency: 'Q', values: gdp, transform: 'log100', method: 'bn-filter' });
    expect(res.body.cycle[150]).toBeCloseTo(lib.cycle[150], 12);
    expect(res.body.cycle.slice(0, 12).every((v: unknown) => v === null)).toBe(true);
    const none = await post({ method: 'bn-filter', params: { p: 1, delta: 'none' } }).expect(200);
    expect(none.body.params).toEqual({ p: 1, delta: 'none' });
    expect(none.body.diagnostics.delta).toBeNull();
  });

  it('uc: cycleLower and cycleUpper around the cycle, loglike and params in diagnostics', async () => {
    const res = await post({ method: 'uc', params: { trend: 'random-walk-drift', bandLevel: 0.68 } }).expect(200);
    expect(res.body.params).toEqual({ trend: 'random-walk-drift', bandLevel: 0.68 });
    expect(res.body.cycleLower).toHaveLength(gdp.length);
    expect(res.body.cycleLower[100]).toBeLessThan(res.body.cycle[100]);
    expect(res.body.cycleUpper[100]).toBeGreaterThan(res.body.cycle[100]);
    expect(Object.keys(res.body.diagnostics.params).sort()).toEqual(['phi1', 'phi2', 'sigma2Cycle', 'sigma2Level']);
    expect(res.body.diagnostics.loglike).toBeCloseTo(-249.9274, 3); // statsmodels' fit: −249.92741308
    expect(res.body.warnings.some((w: string) => /68 % band takes the estimated parameters as known/.test(w))).toBe(true);
  });

  it('hp-forecast: the forecast periods are appended, labelled and named by period', async () => {
    const res = await post({ method: 'hp-forecast', params: { horizon: 8 } }).expect(200);
    expect(res.body.params).toEqual({ lambda: 1600, arOrder: 'bic', horizon: 8 });
    expect(res.body.extension).toEqual({ from: gdp.length, periods: 8, label: 'forecast' });
    expect(res.body.periods).toHaveLength(gdp.length + 8);
    expect(res.body.periods.at(-1)).toBe('2011-Q3');
    expect(res.body.input.at(-1)).toBeNull();
    expect(res.body.cycle.at(-1)).toBeNull();
    expect(typeof res.body.trend.at(-1)).toBe('number');
    expect(res.body.forecast[gdp.length]).toBeGreaterThan(res.body.input[gdp.length - 1] - 5);
    expect(res.body.diagnostics.arOrder).toBe(1);
  });

  it('hamilton-average: defaults by frequency echoed', async () => {
    const res = await post({ method: 'hamilton-average' }).expect(200);
    expect(res.body.params).toEqual({ hMin: 4, hMax: 12, p: 4 });
    expect(res.body.cycle.slice(0, 15).every((v: unknown) => v === null)).toBe(true);
    expect(typeof res.body.cycle[15]).toBe('number');
    const annual = await agent.post('/api/v1/decompose').send({ frequency: 'A', values: gdp.slice(0, 60), transform: 'log100', method: 'hamilton-average' }).expect(200);
    expect(annual.body.params).toEqual({ hMin: 1, hMax: 3, p: 1 });
  });

  it('refuses bad parameters with 400 and a sentence that says what to change', async () => {
    const delta = await post({ method: 'bn-filter', params: { delta: 'maybe' } }).expect(400);
    expect(delta.body.error.message).toMatch(/delta must be a number or "auto" or "none"/);
    const horizons = await post({ method: 'hamilton-average', params: { hMin: 8, hMax: 4 } }).expect(400);
    expect(horizons.body.error.message).toMatch(/hMax must be at least hMin/);
    const band = await post({ method: 'uc', params: { bandLevel: 0.95 } }).expect(400);
    expect(band.body.error.message).toMatch(/bandLevel must be 0.68 or 0.9/);
    const gaps = await agent.post('/api/v1/decompose').send({ frequency: 'Q', values: [...gdp.slice(0, 50), null, ...gdp.slice(51, 100)], method: 'hp-forecast' }).expect(400);
    expect(gaps.body.error.code).toBe('gaps_not_supported');
  });
});
