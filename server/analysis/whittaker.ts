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
