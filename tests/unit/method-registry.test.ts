/**
 * The method registry (server/analysis/methods/): every method is complete and self-consistent,
 * the shared steps of decompose() carry a method's extra series, diagnostics, warnings and
 * forecast extension into the answer, and the parameter kinds check what they describe.
 */
import { describe, expect, it } from 'vitest';
import { AnalysisError, decompose, describeMethods, METHOD_REGISTRY, resolveParams, toJsonResponse } from '../../server/analysis/index.js';
import { decomposeWith } from '../../server/analysis/decompose.js';
import { paramsSchema } from '../../server/analysis/methods/params.js';
import { defineMethod } from '../../server/analysis/methods/types.js';
import { FREQUENCIES } from '../../server/schemas/frequency.js';
import { references as R } from '../helpers/references.js';

const logGdp = (R.series.realgdp as number[]).map((v) => 100 * Math.log(v));

describe('every registered method', () => {
  it('has a unique id, and GET /methods describes exactly its parameters', () => {
    const ids = METHOD_REGISTRY.map((m) => m.id);
    expect(new Set(ids).size).toBe(ids.length);
    for (const d of describeMethods().methods) {
      const m = METHOD_REGISTRY.find((x) => x.id === d.id)!;
      expect(d.params.map((p) => p.name)).toEqual(Object.keys(m.params));
      expect(Object.keys(paramsSchema(m.params).shape)).toEqual(Object.keys(m.params));
      for (const p of d.params) expect(p.required, `${d.id}.${p.name}`).toBe(d.defaults.Q[p.name] === undefined);
    }
  });

  for (const m of METHOD_REGISTRY) {
    it(`${m.id}: its starting values pass its own checks and decompose the reference GDP at every frequency`, () => {
      const described = describeMethods().methods.find((d) => d.id === m.id)!;
      for (const f of FREQUENCIES) {
        const params = resolveParams(m.id, f, described.initial[f]);
        const r = decompose({ frequency: f, values: logGdp, method: m.id, params });
        // A forecast extension lengthens the outputs by its periods, and only then.
        expect(r.trend.length).toBe(logGdp.length + (r.extension?.periods ?? 0));
        // The trend follows the series: the cycle is small against the series' range (log GDP rises by ~110).
        const cycle = Array.from(r.cycle).filter(Number.isFinite);
        expect(cycle.length).toBeGreaterThan(logGdp.length / 2);
        expect(cycle.reduce((s, c) => s + Math.abs(c), 0) / cycle.length, `${m.id} at ${f}`).toBeLessThan(0.05 * (Math.max(...logGdp) - Math.min(...logGdp)));
        expect(r.warnings.some((w) => w.startsWith('Two-sided filter')), `${m.id} two-sided caution`).toBe(m.twoSided);
      }
    });
  }

  it('every linear method’s cycle filter removes the trend: its gain vanishes at very long periods', () => {
    for (const m of METHOD_REGISTRY.filter((x) => x.gain)) {
      const params = resolveParams(m.id, 'Q', {});
      // Boosted HP as the BIC typically stops it (a few rounds); the others ignore iterationsUsed.
      const g = m.gain!(params, { n: 200, diagnostics: { iterationsUsed: 2 } });
      expect(g.response((2 * Math.PI) / 1e5), m.id).toBeLessThan(1e-2);
      expect(g.response((2 * Math.PI) / 20), m.id).toBeGreaterThan(0.5); // a 5-year cycle passes
    }
  });

  it('a method that refuses gaps is refused with the names of those that take them', () => {
    const y: (number | null)[] = logGdp.slice(0, 80);
    y[30] = null;
    for (const m of METHOD_REGISTRY.filter((x) => x.gaps === 'refused')) {
      expect(() => decompose({ frequency: 'Q', values: y, method: m.id, params: resolveParams(m.id, 'Q', describeMethods().methods.find((d) => d.id === m.id)!.initial.Q) })).toThrow(/without gaps.*hamilton/);
    }
  });
});

/** A method as the next ones will be: a band around the cycle, free-form diagnostics, a forecast extension. */
const banded = defineMethod({
  id: 'test-banded',
  name: 'Test method with bands',
  twoSided: false,
  params: {
    width: { kind: 'number', label: 'Band width', min: 0 },
    delta: { kind: 'number', label: 'δ', choices: [{ value: 'auto', label: 'estimated' }, { value: 'none', label: 'none' }] },
    horizon: { kind: 'integer', label: 'Horizon', min: 0, max: 12 },
  },
  defaults: () => ({ width: 1, delta: 'auto', horizon: 2 }),
  minimumLength: () => ({ count: 3 }),
  gaps: 'refused',
  run(y, { width, delta, horizon }) {
    const n = y.length + horizon;
    const trend = new Float64Array(n);
    const cycle = new Float64Array(n).fill(NaN);
    for (let i = 0; i < n; i++) trend[i] = i < y.length ? y[i] - 1 : y[y.length - 1] - 1 + (i - y.length + 1);
    for (let i = 0; i < y.length; i++) cycle[i] = 1;
    const lower = cycle.map((c) => c - width);
    const upper = cycle.map((c) => c + width);
    return { trend, cycle, series: { cycleLower: lower, cycleUpper: upper }, diagnostics: { loglike: -12.5, params: { delta } }, warnings: ['from the method'], extension: { periods: horizon, label: 'forecast' } };
  },
  methodLine: (p) => `width ${p.width}`,
});

describe('the shared steps of decompose()', () => {
  it('carry extra series, diagnostics, warnings and a forecast extension into the JSON answer', () => {
    const r = decomposeWith(banded, { frequency: 'Q', start: '2020-Q1', values: [null, 10, 11, 12], method: 'test-banded' });
    // One leading missing value, three observations, two forecast periods: six periods in all.
    expect(r.periods).toEqual(['2020-Q1', '2020-Q2', '2020-Q3', '2020-Q4', '2021-Q1', '2021-Q2']);
    expect(r.extension).toEqual({ from: 4, periods: 2, label: 'forecast' });
    const json = toJsonResponse(r);
    expect(json.input).toEqual([null, 10, 11, 12, null, null]);
    expect(json.trend).toEqual([null, 9, 10, 11, 12, 13]);
    expect(json.cycleLower).toEqual([null, 0, 0, 0, null, null]);
    expect(json.cycleUpper).toEqual([null, 2, 2, 2, null, null]);
    expect(json.diagnostics).toEqual({ loglike: -12.5, params: { delta: 'auto' } });
    expect(json.warnings[json.warnings.length - 1]).toBe('from the method');
    expect(json.params).toEqual({ width: 1, delta: 'auto', horizon: 2 });
  });

  it('check a number-or-name parameter: a number, a named choice, and nothing else', () => {
    const run = (delta: unknown) => decomposeWith(banded, { frequency: 'Q', values: [1, 2, 3], method: 'test-banded', params: { delta } });
    expect(run(0.5).params.delta).toBe(0.5);
    expect(run('none').params.delta).toBe('none');
    try {
      run('sometimes');
      expect.unreachable('should have thrown');
    } catch (error) {
      expect(error).toBeInstanceOf(AnalysisError);
      expect((error as AnalysisError).message).toBe('params.delta: delta must be a number or "auto" or "none".');
    }
  });
});
