/**
 * Symmetric positive-definite banded linear systems, solved by an LDLᵀ factorization in O(n·b²)
 * time and O(n·b) memory (b = half-bandwidth). No dense n×n matrix is ever formed.
 *
 * A = L·D·Lᵀ with L unit lower triangular of half-bandwidth b and D diagonal:
 *
 *   L[i][j] = (A[i][j] − Σ_{k<j} L[i][k]·d[k]·L[j][k]) / d[j],   i−b ≤ j < i
 *   d[i]    =  A[i][i] − Σ_{k<i} L[i][k]²·d[k]
 *
 * then A·x = r by forward substitution (L·z = r), scaling (y = z/d) and back substitution
 * (Lᵀ·x = y). Without pivoting this is stable for symmetric positive-definite A (Golub and Van
 * Loan, Matrix Computations, 4th ed., §4.3.5), which every system in Tidegauge is.
 *
 * Band storage: `band[i*(b+1) + k] = A[i][i+k]` for k = 0..b (entries past the end are ignored).
 * A specialised pentadiagonal (b = 2) path carries the Hodrick–Prescott filter.
 *
 * Reference check: tests/unit/analysis-references.test.ts compares the solutions with scipy.linalg.solveh_banded
 * (fixture made by scripts/make_references.py).
 */

export class SingularSystemError extends Error {
  constructor(readonly index: number) {
    super(`the banded system is singular or not positive definite at row ${index}`);
  }
}

/** A factorization L·D·Lᵀ of a symmetric banded matrix, reusable for many right-hand sides. */
export interface BandedFactor {
  n: number;
  b: number;
  /** Pivots d[i]. */
  d: Float64Array;
  /** l[i*b + (m-1)] = L[i][i-m], m = 1..b. */
  l: Float64Array;
}

/** Factorizes a symmetric banded matrix given in band storage (see the module comment). */
export function factorBanded(band: Float64Array, n: number, b: number): BandedFactor {
  if (b === 2) return factorPenta(band, n);
  const w = b + 1;
  const d = new Float64Array(n);
  const l = new Float64Array(n * b);
  // Row-oriented: row i of L needs rows i−b..i−1.
  for (let i = 0; i < n; i++) {
    const j0 = Math.max(0, i - b);
    for (let j = j0; j < i; j++) {
      // A[i][j] = A[j][i] = band[j*w + (i−j)]
      let s = band[j * w + (i - j)];
      for (let k = j0; k < j; k++) {
        s -= l[i * b + (i - k - 1)] * d[k] * l[j * b + (j - k - 1)];
      }
      l[i * b + (i - j - 1)] = s / d[j];
    }
    let di = band[i * w];
    for (let k = j0; k < i; k++) {
      const lik = l[i * b + (i - k - 1)];
      di -= lik * lik * d[k];
    }
    if (!(di > 0)) throw new SingularSystemError(i);
    d[i] = di;
  }
  return { n, b, d, l };
}

function factorPenta(band: Float64Array, n: number): BandedFactor {
  const d = new Float64Array(n);
  const l = new Float64Array(n * 2);
  let dm2 = 0; // d[i-2]
  let dm1 = 0; // d[i-1]
  let l1m1 = 0; // L[i-1][i-2]
  for (let i = 0; i < n; i++) {
    let l2 = 0;
    let l1 = 0;
    let di = band[i * 3];
    if (i >= 2) {
      l2 = band[(i - 2) * 3 + 2] / dm2;
      l1 = (band[(i - 1) * 3 + 1] - l2 * dm2 * l1m1) / dm1;
      di -= l1 * l1 * dm1 + l2 * l2 * dm2;
    } else if (i === 1) {
      l1 = band[1] / dm1;
      di -= l1 * l1 * dm1;
    }
    if (!(di > 0)) throw new SingularSystemError(i);
    d[i] = di;
    l[i * 2] = l1;
    l[i * 2 + 1] = l2;
    dm2 = dm1;
    dm1 = di;
    l1m1 = l1;
  }
  return { n, b: 2, d, l };
}

/**
 * Factor of a symmetric banded Toeplitz matrix (constant diagonals `c[0]`, `c[1]`, …, `c[b]`),
 * as the cycle form of the Whittaker–Henderson smoother needs. Same layout as factorBanded.
 */
export function factorToeplitz(n: number, c: ArrayLike<number>): BandedFactor {
  const b = c.length - 1;
  const band = new Float64Array(n * (b + 1));
  for (let i = 0; i < n; i++) for (let k = 0; k <= b; k++) band[i * (b + 1) + k] = c[k];
  return factorBanded(band, n, b);
}

/**
 * Forward substitution and scaling: returns w with L·w = r (w is *not* divided by d). The last
 * element of the solution of A·x = r is w[n−1]/d[n−1]; the one-sided filter uses exactly that.
 */
function forwardSubstitute(f: BandedFactor, r: ArrayLike<number>, out: Float64Array = new Float64Array(f.n)): Float64Array {
  const { n, b, l } = f;
  if (b === 2) {
    let zm1 = 0;
    let zm2 = 0;
    for (let i = 0; i < n; i++) {
      const zi = r[i] - l[i * 2] * zm1 - l[i * 2 + 1] * zm2;
      out[i] = zi;
      zm2 = zm1;
      zm1 = zi;
    }
    return out;
  }
  for (let i = 0; i < n; i++) {
    let s = r[i];
    const mMax = Math.min(b, i);
    for (let m = 1; m <= mMax; m++) s -= l[i * b + m - 1] * out[i - m];
    out[i] = s;
  }
  return out;
}

