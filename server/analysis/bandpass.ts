/**
 * Band-pass filters: keep fluctuations with periods between `low` and `high` (in observations).
 *
 * Ideal band-pass weights (both filters): B₀ = (b − a)/π, B_j = (sin(jb) − sin(ja))/(πj), with
 * a = 2π/high and b = 2π/low.
 *
 * Baxter and King (1999), "Measuring business cycles: approximate band-pass filters for economic
 * time series", Review of Economics and Statistics 81(4): the symmetric moving average of the
 * ideal weights truncated at K lags, shifted to sum to zero (so it removes a linear trend):
 *     a_j = B_j − (Σ_{|i|≤K} B_i)/(2K+1),   cₜ = Σ_{j=−K..K} a_j·y_{t−j}.
 * The first and last K periods have no value. Conventional for quarterly data: 6, 32, K = 12.
 *
 * Christiano and Fitzgerald (2003), "The band pass filter", International Economic Review 44(2):
 * the full-sample asymmetric filter that is optimal when y is a random walk, after removing the
 * drift (y_t − t·(y_{n−1} − y_0)/(n−1)). Every period gets a value; the weights change with t:
 *     cₜ = B₀·yₜ + Σ_{j=1}^{n−t−2} B_j·y_{t+j} + B̃_{n−1−t}·y_{n−1} + Σ_{j=1}^{t−1} B_j·y_{t−j} + B̃_t·y₀,
 * with B̃ chosen so that the weights sum to zero. This is the formula of statsmodels' cffilter
 * (0.13), which the reference tests match. The sums are correlations with the B_j, computed by
 * FFT for long series (O(n log n)) and directly for short ones.
 */
import FFT from 'fft.js';

function idealWeights(low: number, high: number, count: number): Float64Array {
  const a = (2 * Math.PI) / high;
  const b = (2 * Math.PI) / low;
  const B = new Float64Array(count + 1);
  B[0] = (b - a) / Math.PI;
  for (let j = 1; j <= count; j++) B[j] = (Math.sin(b * j) - Math.sin(a * j)) / (Math.PI * j);
  return B;
}

/** Baxter–King weights a_{−K..K} (symmetric, summing to zero), index j+K. */
export function baxterKingWeights(low: number, high: number, k: number): Float64Array {
  const B = idealWeights(low, high, k);
  const w = new Float64Array(2 * k + 1);
  let sum = 0;
  for (let j = -k; j <= k; j++) {
    w[j + k] = B[Math.abs(j)];
    sum += w[j + k];
  }
  const shift = sum / (2 * k + 1);
  for (let i = 0; i < w.length; i++) w[i] -= shift;
  return w;
}

/** Baxter–King cycle; NaN for the first and last K periods and where a window touches a gap. */
export function baxterKingCycle(y: ArrayLike<number>, low: number, high: number, k: number): Float64Array {
  const n = y.length;
  const w = baxterKingWeights(low, high, k);
  const out = new Float64Array(n).fill(NaN);
  for (let t = k; t < n - k; t++) {
    let s = 0;
    for (let j = -k; j <= k; j++) s += w[j + k] * y[t - j];
    out[t] = s; // NaN propagates from a gap in the window
  }
  return out;
}

/** Linear convolution (B * v)_i for i = 0..n−1, with B of length ≥ n. */
function convolvePrefix(B: Float64Array, v: Float64Array, n: number): Float64Array {
  const out = new Float64Array(n);
  if (n <= 2048) {
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let j = 0; j <= i; j++) s += B[j] * v[i - j];
      out[i] = s;
    }
    return out;
  }
  let size = 1;
  while (size < 2 * n) size *= 2;
  const fft = new FFT(size);
  const a = new Float64Array(size);
  const b = new Float64Array(size);
  a.set(B.subarray(0, n));
  b.set(v.subarray(0, n));
  const A = fft.createComplexArray() as number[];
  const Bc = fft.createComplexArray() as number[];
  fft.realTransform(A, a as unknown as number[]);
  fft.completeSpectrum(A);
  fft.realTransform(Bc, b as unknown as number[]);
  fft.completeSpectrum(Bc);
  for (let i = 0; i < size; i++) {
    const re = A[2 * i] * Bc[2 * i] - A[2 * i + 1] * Bc[2 * i + 1];
    const im = A[2 * i] * Bc[2 * i + 1] + A[2 * i + 1] * Bc[2 * i];
    A[2 * i] = re;
    A[2 * i + 1] = im;
  }
  const res = fft.createComplexArray() as number[];
  fft.inverseTransform(res, A);
  for (let i = 0; i < n; i++) out[i] = res[2 * i];
  return out;
}

/**
 * T(v)_i = Σ_{j=1}^{i−1} B_j·v_{i−j}: the one-sided sum in the CF formula, from the linear
 * convolution minus its j = 0 and j = i terms.
 */
function innerSums(B: Float64Array, v: Float64Array, n: number): Float64Array {
  const c = convolvePrefix(B, v, n);
  const out = new Float64Array(n);
  for (let i = 1; i < n; i++) out[i] = c[i] - B[0] * v[i] - B[i] * v[0];
  return out;
}

export interface CfResult {
  cycle: Float64Array;
  /** The drift line removed before filtering (zeros without drift). */
  drift: Float64Array;
}

/** Christiano–Fitzgerald random-walk filter over the full sample (no gaps allowed). */
export function christianoFitzgerald(y: ArrayLike<number>, low: number, high: number, drift: boolean): CfResult {
  const n = y.length;
  const x = new Float64Array(n);
  const line = new Float64Array(n);
  const slope = drift && n > 1 ? (y[n - 1] - y[0]) / (n - 1) : 0;
  for (let t = 0; t < n; t++) {
    line[t] = t * slope;
    x[t] = y[t] - line[t];
  }
  const B = idealWeights(low, high, n);
  // Prefix sums S(m) = Σ_{j=1}^{m} B_j.
  const S = new Float64Array(n + 1);
  for (let j = 1; j <= n; j++) S[j] = S[j - 1] + B[j];
  const back = innerSums(B, x, n); // Σ_{j=1}^{t−1} B_j x_{t−j}
  const xr = new Float64Array(n);
  for (let i = 0; i < n; i++) xr[i] = x[n - 1 - i];
  const fwdR = innerSums(B, xr, n); // at m = n−1−t: Σ_{j=1}^{n−t−2} B_j x_{t+j}
  const cycle = new Float64Array(n);
  for (let t = 0; t < n; t++) {
    const upper = Math.max(0, n - t - 2);
    const lower = Math.max(0, t - 1);
    const Bt = -0.5 * B[0] - S[upper];
    const At = -B[0] - S[upper] - S[lower] - Bt;
    cycle[t] = B[0] * x[t] + fwdR[n - 1 - t] + Bt * x[n - 1] + back[t] + At * x[0];
  }
  return { cycle, drift: line };
}
