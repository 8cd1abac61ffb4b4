/** Properties of the estimators that hold whatever the data, each named as it is checked. */
import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { AnalysisError, decompose, gainCurve, reliability, turningPoints } from '../../server/analysis/index.js';
import { cutoffPeriod, lambdaForCutoff, ravnUhlig } from '../../server/schemas/methods.js';
import { christianoFitzgerald, baxterKingWeights } from '../../server/analysis/bandpass.js';
import { whittakerTrendWeighted } from '../../server/analysis/whittaker.js';
import { hpOneSidedTrendWeighted } from '../../server/analysis/hp-one-sided.js';
import { stencil } from '../../server/analysis/differences.js';
import { references as R, relativeError } from '../helpers/references.js';

const logGdp = (R.series.realgdp as number[]).map((v) => 100 * Math.log(v));

function denseWhittaker(y: number[], w: number[], lambda: number, order: number): number[] {
  const n = y.length;
  const s = stencil(order);
  const A = Matrix.zeros(n, n);
  for (let i = 0; i < n; i++) A.set(i, i, w[i]);
  for (let r = 0; r + order < n; r++) for (let a = 0; a <= order; a++) for (let b = 0; b <= order; b++) A.set(r + a, r + b, A.get(r + a, r + b) + lambda * s[a] * s[b]);
  const rhs = Matrix.columnVector(y.map((v, i) => (w[i] ? v * w[i] : 0)));
  return solve(A, rhs).getColumn(0);
}

describe('Hodrick–Prescott properties', () => {
  it('a straight line has zero HP cycle (any λ)', () => {
    const line = Array.from({ length: 120 }, (_, t) => 3 + 0.25 * t);
    for (const lambda of [1e-6, 1600, 1e12]) {
      const r = decompose({ frequency: 'Q', values: line, method: 'hp', params: { lambda } });
      expect(Math.max(...Array.from(r.cycle, Math.abs))).toBeLessThan(1e-11);
    }
  });
  it('the HP cycle sums to zero and is orthogonal to time', () => {
    for (const lambda of [100, 1600, 400000]) {
      const r = decompose({ frequency: 'Q', values: logGdp, method: 'hp', params: { lambda } });
      let sum = 0;
      let timeDot = 0;
      let scale = 0;
      r.cycle.forEach((c, t) => {
        sum += c;
        timeDot += t * c;
        scale += Math.abs(c) * (t + 1);
      });
      expect(Math.abs(sum) / scale).toBeLessThan(1e-12);
      expect(Math.abs(timeDot) / scale).toBeLessThan(1e-12);
    }
  });
  it('the gain of HP at λ = 1600 is one half at a period of about 39.7 quarters', () => {
    const p = cutoffPeriod(1600)!;
    expect(p).toBeGreaterThan(39.6);
    expect(p).toBeLessThan(39.8);
    const curve = gainCurve({ method: 'hp', params: { lambda: 1600 } });
    // Interpolate the cycle gain at the cut-off: one half.
    const i = curve.periods.findIndex((q) => q > p);
    const t = (p - curve.periods[i - 1]) / (curve.periods[i] - curve.periods[i - 1]);
    const g = curve.gain[i - 1] + t * (curve.gain[i] - curve.gain[i - 1]);
    expect(Math.abs(g - 0.5)).toBeLessThan(2e-3);
  });
  it('Ravn–Uhlig scaling gives 6.25 (annual) and 129 600 (monthly)', () => {
    expect(ravnUhlig('A')).toBe(6.25);
    expect(ravnUhlig('M')).toBe(129600);
    expect(ravnUhlig('Q')).toBe(1600);
  });
  it('λ and cut-off period convert both ways', () => {
    for (const lambda of [6.25, 100, 1600, 14400, 129600, 400000]) expect(lambdaForCutoff(cutoffPeriod(lambda)!) / lambda).toBeCloseTo(1, 10);
    for (const order of [1, 3]) expect(lambdaForCutoff(cutoffPeriod(50, order)!, order) / 50).toBeCloseTo(1, 10);
  });
  it('whittaker order 2 equals hp; orders 1 and 3 match a dense solve', () => {
    const y = logGdp.slice(0, 80);
    const hp = decompose({ frequency: 'Q', values: y, method: 'hp', params: { lambda: 1600 } });
    const w2 = decompose({ frequency: 'Q', values: y, method: 'whittaker', params: { lambda: 1600, order: 2 } });
    expect(relativeError(w2.trend, hp.trend)).toBe(0);
    for (const order of [1, 3] as const) {
      const r = decompose({ frequency: 'Q', values: y, method: 'whittaker', params: { lambda: 50, order } });
      expect(relativeError(r.trend, denseWhittaker(y, y.map(() => 1), 50, order))).toBeLessThan(1e-10);
    }
  });
});

