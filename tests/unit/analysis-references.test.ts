/**
 * The decomposition library against values computed outside the project. Every fixture is in
 * tests/fixtures/references.json, written by scripts/make_references.py with Debian's
 * python3-statsmodels 0.13.5, python3-scipy 1.10.1 and python3-numpy 1.24.2 on the public-domain
 * US macro data in datasets/reference/.
 */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { decompose } from '../../server/analysis/index.js';
import { factorBanded, solveFactored } from '../../server/analysis/banded.js';
import { pentadiagonalEigenvalues } from '../../server/analysis/eigen.js';
import { applyD } from '../../server/analysis/differences.js';
import { references as R, relativeError } from '../helpers/references.js';

const TOL = 1e-8;
const periods: string[] = R.periods;

describe('banded solver — against scipy.linalg.solveh_banded (LAPACK pbsv)', () => {
  for (const c of R.banded) {
    it(`n = ${c.n}, half-bandwidth ${c.b}`, () => {
      const band = new Float64Array(c.n * (c.b + 1));
      for (let k = 0; k <= c.b; k++) c.diagonals[k].forEach((v: number, i: number) => (band[i * (c.b + 1) + k] = v));
      const x = solveFactored(factorBanded(band, c.n, c.b), c.rhs);
      expect(relativeError(x, c.x)).toBeLessThan(1e-12);
    });
  }
});

describe('Hodrick–Prescott — against statsmodels hpfilter', () => {
  for (const c of R.hp) {
    it(`${c.input}, λ = ${c.lambda}: trend and cycle to 1e-8`, () => {
      const r = decompose({ frequency: 'Q', values: c.y, method: 'hp', params: { lambda: c.lambda } });
      expect(relativeError(r.trend, c.trend)).toBeLessThan(TOL);
      expect(relativeError(r.cycle, c.cycle)).toBeLessThan(TOL);
    });
  }
  it('whittaker order 2 gives the same numbers as hp', () => {
    const c = R.hp[0];
    const a = decompose({ frequency: 'Q', values: c.y, method: 'hp' });
    const b = decompose({ frequency: 'Q', values: c.y, method: 'whittaker', params: { order: 2 } });
    expect(relativeError(a.trend, b.trend)).toBe(0);
  });
});

describe('Hodrick–Prescott at extreme λ — against exact rational arithmetic', () => {
  for (const c of R.exactHp) {
    it(`λ = ${c.lambda}`, () => {
      const r = decompose({ frequency: 'Q', values: c.y, method: 'hp', params: { lambda: c.lambda } });
      expect(r.trend.every(Number.isFinite)).toBe(true);
      expect(relativeError(r.trend, c.trend)).toBeLessThan(1e-10);
      // The cycle itself (small at small λ) is accurate relative to its own size.
      if (c.cycle) expect(relativeError(r.cycle, c.cycle)).toBeLessThan(1e-8);
    });
  }
  for (const c of R.exactHpGaps) {
    it(`with gaps (weight zero), λ = ${c.lambda}`, () => {
      const r = decompose({ frequency: 'Q', values: c.y, method: 'hp', params: { lambda: c.lambda } });
      expect(relativeError(r.trend, c.trend)).toBeLessThan(1e-10);
    });
  }
  it('the documented worked example: y = [1,2,4,7,11], λ = 1 → [13/24, 9/4, 53/12, 29/4, 253/24]', () => {
    const r = decompose({ frequency: 'A', values: [1, 2, 4, 7, 11], method: 'hp', params: { lambda: 1 } });
    const exact = [13 / 24, 9 / 4, 53 / 12, 29 / 4, 253 / 24];
    expect(relativeError(r.trend, exact)).toBeLessThan(1e-14);
  });
});

describe('one-sided HP — against end points of statsmodels hpfilter on expanding samples', () => {
  for (const c of R.hpOneSided) {
    it(`λ = ${c.lambda}`, () => {
      const r = decompose({ frequency: 'Q', values: c.y, method: 'hp-one-sided', params: { lambda: c.lambda } });
      expect(relativeError(r.trend, c.trend)).toBeLessThan(TOL);
    });
    it(`λ = ${c.lambda}, through the updating factorization used with gaps`, async () => {
      const { hpOneSidedTrendWeighted } = await import('../../server/analysis/hp-one-sided.js');
      const t = hpOneSidedTrendWeighted(c.y, new Float64Array(c.y.length).fill(1), c.lambda);
      expect(relativeError(t, c.trend)).toBeLessThan(TOL);
    });
  }
});

describe('Baxter–King — against statsmodels bkfilter', () => {
  for (const c of R.baxterKing) {
    it(`${c.input}, (${c.low}, ${c.high}, K = ${c.k})`, () => {
      const r = decompose({ frequency: 'Q', values: c.y, method: 'baxter-king', params: { low: c.low, high: c.high, k: c.k } });
      expect(relativeError(r.cycle, c.cycle)).toBeLessThan(TOL);
    });
  }
});

describe('Christiano–Fitzgerald — against statsmodels cffilter', () => {
  for (const c of R.christianoFitzgerald) {
    it(`${c.input}, (${c.low}, ${c.high}), drift ${c.drift}`, () => {
      const r = decompose({ frequency: 'Q', values: c.y, method: 'christiano-fitzgerald', params: { low: c.low, high: c.high, drift: c.drift } });
      expect(relativeError(r.cycle, c.cycle)).toBeLessThan(TOL);
    });
  }
});

