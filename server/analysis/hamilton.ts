/**
 * Hamilton (2018) regression filter. "Why you should never use the Hodrick–Prescott filter",
 * Review of Economics and Statistics 100(5), 831–843.
 *
 * Regress y_{t+h} on a constant and the p most recent values available at t:
 *     y_{t+h} = β₀ + β₁·y_t + β₂·y_{t−1} + … + β_p·y_{t−p+1} + v_{t+h}
 * by ordinary least squares (ml-matrix, QR decomposition). The fitted value is the trend and the
 * residual v_{t+h} the cycle. The first h+p−1 periods have no value. Hamilton's recommendation for
 * quarterly data is h = 8 (two years), p = 4; monthly h = 24, p = 12; annual h = 2, p = 1.
 * Rows with a missing regressor or target are left out of the regression; a trend is still given
 * where the regressors exist.
 *
 * Worked example: for a random walk the population coefficients are β₁ = 1, β₂…β_p = 0, so the
 * cycle is the h-period change y_{t+h} − y_t.
 */
import { Matrix, QrDecomposition } from 'ml-matrix';

export interface HamiltonResult {
  trend: Float64Array;
  cycle: Float64Array;
  coefficients: number[];
  observationsUsed: number;
}

export function hamiltonFilter(y: ArrayLike<number>, h: number, p: number): HamiltonResult {
  const n = y.length;
  const trend = new Float64Array(n).fill(NaN);
  const cycle = new Float64Array(n).fill(NaN);
  const rows: number[] = [];
  for (let t = p - 1; t + h < n; t++) {
    let ok = Number.isFinite(y[t + h]);
    for (let j = 0; j < p && ok; j++) ok = Number.isFinite(y[t - j]);
    if (ok) rows.push(t);
  }
  if (rows.length < p + 2) {
    throw new RangeError(`the Hamilton regression needs at least ${p + 2} complete rows; this series gives ${rows.length}`);
  }
  const X = new Matrix(rows.length, p + 1);
  const Y = new Matrix(rows.length, 1);
  // Centre the regressors on their mean: the same least-squares fit, better conditioned.
  let mean = 0;
  let count = 0;
  for (let i = 0; i < n; i++) if (Number.isFinite(y[i])) {
    mean += y[i];
    count++;
  }
  mean /= count;
  rows.forEach((t, r) => {
    X.set(r, 0, 1);
    for (let j = 0; j < p; j++) X.set(r, j + 1, y[t - j] - mean);
    Y.set(r, 0, y[t + h] - mean);
  });
  const qr = new QrDecomposition(X);
  if (!qr.isFullRank()) throw new RangeError('the Hamilton regression is rank deficient (the series is constant or collinear)');
  const beta = qr.solve(Y).getColumn(0);
  for (let t = p - 1; t + h < n; t++) {
    let fit = beta[0];
    let ok = true;
    for (let j = 0; j < p; j++) {
      const v = y[t - j];
      if (!Number.isFinite(v)) {
        ok = false;
        break;
      }
      fit += beta[j + 1] * (v - mean);
    }
    if (!ok) continue;
    trend[t + h] = fit + mean;
    if (Number.isFinite(y[t + h])) cycle[t + h] = y[t + h] - trend[t + h];
  }
  // Report the intercept of the uncentred regression: β₀ − Σβⱼ·mean + mean.
  const slopeSum = beta.slice(1).reduce((a, b) => a + b, 0);
  const coefficients = [beta[0] + mean - slopeSum * mean, ...beta.slice(1)];
  return { trend, cycle, coefficients, observationsUsed: rows.length };
}
