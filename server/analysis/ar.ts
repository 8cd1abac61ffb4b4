/**
 * Autoregressions by ordinary least squares: the fit, the order by the Bayesian information
 * criterion, and iterated forecasts. Used by hp-forecast (AR on first differences with a constant)
 * and the Beveridge–Nelson filter (AR on demeaned first differences).
 *
 * Model: xₜ = c + φ₁xₜ₋₁ + … + φ_p xₜ₋ₚ + eₜ, fitted on the rows t = start … n−1 (start ≥ p) by
 * least squares (QR decomposition, ml-matrix). σ² = SSR / rows (the maximum-likelihood variance).
 *
 * Order selection: BIC(p) = rows·log(SSR_p / rows) + k_p·log(rows) on the common sample
 * t = maxOrder … n−1 for every p = 0 … maxOrder (k_p coefficients), as
 * statsmodels.tsa.ar_model.ar_select_order does (the rank of the orders is the same).
 *
 * Example: fitAr([1, 2, 1, 2, 1, 2], 1, true) has φ₁ = −1 and c = 3 exactly.
 */
import { Matrix, QrDecomposition } from 'ml-matrix';

export interface ArFit {
  constant: number;
  coefficients: number[];
  sigma2: number;
  rows: number;
  ssr: number;
}

/** Least squares fit of an AR(p) on x[start..], with or without a constant. */
export function fitAr(x: ArrayLike<number>, p: number, withConstant: boolean, start = p): ArFit {
  const n = x.length;
  const rows = n - start;
  const k = p + (withConstant ? 1 : 0);
  if (rows <= k) throw new RangeError(`an AR(${p}) needs more than ${k} usable observations; there are ${Math.max(0, rows)}`);
  if (k === 0) {
    let ssr = 0;
    for (let t = start; t < n; t++) ssr += x[t] * x[t];
    return { constant: 0, coefficients: [], sigma2: ssr / rows, rows, ssr };
  }
  const X = new Matrix(rows, k);
  const Y = new Matrix(rows, 1);
  for (let r = 0; r < rows; r++) {
    const t = start + r;
    let c = 0;
    if (withConstant) X.set(r, c++, 1);
    for (let j = 1; j <= p; j++) X.set(r, c++, x[t - j]);
    Y.set(r, 0, x[t]);
  }
  const qr = new QrDecomposition(X);
  if (!qr.isFullRank()) throw new RangeError('the autoregression is rank deficient (the series is constant or collinear)');
  const beta = qr.solve(Y).getColumn(0);
  let ssr = 0;
  for (let r = 0; r < rows; r++) {
    let fit = 0;
    for (let c = 0; c < k; c++) fit += X.get(r, c) * beta[c];
    ssr += (Y.get(r, 0) - fit) ** 2;
  }
  return { constant: withConstant ? beta[0] : 0, coefficients: withConstant ? beta.slice(1) : beta, sigma2: ssr / rows, rows, ssr };
}

/** The order 0…maxOrder with the least BIC on the common sample, and each order's BIC. */
export function selectArOrder(x: ArrayLike<number>, maxOrder: number, withConstant: boolean): { order: number; bic: number[] } {
  const bic: number[] = [];
  for (let p = 0; p <= maxOrder; p++) {
    const fit = fitAr(x, p, withConstant, maxOrder);
    const k = p + (withConstant ? 1 : 0);
    bic.push(fit.rows * Math.log(fit.ssr / fit.rows) + k * Math.log(fit.rows));
  }
  let order = 0;
  for (let p = 1; p <= maxOrder; p++) if (bic[p] < bic[order]) order = p;
  return { order, bic };
}

/** Forecasts of x for 1…horizon steps after its end, by iterating the fitted equation. */
export function forecastAr(x: ArrayLike<number>, fit: ArFit, horizon: number): Float64Array {
  const p = fit.coefficients.length;
  const history = Array.from(x).slice(x.length - p);
  const out = new Float64Array(horizon);
  for (let h = 0; h < horizon; h++) {
    let v = fit.constant;
    for (let j = 1; j <= p; j++) v += fit.coefficients[j - 1] * history[history.length - j];
    out[h] = v;
    history.push(v);
  }
  return out;
}

/** First differences: x[t] = y[t+1] − y[t], length n − 1. */
export function firstDifferences(y: ArrayLike<number>): Float64Array {
  const out = new Float64Array(Math.max(0, y.length - 1));
  for (let t = 1; t < y.length; t++) out[t - 1] = y[t] - y[t - 1];
  return out;
}