describe('Hamilton regression filter — against numpy.linalg.lstsq', () => {
  for (const c of R.hamilton) {
    it(`${c.input}, h = ${c.h}, p = ${c.p}`, () => {
      const r = decompose({ frequency: 'Q', values: c.y, method: 'hamilton', params: { h: c.h, p: c.p } });
      expect(relativeError(r.trend, c.trend)).toBeLessThan(TOL);
      expect(relativeError(r.cycle, c.cycle)).toBeLessThan(1e-7);
      expect(relativeError(r.diagnostics.coefficients as number[], c.coefficients)).toBeLessThan(1e-6);
      // First h + p − 1 periods have no value.
      expect(Array.from(r.cycle.slice(0, c.h + c.p - 1)).every(Number.isNaN)).toBe(true);
      expect(Number.isFinite(r.cycle[c.h + c.p - 1])).toBe(true);
    });
  }
});

describe('boosted HP — against iterated statsmodels hpfilter and a dense-matrix BIC', () => {
  for (const c of R.boostedHp) {
    it(`${c.input}: BIC stops after ${c.iterationsUsed} iterations with the same cycle`, () => {
      const r = decompose({ frequency: 'Q', values: c.y, method: 'boosted-hp', params: { lambda: c.lambda } });
      expect(r.diagnostics.iterationsUsed).toBe(c.iterationsUsed);
      expect(relativeError(r.diagnostics.criterion as number[], c.criterion)).toBeLessThan(1e-9);
      expect(relativeError(r.cycle, c.cycle)).toBeLessThan(TOL);
    });
    it(`${c.input}: three fixed iterations`, () => {
      const r = decompose({ frequency: 'Q', values: c.y, method: 'boosted-hp', params: { lambda: c.lambda, stopping: 'fixed', iterations: 3 } });
      expect(relativeError(r.cycle, c.cycleFixed3)).toBeLessThan(TOL);
    });
  }
});

describe('ℓ1 trend filtering — optimality and scipy lsq_linear on the dual', () => {
  for (const c of R.l1Trend) {
    it(`λ = ${c.lambda}`, () => {
      const r = decompose({ frequency: 'Q', values: c.y, method: 'l1-trend', params: { lambda: c.lambda } });
      const x = r.trend;
      const y = c.y as number[];
      const objective = (v: ArrayLike<number>) => {
        const d = applyD(v, 2);
        let s = 0;
        for (let i = 0; i < y.length; i++) s += 0.5 * (y[i] - v[i]) ** 2;
        for (let i = 0; i < d.length; i++) s += c.lambda * Math.abs(d[i]);
        return s;
      };
      expect(r.diagnostics.converged).toBe(true);
      // Our objective is no worse than the reference's, and within the reported duality gap of it.
      expect(objective(x)).toBeLessThanOrEqual(c.objective + 1e-7 * c.objective);
      expect(Math.abs(objective(x) - c.objective)).toBeLessThanOrEqual((r.diagnostics.dualityGap as number) + 1e-8 * c.objective);
      expect(relativeError(x, c.trend)).toBeLessThan(1e-6);
      // Optimality: ν = (y − x) satisfies Dᵀν = y − x with |ν| ≤ λ, and ν = ±λ where the kink is real.
      // Recover ν from y − x = Dᵀν by back substitution on the first rows of Dᵀ.
      const resid = y.map((v, i) => v - x[i]);
      const nu = new Float64Array(y.length - 2);
      nu[0] = resid[0];
      nu[1] = resid[1] + 2 * nu[0];
      for (let i = 2; i < nu.length; i++) nu[i] = resid[i] + 2 * nu[i - 1] - nu[i - 2];
      const d2 = applyD(x, 2);
      const scale = Math.max(...Array.from(d2, Math.abs));
      for (let i = 0; i < nu.length; i++) {
        expect(Math.abs(nu[i])).toBeLessThanOrEqual(c.lambda * (1 + 1e-6));
        if (Math.abs(d2[i]) > 1e-5 * scale) expect(Math.abs(Math.abs(nu[i]) - c.lambda)).toBeLessThan(1e-4 * c.lambda);
      }
    });
  }
});

describe('eigenvalues of DDᵀ — against scipy.linalg.eigvalsh', () => {
  for (const c of R.eigen) {
    it(`n = ${c.n}`, () => {
      const m = c.n - 2;
      const ev = pentadiagonalEigenvalues(new Float64Array(m).fill(6), new Float64Array(m).fill(-4), new Float64Array(m).fill(1));
      expect(relativeError(ev, c.eigenvalues)).toBeLessThan(1e-12);
    });
  }
});

describe('periods come back in SDMX form', () => {
  it('aligns with the reference data', () => {
    const r = decompose({ frequency: 'Q', start: '1959-Q1', values: R.series.realgdp, method: 'hp' });
    expect(r.periods).toEqual(periods);
    // Each period carries the value of its row in the raw file (year and quarter columns), read here directly.
    const rows = fs.readFileSync(path.join(import.meta.dirname, '..', '..', 'datasets', 'reference', 'us-macrodata-1959q1-2009q3.csv'), 'utf8').trim().split('\n').slice(1).map((l) => l.split(','));
    expect(rows.length).toBe(r.periods!.length);
    for (const row of [rows[0], rows[64], rows[rows.length - 1]]) {
      const at = r.periods!.indexOf(`${Number(row[0])}-Q${Number(row[1])}`);
      expect(r.input[at]).toBe(Number(row[2]));
    }
  });
});
