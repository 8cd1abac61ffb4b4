/**
 * Whittaker–Henderson smoothing and its order-2 case, the Hodrick–Prescott filter.
 *
 * Trend τ = argmin Σ wₜ(yₜ − τₜ)² + λ·Σ(Δᵈτₜ)², i.e. (W + λ·DᵀD)·τ = W·y with D the (n−d)×n
 * difference matrix of order d (d = 2: Hodrick and Prescott 1997, "Postwar U.S. business cycles",
 * JMCB 29(1); d = 1: the first-difference penalty, which smooths towards a level; Whittaker
 * 1923, Henderson 1924).
 *
 * Complete series (W = I) are solved in the *cycle form*: by the Woodbury identity
 *     c = y − τ = Dᵀ·(μI + D·Dᵀ)⁻¹·D·y,   μ = 1/λ,
 * where μI + DDᵀ is a banded Toeplitz matrix (diagonals 6+μ, −4, 1 for d = 2). Its condition
 * number is bounded by (16 + μ)/(μ + λ_min(DDᵀ)) instead of 1 + 16λ, so the cycle stays accurate
 * for λ from 1e-6 to 1e12, and the cycle is computed directly rather than as a small difference of
 * large numbers. Series with interior gaps use the weighted system directly (weight 0 at a gap).
 *
 * Cost: O(n·d²) time, O(n·d) memory.
 *
 * Worked example: y = [1, 2, 4, 7, 11] with λ = 1 has the trend
 * [13/24, 9/4, 53/12, 29/4, 253/24] ≈ [0.5417, 2.25, 4.4167, 7.25, 10.5417] (exact rational
 * arithmetic in scripts/make_references.py; tests/unit/analysis-references.test.ts checks it).
 */
import {
  factorBanded,
  factorPentaToeplitzConverged,
  factorToeplitz,
  solveFactored,
  toeplitzForward,
  toeplitzPivot,
  type BandedFactor,
  type PentaToeplitzFactor,
} from './banded.js';
import { applyD, applyDT, ddtDiagonals, weightedPenaltyBand } from './differences.js';

const cache = new Map<string, BandedFactor>();
const CACHE_MAX_ENTRIES = 32;
const CACHE_MAX_N = 50_000;

/** Factor of μI + D·Dᵀ of size m, memoised for batches of equal-length series. */
function cycleFormFactor(m: number, lambda: number, order: number): BandedFactor {
  const key = `${m}|${lambda}|${order}`;
  const hit = cache.get(key);
  if (hit) return hit;
  const c = ddtDiagonals(order);
  c[0] += 1 / lambda;
  const f = factorToeplitz(m, c);
  if (m <= CACHE_MAX_N) {
    if (cache.size >= CACHE_MAX_ENTRIES) cache.delete(cache.keys().next().value!);
    cache.set(key, f);
  }
  return f;
}

const hpFactors = new Map<number, PentaToeplitzFactor>();

/**
 * Factor of μI + D·Dᵀ for the second-difference penalty. It does not depend on the series length
 * (see factorPentaToeplitzConverged), so one factor per λ serves every series.
 */
export function hpFactor(lambda: number): PentaToeplitzFactor {
  let f = hpFactors.get(lambda);
  if (!f) {
    f = factorPentaToeplitzConverged(6 + 1 / lambda, -4, 1);
    if (hpFactors.size >= CACHE_MAX_ENTRIES) hpFactors.delete(hpFactors.keys().next().value!);
    hpFactors.set(lambda, f);
  }
  return f;
}

/**
 * HP cycle (and trend) of a complete series in two passes and no temporary arrays: the forward
 * pass forms D·y on the fly and substitutes into `cycle`; the backward pass substitutes back and
 * applies Dᵀ as it goes, writing cₜ and τₜ = yₜ − cₜ.
 */
