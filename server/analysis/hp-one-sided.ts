/**
 * The one-sided ("real-time") Hodrick–Prescott filter: the estimate at t is the end point of the
 * two-sided filter (whittaker.ts) on the sample y₀…yₜ. Complete series by one forward pass through
 * the Toeplitz factor; series with gaps by an updating factorization of the weighted system.
 * Reference check: the end points of statsmodels' hpfilter on expanding samples
 * (scripts/make_references.py, tests/unit/analysis-references.test.ts).
 */
import { toeplitzForward, toeplitzPivot } from './banded.js';
import { applyD } from './differences.js';
import { hpFactor } from './whittaker.js';

/**
 * One-sided ("real-time") HP cycle of a complete series: cₜ is the last point of the two-sided HP
 * cycle of y₀…yₜ. Because μI + DDᵀ is Toeplitz, the leading rows of its LDLᵀ factor do not depend
 * on the sample length, and the last element of the solution of an s×s system is wₛ₋₁/dₛ₋₁ after
 * forward substitution alone. The last element of Dᵀx is x's last element (the stencil ends in
 * +1), so one forward pass gives every end point: cₜ = w_{t−2}/d_{t−2}. O(n), and exactly the
 * arithmetic of the two-sided solve on each truncated sample.
 * The first two periods (fewer than three points) are NaN.
 */
export function hpOneSidedCycle(y: ArrayLike<number>, lambda: number): Float64Array {
  const n = y.length;
  const out = new Float64Array(n).fill(NaN);
  if (n < 3) return out;
  const m = n - 2;
  const f = hpFactor(lambda);
  const w = toeplitzForward(f, applyD(y, 2), m, new Float64Array(m));
  for (let t = 2; t < n; t++) out[t] = w[t - 2] / toeplitzPivot(f, t - 2);
  return out;
}

/**
 * One-sided HP trend with weights (gaps inside the sample). Updating factorization: extending
 * the sample from N−1 to N points changes only the last rows of W + λDᵀD, so rows up to N−3 of
 * the LDLᵀ factor are final and only rows N−2 and N−1 are recomputed: O(1) per period.
 * Returns the end-point trend at each t (NaN until the prefix holds two observed values).
 */
export function hpOneSidedTrendWeighted(y: ArrayLike<number>, weights: ArrayLike<number>, lambda: number): Float64Array {
  const n = y.length;
  const out = new Float64Array(n).fill(NaN);
  if (n < 3) return out;
  const d = new Float64Array(n);
  const l1 = new Float64Array(n);
  const l2 = new Float64Array(n);
  const z = new Float64Array(n);
  const wy = (i: number) => (weights[i] > 0 ? weights[i] * y[i] : 0);
  // Entries of DᵀD for a sample of N points (stencil 1, −2, 1).
  const q0 = (i: number, N: number) => {
    let s = 0;
    const s2 = [1, 4, 1];
    for (let r = Math.max(0, i - 2); r <= Math.min(N - 3, i); r++) s += s2[i - r];
    return s;
  };
  const q1 = (i: number, N: number) => {
    let s = 0;
    for (let r = Math.max(0, i - 1); r <= Math.min(N - 3, i); r++) s += -2; // s0·s1 and s1·s2 are both −2
    return s;
  };
  // LDLᵀ row from its three band entries and the two rows above it.
  const row = (i: number, a2: number, a1: number, a0: number, rhs: number, dm1: number, l1m1: number, zm1: number, dm2: number, zm2: number) => {
    let rl2 = 0;
    let rl1 = 0;
    let rd = a0;
    let rz = rhs;
    if (i >= 2) {
      rl2 = a2 / dm2;
      rl1 = (a1 - rl2 * dm2 * l1m1) / dm1;
      rd -= rl1 * rl1 * dm1 + rl2 * rl2 * dm2;
      rz -= rl1 * zm1 + rl2 * zm2;
    } else if (i === 1) {
      rl1 = a1 / dm1;
      rd -= rl1 * rl1 * dm1;
      rz -= rl1 * zm1;
    }
    return [rd, rl1, rl2, rz] as const;
  };
  let observed = weights[0] > 0 ? 1 : 0;
  if (weights[1] > 0) observed++;
  for (let N = 3; N <= n; N++) {
    if (weights[N - 1] > 0) observed++;
    // Finalise row f = N − 3.
    const f = N - 3;
    {
      const [rd, rl1, rl2, rz] = row(
        f,
        lambda,
        f >= 1 ? lambda * q1(f - 1, N) : 0,
        weights[f] + lambda * q0(f, N),
        wy(f),
        f >= 1 ? d[f - 1] : 0,
        f >= 1 ? l1[f - 1] : 0,
        f >= 1 ? z[f - 1] : 0,
        f >= 2 ? d[f - 2] : 0,
        f >= 2 ? z[f - 2] : 0,
      );
      d[f] = rd;
      l1[f] = rl1;
      l2[f] = rl2;
      z[f] = rz;
    }
    if (observed < 2) continue;
    // Rows N−2 and N−1 with the boundary entries of an N-point sample.
    const a = N - 2;
    const [ad, al1, , az] = row(a, lambda, lambda * q1(a - 1, N), weights[a] + lambda * q0(a, N), wy(a), d[a - 1], l1[a - 1], z[a - 1], a >= 2 ? d[a - 2] : 0, a >= 2 ? z[a - 2] : 0);
    const b = N - 1;
    const [bd, , , bz] = row(b, lambda, lambda * q1(b - 1, N), weights[b] + lambda * q0(b, N), wy(b), ad, al1, az, d[b - 2], z[b - 2]);
    out[b] = bd > 0 ? bz / bd : NaN;
  }
  return out;
}