/** Solves A·x = r with a factor from factorBanded/factorToeplitz. `out` may alias `r`. */
export function solveFactored(f: BandedFactor, r: ArrayLike<number>, out: Float64Array = new Float64Array(f.n)): Float64Array {
  const { n, b, d, l } = f;
  forwardSubstitute(f, r, out);
  if (b === 2) {
    let xp1 = 0;
    let xp2 = 0;
    for (let i = n - 1; i >= 0; i--) {
      // L[i+1][i] = l[(i+1)*2], L[i+2][i] = l[(i+2)*2+1]
      const a1 = i + 1 < n ? l[(i + 1) * 2] : 0;
      const a2 = i + 2 < n ? l[(i + 2) * 2 + 1] : 0;
      const xi = out[i] / d[i] - a1 * xp1 - a2 * xp2;
      out[i] = xi;
      xp2 = xp1;
      xp1 = xi;
    }
    return out;
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = out[i] / d[i];
    const mMax = Math.min(b, n - 1 - i);
    for (let m = 1; m <= mMax; m++) s -= l[(i + m) * b + m - 1] * out[i + m];
    out[i] = s;
  }
  return out;
}

/**
 * LDLᵀ factor of the infinite symmetric pentadiagonal Toeplitz matrix with diagonals c0, c1, c2
 * (positive definite). The factor of any leading m×m block is the first m rows of this one, and
 * the rows converge geometrically to a fixed point; once three successive rows agree to the last
 * bit of a double they are frozen, so the factor needs O(K) memory (K rows) whatever the length,
 * and loops past K run with constant coefficients.
 */
export interface PentaToeplitzFactor {
  /** Rows stored explicitly: d[i], l1[i] = L[i][i−1], l2[i] = L[i][i−2] for i < K. */
  K: number;
  d: Float64Array;
  l1: Float64Array;
  l2: Float64Array;
  /** The frozen row, for i ≥ K. */
  dInf: number;
  l1Inf: number;
  l2Inf: number;
}

export function factorPentaToeplitzConverged(c0: number, c1: number, c2: number, maxRows = 2_000_000): PentaToeplitzFactor {
  let cap = 1024;
  let d = new Float64Array(cap);
  let l1a = new Float64Array(cap);
  let l2a = new Float64Array(cap);
  let dm2 = 0;
  let dm1 = 0;
  let l1m1 = 0;
  let same = 0;
  const close = (a: number, b: number) => Math.abs(a - b) <= 2.3e-16 * Math.abs(a);
  for (let i = 0; i < maxRows; i++) {
    let l2 = 0;
    let l1 = 0;
    let di = c0;
    if (i >= 2) {
      l2 = c2 / dm2;
      l1 = (c1 - l2 * dm2 * l1m1) / dm1;
      di -= l1 * l1 * dm1 + l2 * l2 * dm2;
    } else if (i === 1) {
      l1 = c1 / dm1;
      di -= l1 * l1 * dm1;
    }
    if (!(di > 0)) throw new SingularSystemError(i);
    if (i >= 3 && close(di, dm1) && close(l1, l1m1) && close(l2, l2a[i - 1])) {
      if (++same >= 3) {
        // Rows i−2…i agree with their predecessors: freeze at K = i − 2.
        const K = i - 2;
        return { K, d: d.subarray(0, K), l1: l1a.subarray(0, K), l2: l2a.subarray(0, K), dInf: d[K - 1], l1Inf: l1a[K - 1], l2Inf: l2a[K - 1] };
      }
    } else same = 0;
    if (i >= cap) {
      cap *= 2;
      const grow = (a: Float64Array) => {
        const b = new Float64Array(cap);
        b.set(a);
        return b;
      };
      d = grow(d);
      l1a = grow(l1a);
      l2a = grow(l2a);
    }
    d[i] = di;
    l1a[i] = l1;
    l2a[i] = l2;
    dm2 = dm1;
    dm1 = di;
    l1m1 = l1;
  }
  const K = maxRows;
  return { K, d: d.subarray(0, K), l1: l1a.subarray(0, K), l2: l2a.subarray(0, K), dInf: d[K - 1], l1Inf: l1a[K - 1], l2Inf: l2a[K - 1] };
}

/** Pivot d[i] of a converged Toeplitz factor. */
export function toeplitzPivot(f: PentaToeplitzFactor, i: number): number {
  return i < f.K ? f.d[i] : f.dInf;
}

/** Forward substitution L·w = r (w not divided by d) with a converged Toeplitz factor; `out` may alias `r`. */
export function toeplitzForward(f: PentaToeplitzFactor, r: ArrayLike<number>, m: number, out: Float64Array): Float64Array {
  const { K, l1, l2, l1Inf, l2Inf } = f;
  let zm1 = 0;
  let zm2 = 0;
  const k = Math.min(K, m);
  for (let i = 0; i < k; i++) {
    const zi = r[i] - l1[i] * zm1 - l2[i] * zm2;
    out[i] = zi;
    zm2 = zm1;
    zm1 = zi;
  }
  for (let i = k; i < m; i++) {
    const zi = r[i] - l1Inf * zm1 - l2Inf * zm2;
    out[i] = zi;
    zm2 = zm1;
    zm1 = zi;
  }
  return out;
}