describe('missing values', () => {
  it('interior gaps enter with weight zero: the trend runs through them (dense solve of (W + λDᵀD)τ = Wy)', () => {
    const y: (number | null)[] = logGdp.slice(0, 60);
    y[10] = null;
    y[11] = null;
    y[30] = null;
    const r = decompose({ frequency: 'Q', values: y, method: 'hp' });
    const w = y.map((v) => (v === null ? 0 : 1));
    const dense = denseWhittaker(y.map((v) => v ?? 0), w, 1600, 2);
    expect(relativeError(r.trend, dense)).toBeLessThan(1e-10);
    expect(Number.isNaN(r.cycle[10])).toBe(true);
    expect(Number.isFinite(r.trend[10])).toBe(true);
    expect(r.warnings.some((m) => /missing value/.test(m))).toBe(true);
  });
  it('leading and trailing missing values are trimmed and kept as missing', () => {
    const core = logGdp.slice(0, 40);
    const y = [null, null, ...core, null];
    const r = decompose({ frequency: 'Q', values: y, method: 'hp' });
    const plain = decompose({ frequency: 'Q', values: core, method: 'hp' });
    expect(Number.isNaN(r.trend[0]) && Number.isNaN(r.trend[1]) && Number.isNaN(r.trend[42])).toBe(true);
    expect(relativeError(r.trend.slice(2, 42), plain.trend)).toBe(0);
  });
  it('weights of one give the unweighted answer', () => {
    const y = logGdp.slice(0, 50);
    const a = whittakerTrendWeighted(y, new Float64Array(50).fill(1), 1600, 2);
    const b = decompose({ frequency: 'Q', values: y, method: 'hp' }).trend;
    expect(relativeError(a, b)).toBeLessThan(1e-10);
  });
  it('one-sided HP with a gap equals the end points of the weighted two-sided filter on expanding samples', () => {
    const y = logGdp.slice(0, 40).map((v, i) => (i === 12 || i === 25 ? NaN : v));
    const w = y.map((v) => (Number.isNaN(v) ? 0 : 1));
    const one = hpOneSidedTrendWeighted(y, w, 1600);
    for (let t = 3; t < 40; t++) {
      const two = whittakerTrendWeighted(y.slice(0, t + 1), w.slice(0, t + 1), 1600, 2);
      expect(Math.abs(one[t] - two[t]) / Math.abs(two[t])).toBeLessThan(1e-10);
    }
  });
});

