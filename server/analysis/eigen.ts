/**
 * Eigenvalues of a symmetric pentadiagonal matrix without forming it densely: Givens reduction of
 * the band to tridiagonal form with bulge chasing (Schwarz 1968; LAPACK dsbtrd does the same),
 * then the implicit QL method with Wilkinson-type shifts for a symmetric tridiagonal matrix
 * (Press et al., Numerical Recipes, 2nd ed., §11.3, routine tqli, eigenvalues only).
 * O(n²) time, O(n) memory. Checked against numpy.linalg.eigvalsh (tests/unit/analysis-references.test.ts).
 */

/** Eigenvalues (ascending) of the symmetric matrix with diagonals a0[i]=A[i][i], a1[i]=A[i][i+1], a2[i]=A[i][i+2]. */
export function pentadiagonalEigenvalues(a0: ArrayLike<number>, a1: ArrayLike<number>, a2: ArrayLike<number>): Float64Array {
  const n = a0.length;
  // Upper band with room for one bulge: U[i*4 + k] = A[i][i+k], k = 0..3.
  const W = 4;
  const U = new Float64Array(n * W);
  for (let i = 0; i < n; i++) {
    U[i * W] = a0[i];
    if (i + 1 < n) U[i * W + 1] = a1[i];
    if (i + 2 < n) U[i * W + 2] = a2[i];
  }
  const get = (i: number, j: number) => {
    if (j < i) [i, j] = [j, i];
    const k = j - i;
    return k < W && j < n ? U[i * W + k] : 0;
  };
  const set = (i: number, j: number, v: number) => {
    if (j < i) [i, j] = [j, i];
    const k = j - i;
    if (k < W) U[i * W + k] = v;
    else if (Math.abs(v) > 0) throw new Error('band overflow in the tridiagonal reduction');
  };
  // A ← G·A·Gᵀ for the rotation in the plane (p, p+1) that zeroes A[p+1][col] against A[p][col].
  const rotate = (p: number, col: number) => {
    const q = p + 1;
    const x = get(p, col);
    const y = get(q, col);
    if (y === 0) return;
    const r = Math.hypot(x, y);
    const c = x / r;
    const s = y / r;
    const lo = Math.max(0, p - 3);
    const hi = Math.min(n - 1, q + 3);
    for (let k = lo; k <= hi; k++) {
      if (k === p || k === q) continue;
      const apk = get(p, k);
      const aqk = get(q, k);
      set(p, k, c * apk + s * aqk);
      set(q, k, -s * apk + c * aqk);
    }
    const app = get(p, p);
    const aqq = get(q, q);
    const apq = get(p, q);
    set(p, p, c * c * app + 2 * c * s * apq + s * s * aqq);
    set(q, q, s * s * app - 2 * c * s * apq + c * c * aqq);
    set(p, q, c * s * (aqq - app) + (c * c - s * s) * apq);
    set(q, col, 0);
  };
  for (let j = 0; j + 2 < n; j++) {
    rotate(j + 1, j); // zero A[j+2][j]; leaves a bulge at (j+1, j+4)
    for (let r0 = j + 1; r0 + 3 < n; r0 += 2) {
      if (get(r0, r0 + 3) === 0) break;
      rotate(r0 + 2, r0); // zero A[r0+3][r0]; the bulge moves to (r0+2, r0+5)
    }
  }
  const d = new Float64Array(n);
  const e = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    d[i] = U[i * W];
    e[i] = i + 1 < n ? U[i * W + 1] : 0;
  }
  tridiagonalEigenvalues(d, e);
  return d.sort();
}

/**
 * Implicit QL on a symmetric tridiagonal matrix: d the diagonal, e[i] the element coupling i and
 * i+1 (e[n−1] = 0). On return d holds the eigenvalues (unsorted); e is destroyed.
 */
function tridiagonalEigenvalues(d: Float64Array, e: Float64Array): void {
  const n = d.length;
  const EPS = Number.EPSILON;
  for (let l = 0; l < n; l++) {
    let iter = 0;
    for (;;) {
      let m = l;
      for (; m < n - 1; m++) {
        const dd = Math.abs(d[m]) + Math.abs(d[m + 1]);
        if (Math.abs(e[m]) <= EPS * dd) break;
      }
      if (m === l) break;
      if (iter++ >= 100) throw new Error('the tridiagonal QL iteration did not converge');
      let g = (d[l + 1] - d[l]) / (2 * e[l]);
      let r = Math.hypot(g, 1);
      g = d[m] - d[l] + e[l] / (g + (g >= 0 ? Math.abs(r) : -Math.abs(r)));
      let s = 1;
      let c = 1;
      let p = 0;
      let i = m - 1;
      let underflow = false;
      for (; i >= l; i--) {
        const f = s * e[i];
        const b = c * e[i];
        r = Math.hypot(f, g);
        e[i + 1] = r;
        if (r === 0) {
          d[i + 1] -= p;
          e[m] = 0;
          underflow = true;
          break;
        }
        s = f / r;
        c = g / r;
        g = d[i + 1] - p;
        r = (d[i] - g) * s + 2 * c * b;
        p = s * r;
        d[i + 1] = g + p;
        g = c * r - b;
      }
      if (underflow) continue;
      d[l] -= p;
      e[l] = g;
      e[m] = 0;
    }
  }
}