export function hpCycleInto(y: ArrayLike<number>, lambda: number, cycle: Float64Array, trend?: Float64Array): void {
  const n = y.length;
  const m = n - 2;
  if (m <= 0) {
    cycle.fill(0, 0, n);
    if (trend) for (let i = 0; i < n; i++) trend[i] = y[i];
    return;
  }
  const f = hpFactor(lambda);
  const { K, d, l1, l2, dInf, l1Inf, l2Inf } = f;
  // Forward: w_i = (Dy)_i − l1_i·w_{i−1} − l2_i·w_{i−2}
  let zm1 = 0;
  let zm2 = 0;
  const k = Math.min(K, m);
  for (let i = 0; i < k; i++) {
    const zi = y[i] - 2 * y[i + 1] + y[i + 2] - l1[i] * zm1 - l2[i] * zm2;
    cycle[i] = zi;
    zm2 = zm1;
    zm1 = zi;
  }
  for (let i = k; i < m; i++) {
    const zi = y[i] - 2 * y[i + 1] + y[i + 2] - l1Inf * zm1 - l2Inf * zm2;
    cycle[i] = zi;
    zm2 = zm1;
    zm1 = zi;
  }
  // Backward: x_i = w_i/d_i − L[i+1][i]·x_{i+1} − L[i+2][i]·x_{i+2}; then c_{i+2} = x_{i+2} − 2x_{i+1} + x_i.
  let xp1 = 0;
  let xp2 = 0;
  let i = m - 1;
  // (No closures here: a closure over xp1/xp2 would move them out of registers.)
  // The last two rows lack one or both couplings, and rows below K use the stored factor.
  for (; i >= 0 && (i >= m - 2 || i < K); i--) {
    const di = i < K ? d[i] : dInf;
    const a1 = i + 1 < m ? (i + 1 < K ? l1[i + 1] : l1Inf) : 0;
    const a2 = i + 2 < m ? (i + 2 < K ? l2[i + 2] : l2Inf) : 0;
    const xi = cycle[i] / di - a1 * xp1 - a2 * xp2;
    const c = xp2 - 2 * xp1 + xi;
    cycle[i + 2] = c;
    if (trend) trend[i + 2] = y[i + 2] - c;
    xp2 = xp1;
    xp1 = xi;
  }
  // Rows past the frozen point with both couplings: constant coefficients.
  const inv = 1 / dInf;
  if (trend) {
    for (; i >= K; i--) {
      const xi = cycle[i] * inv - l1Inf * xp1 - l2Inf * xp2;
      const c = xp2 - 2 * xp1 + xi;
      cycle[i + 2] = c;
      trend[i + 2] = y[i + 2] - c;
      xp2 = xp1;
      xp1 = xi;
    }
  } else {
    for (; i >= K; i--) {
      const xi = cycle[i] * inv - l1Inf * xp1 - l2Inf * xp2;
      cycle[i + 2] = xp2 - 2 * xp1 + xi;
      xp2 = xp1;
      xp1 = xi;
    }
  }
  for (; i >= 0; i--) {
    const a1 = i + 1 < m ? (i + 1 < K ? l1[i + 1] : l1Inf) : 0;
    const a2 = i + 2 < m ? (i + 2 < K ? l2[i + 2] : l2Inf) : 0;
    const xi = cycle[i] / d[i] - a1 * xp1 - a2 * xp2;
    const c = xp2 - 2 * xp1 + xi;
    cycle[i + 2] = c;
    if (trend) trend[i + 2] = y[i + 2] - c;
    xp2 = xp1;
    xp1 = xi;
  }
  // c_1 = x_1 − 2x_0, c_0 = x_0 (xp1 = x_0, xp2 = x_1 now).
  cycle[1] = xp2 - 2 * xp1;
  cycle[0] = xp1;
  if (trend) {
    trend[1] = y[1] - cycle[1];
    trend[0] = y[0] - cycle[0];
  }
}