describe('band-pass filters', () => {
  it('Baxter–King weights are symmetric and sum to zero', () => {
    const w = baxterKingWeights(6, 32, 12);
    expect(Math.abs(w.reduce((a, b) => a + b, 0))).toBeLessThan(1e-15);
    for (let j = 0; j < 12; j++) expect(w[j]).toBe(w[24 - j]);
  });
  it('Christiano–Fitzgerald by FFT (long series) equals the direct sums', () => {
    const n = 3000;
    const y = Array.from({ length: n }, (_, t) => Math.sin(t / 7) + 0.01 * t + Math.cos(t / 31));
    const fast = christianoFitzgerald(y, 6, 32, true).cycle;
    // Direct O(n²) evaluation of the statsmodels formula.
    const a = (2 * Math.PI) / 32;
    const b = (2 * Math.PI) / 6;
    const B = (j: number) => (j === 0 ? (b - a) / Math.PI : (Math.sin(b * j) - Math.sin(a * j)) / (Math.PI * j));
    const slope = (y[n - 1] - y[0]) / (n - 1);
    const x = y.map((v, t) => v - t * slope);
    for (const t of [0, 1, 2, 500, 1499, 2997, 2998, 2999]) {
      let s = B(0) * x[t];
      let up = 0;
      for (let j = 1; j <= n - t - 2; j++) {
        s += B(j) * x[t + j];
        up += B(j);
      }
      let down = 0;
      for (let j = 1; j <= t - 1; j++) {
        s += B(j) * x[t - j];
        down += B(j);
      }
      const Bt = -0.5 * B(0) - up;
      s += Bt * x[n - 1] + (-B(0) - up - down - Bt) * x[0];
      expect(Math.abs(fast[t] - s)).toBeLessThan(1e-10);
    }
  });
});

describe('turning points (Harding–Pagan rules)', () => {
  it('finds one peak and one trough per cycle of a sine wave with a 20-quarter period', () => {
    const c = Array.from({ length: 100 }, (_, t) => Math.sin((2 * Math.PI * t) / 20));
    const tps = turningPoints(c, 'Q');
    const peaks = tps.filter((p) => p.type === 'peak').map((p) => p.index);
    expect(peaks).toEqual([5, 25, 45, 65, 85]);
    expect(tps.every((p, i) => i === 0 || p.type !== tps[i - 1].type)).toBe(true);
  });
  it('censors phases shorter than two quarters and cycles shorter than five', () => {
    // A blip inside an expansion: a one-quarter dip is not a recession.
    const c = [0, 1, 2, 3, 2.9, 3.5, 4, 5, 6, 5, 4, 3, 2, 1, 0, 1, 2, 3, 4];
    const tps = turningPoints(c, 'Q');
    expect(tps.map((p) => `${p.type}@${p.index}`)).toEqual(['peak@8', 'trough@14']);
  });
});

describe('reliability statistics (Orphanides and van Norden 2002) — a hand-computable case', () => {
  it('computes COR, N/S, OPSIGN and the mean absolute revision', () => {
    const final = [1, -1, 2, -2];
    const realTime = [2, -1, 1, 1];
    // revisions (real-time − final): 1, 0, −1, 3; mean 0.75; sd = sqrt(((.25)²+(.75)²+(1.75)²+(2.25)²)/3) = sqrt(8.75/3)
    // sd(final) = sqrt((1+1+4+4)/3) = sqrt(10/3) (mean 0)
    const r = reliability(realTime, final);
    expect(r.n).toBe(4);
    expect(r.noiseToSignal).toBeCloseTo(Math.sqrt(8.75 / 3) / Math.sqrt(10 / 3), 12);
    expect(r.oppositeSign).toBe(0.25);
    expect(r.meanAbsoluteRevision).toBe(1.25);
    // corr: Σ(r−r̄)(f−f̄) = 1.25·1 + (−1.75)(−1) + 0.25·2 + 0.25·(−2) = 3; Σ(r−r̄)² = 4.75; Σf² = 10
    expect(r.correlation).toBeCloseTo(3 / Math.sqrt(47.5), 12);
  });
});

