/**
 * Pieces of gain functions (the modulus of a filter's frequency response at ω = 2π/P): the grid
 * of periods, the Whittaker–Henderson cycle gain, the gain of a set of weights, and the end-point
 * weights of the two-sided HP filter. Each linear method states its own gain in
 * server/analysis/methods/<id>.ts; gain-curve.ts draws it over the grid.
 */
import { factorToeplitz, solveFactored } from './banded.js';
import { applyDT } from './differences.js';

/** A method's gain over a grid of periods, for charts. */
export interface GainCurve {
  periods: number[];
  gain: number[];
  /** Period where the trend gain is one half (λ-based methods). */
  cutoff: number | null;
  band?: [number, number];
  note?: string;
}

/** Log-spaced periods from 2 to `maxPeriod`. */
export function periodGrid(maxPeriod: number, points = 160): number[] {
  const out: number[] = [];
  const lo = Math.log(2);
  const hi = Math.log(Math.max(4, maxPeriod));
  for (let i = 0; i < points; i++) out.push(Math.exp(lo + ((hi - lo) * i) / (points - 1)));
  return out;
}

/** Cycle gain of the Whittaker–Henderson smoother of `order` (2: Hodrick–Prescott): λx/(1 + λx), x = (2 − 2cos ω)^d. */
export function hpCycleGain(lambda: number, order: number, omega: number): number {
  const x = lambda * Math.pow(2 - 2 * Math.cos(omega), order);
  return x / (1 + x);
}

/** |Σⱼ wⱼ e^{−iω(j+offset)}|, or |1 − Σⱼ …| with `oneMinus`. */
export function complexGain(weights: ArrayLike<number>, omega: number, offset = 0, oneMinus = false): number {
  let re = 0;
  let im = 0;
  for (let j = 0; j < weights.length; j++) {
    re += weights[j] * Math.cos(omega * (j + offset));
    im -= weights[j] * Math.sin(omega * (j + offset));
  }
  if (oneMinus) {
    re = 1 - re;
    im = -im;
  }
  return Math.hypot(re, im);
}

/** End-point weights of the two-sided HP trend on a sample of n points: wⱼ on y_{n−1−j}. */
export function hpEndpointWeights(lambda: number, n: number): Float64Array {
  // τ_{n−1} = e_{n−1}ᵀ(I + λDᵀD)⁻¹y; the row is (I − Dᵀ(μI + DDᵀ)⁻¹D) e_{n−1} by symmetry.
  const m = n - 2;
  const f = factorToeplitz(m, [6 + 1 / lambda, -4, 1]);
  const De = new Float64Array(m);
  De[m - 1] = 1; // D·e_{n−1}: only the last row of D touches the last point, with coefficient +1
  const x = solveFactored(f, De);
  const c = applyDT(x, 2, n);
  const w = new Float64Array(n);
  for (let j = 0; j < n; j++) w[j] = (j === 0 ? 1 : 0) - c[n - 1 - j];
  return w;
}
