/**
 * Difference operators of order d (1, 2 or 3) without matrices.
 *
 * D_d is the (n−d)×n matrix with rows of the stencil s_k = (−1)^(d−k)·C(d,k), k = 0..d:
 *   d = 1: [−1, 1]   d = 2: [1, −2, 1]   d = 3: [−1, 3, −3, 1]
 */

export function stencil(order: number): number[] {
  const s: number[] = [];
  for (let k = 0; k <= order; k++) s.push((order - k) % 2 === 0 ? binom(order, k) : -binom(order, k));
  return s;
}

function binom(n: number, k: number): number {
  let r = 1;
  for (let i = 1; i <= k; i++) r = (r * (n - k + i)) / i;
  return r;
}

/** (D_d·y)_i = Σ_k s_k·y_{i+k}, i = 0..n−d−1. */
export function applyD(y: ArrayLike<number>, order: number, out: Float64Array = new Float64Array(Math.max(0, y.length - order))): Float64Array {
  const m = y.length - order;
  if (order === 2) {
    for (let i = 0; i < m; i++) out[i] = y[i] - 2 * y[i + 1] + y[i + 2];
    return out;
  }
  const s = stencil(order);
  for (let i = 0; i < m; i++) {
    let v = 0;
    for (let k = 0; k <= order; k++) v += s[k] * y[i + k];
    out[i] = v;
  }
  return out;
}

/** (D_dᵀ·x)_j = Σ_k s_k·x_{j−k} over valid rows, j = 0..n−1, for x of length n−d. */
export function applyDT(x: ArrayLike<number>, order: number, n: number, out: Float64Array = new Float64Array(n)): Float64Array {
  const m = x.length;
  if (order === 2) {
    for (let j = 0; j < n; j++) {
      const a = j < m ? x[j] : 0;
      const b = j - 1 >= 0 && j - 1 < m ? x[j - 1] : 0;
      const c = j - 2 >= 0 && j - 2 < m ? x[j - 2] : 0;
      out[j] = a - 2 * b + c;
    }
    return out;
  }
  const s = stencil(order);
  for (let j = 0; j < n; j++) {
    let v = 0;
    for (let k = 0; k <= order; k++) {
      const i = j - k;
      if (i >= 0 && i < m) v += s[k] * x[i];
    }
    out[j] = v;
  }
  return out;
}

/**
 * Constant diagonals of D_d·D_dᵀ (an (n−d)×(n−d) banded Toeplitz matrix): the autocorrelation of
 * the stencil. d = 1: [2, −1]; d = 2: [6, −4, 1]; d = 3: [20, −15, 6, −1].
 */
export function ddtDiagonals(order: number): number[] {
  const s = stencil(order);
  const c: number[] = [];
  for (let k = 0; k <= order; k++) {
    let v = 0;
    for (let i = 0; i + k <= order; i++) v += s[i] * s[i + k];
    c.push(v);
  }
  return c;
}

/**
 * W + λ·D_dᵀD_d in band storage (half-bandwidth d), for the weighted problem with gaps.
 * Accumulated row by row of D, so the boundary rows come out right.
 */
export function weightedPenaltyBand(weights: ArrayLike<number>, lambda: number, order: number): Float64Array {
  const n = weights.length;
  const w = order + 1;
  const band = new Float64Array(n * w);
  for (let i = 0; i < n; i++) band[i * w] = weights[i];
  const s = stencil(order);
  for (let r = 0; r + order < n; r++) {
    for (let a = 0; a <= order; a++) {
      for (let b = a; b <= order; b++) {
        band[(r + a) * w + (b - a)] += lambda * s[a] * s[b];
      }
    }
  }
  return band;
}