describe('validation: each bad request says what to change', () => {
  const y = logGdp.slice(0, 40);
  const cases: [string, Parameters<typeof decompose>[0], string, RegExp][] = [
    ['unknown method', { frequency: 'Q', values: y, method: 'kalman' as never }, 'unknown_method', /choose one of/],
    ['λ ≤ 0', { frequency: 'Q', values: y, method: 'hp', params: { lambda: 0 } }, 'invalid_parameter', /greater than 0/],
    ['λ not finite', { frequency: 'Q', values: y, method: 'hp', params: { lambda: Infinity } }, 'invalid_parameter', /finite/],
    ['order outside 1–3', { frequency: 'Q', values: y, method: 'whittaker', params: { order: 4 } }, 'invalid_parameter', /1, 2 or 3/],
    ['hp with 2 points', { frequency: 'Q', values: [1, 2], method: 'hp' }, 'series_too_short', /at least 3/],
    ['hamilton too short', { frequency: 'Q', values: y.slice(0, 12), method: 'hamilton' }, 'series_too_short', /at least 17/],
    ['baxter-king too short', { frequency: 'Q', values: y.slice(0, 24), method: 'baxter-king' }, 'series_too_short', /at least 25/],
    ['NaN in values', { frequency: 'Q', values: [1, NaN, 3] as number[], method: 'hp' }, 'invalid_values', /values\[1\]/],
    ['a string in values', { frequency: 'Q', values: [1, '2' as unknown as number, 3], method: 'hp' }, 'invalid_values', /text "2"/],
    ['log of zero', { frequency: 'Q', start: '2000-Q1', values: [1, 0, 3, 4], transform: 'log', method: 'hp' }, 'log_of_non_positive', /2000-Q2/],
    ['unknown parameter', { frequency: 'Q', values: y, method: 'hp', params: { lamda: 5 } }, 'invalid_parameter', /no parameter lamda/],
    ['l1 without λ', { frequency: 'Q', values: y, method: 'l1-trend' }, 'missing_parameter', /needs params.lambda/],
    ['bad start', { frequency: 'Q', start: '2000Q1', values: y, method: 'hp' }, 'invalid_start', /2000Q1/],
    ['CF with a gap', { frequency: 'Q', values: [...y.slice(0, 10), null, ...y.slice(11)], method: 'christiano-fitzgerald' }, 'gaps_not_supported', /without gaps/],
  ];
  for (const [name, req, code, message] of cases) {
    it(name, () => {
      try {
        decompose(req);
        expect.unreachable('should have thrown');
      } catch (error) {
        expect(error).toBeInstanceOf(AnalysisError);
        expect((error as AnalysisError).code).toBe(code);
        expect((error as AnalysisError).message).toMatch(message);
      }
    });
  }
  it('takes 1 000 000 values and refuses 1 000 001', () => {
    const big = new Array(1_000_000).fill(0).map((_, i) => Math.sin(i / 50));
    expect(decompose({ frequency: 'M', values: big, method: 'hp' }).trend.length).toBe(1_000_000);
    expect(() => decompose({ frequency: 'M', values: [...big, 1], method: 'hp' })).toThrow(/at most 1,000,000/);
  });
  it('fills every default into params', () => {
    expect(decompose({ frequency: 'M', values: y, method: 'hp' }).params).toEqual({ lambda: 14400 });
    expect(decompose({ frequency: 'Q', values: y, method: 'christiano-fitzgerald' }).params).toEqual({ low: 6, high: 32, drift: true });
    expect(decompose({ frequency: 'A', values: y, method: 'hamilton' }).params).toEqual({ h: 2, p: 1 });
  });
  it('log100 reads the cycle as a percent deviation from trend', () => {
    const r = decompose({ frequency: 'Q', values: R.series.realgdp, transform: 'log100', method: 'hp' });
    const log = decompose({ frequency: 'Q', values: R.series.realgdp, transform: 'log', method: 'hp' });
    expect(r.input[0]).toBeCloseTo(100 * Math.log(2710.349), 10);
    // HP is linear: the 100 × log cycle is 100 times the log cycle.
    expect(relativeError(r.cycle, Array.from(log.cycle, (c) => 100 * c))).toBeLessThan(1e-12);
    // And it is the percent deviation of the series from exp(trend): 100(y/T − 1) = c + c²/200 + O(c³).
    const y = R.series.realgdp as number[];
    r.cycle.forEach((c, i) => {
      const percent = 100 * (y[i] / Math.exp(r.trend[i] / 100) - 1);
      expect(Math.abs(percent - c - (c * c) / 200)).toBeLessThan(Math.abs(c) ** 3 / 1e4 + 1e-9);
    });
  });
});