/**
 * Cycle c = y − τ of the Whittaker–Henderson smoother of `order` for a complete series (no NaN).
 * With fewer than order+1 points there is nothing to penalise and the cycle is zero.
 */
export function whittakerCycle(y: ArrayLike<number>, lambda: number, order = 2, out: Float64Array = new Float64Array(y.length)): Float64Array {
  if (order === 2) {
    hpCycleInto(y, lambda, out);
    return out;
  }
  const n = y.length;
  const m = n - order;
  if (m <= 0) return out.fill(0);
  const f = cycleFormFactor(m, lambda, order);
  const x = applyD(y, order);
  solveFactored(f, x, x);
  return applyDT(x, order, n, out);
}

/** Trend of a complete series: τ = y − c. */
export function whittakerTrend(y: ArrayLike<number>, lambda: number, order = 2): Float64Array {
  const c = whittakerCycle(y, lambda, order);
  for (let i = 0; i < c.length; i++) c[i] = y[i] - c[i];
  return c;
}

/**
 * Trend with observation weights (0 at a missing value): solves (W + λDᵀD)τ = W·y directly.
 * `y` may hold NaN where the weight is 0.
 */
export function whittakerTrendWeighted(y: ArrayLike<number>, weights: ArrayLike<number>, lambda: number, order = 2): Float64Array {
  const n = y.length;
  const band = weightedPenaltyBand(weights, lambda, order);
  const rhs = new Float64Array(n);
  for (let i = 0; i < n; i++) rhs[i] = weights[i] > 0 ? weights[i] * y[i] : 0;
  const f = factorBanded(band, n, order);
  return solveFactored(f, rhs, rhs);
}

/** The HP trend: Whittaker–Henderson of order 2. */
export function hpTrend(y: ArrayLike<number>, lambda: number): Float64Array {
  return whittakerTrend(y, lambda, 2);
}

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

/**
 * Trend of a series with interior gaps, by filling the gaps with the current trend and smoothing
 * the complete series again (the EM iteration for missing data) until the filled values stop
 * moving. Each step is the well-conditioned cycle-form solve, so the answer stays accurate where
 * the direct weighted system (W + λDᵀD) loses digits (large λ). The fixed point is exactly the
 * solution of (W + λDᵀD)τ = Wy. The contraction factor is the smoother's weight on the missing
 * points themselves, small unless λ is small; returns null when it has not converged, so the
 * caller can fall back to the direct solve (well-conditioned exactly when λ is small).
 */
export function whittakerTrendFilled(y: ArrayLike<number>, lambda: number, order = 2, maxIterations = 2000): Float64Array | null {
  const n = y.length;
  const filled = Float64Array.from(y);
  const missing: number[] = [];
  for (let i = 0; i < n; i++) if (Number.isNaN(filled[i])) missing.push(i);
  // Start from straight lines across each gap.
  let scale = 0;
  for (let i = 0; i < n; i++) if (!Number.isNaN(filled[i])) scale = Math.max(scale, Math.abs(filled[i]));
  for (const i of missing) {
    let a = i - 1;
    while (a >= 0 && Number.isNaN(y[a])) a--;
    let b = i + 1;
    while (b < n && Number.isNaN(y[b])) b++;
    filled[i] = a < 0 ? y[b] : b >= n ? y[a] : y[a] + ((y[b] - y[a]) * (i - a)) / (b - a);
  }
  const cycle = new Float64Array(n);
  const tolerance = 1e-14 * Math.max(1, scale);
  for (let it = 0; it < maxIterations; it++) {
    whittakerCycle(filled, lambda, order, cycle);
    let change = 0;
    for (const i of missing) {
      const t = filled[i] - cycle[i];
      change = Math.max(change, Math.abs(t - filled[i]));
      filled[i] = t;
    }
    if (change <= tolerance) {
      whittakerCycle(filled, lambda, order, cycle);
      for (let i = 0; i < n; i++) cycle[i] = filled[i] - cycle[i];
      return cycle;
    }
  }
  return null;
}
