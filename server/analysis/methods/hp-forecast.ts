/**
 * Hodrick–Prescott filter on a sample extended by forecasts (the usual remedy for the end-point
 * problem of the two-sided filter).
 *
 * Procedure: fit Δyₜ = c + φ₁Δyₜ₋₁ + … + φ_q Δyₜ₋q + eₜ by least squares (ar.ts), forecast
 * `horizon` differences by iterating the equation, cumulate them onto the last observation, filter
 * the extended series with HP(λ) (whittaker.ts), and keep the cycle on the sample. The trend runs
 * on over the forecast periods, which the outputs carry as an extension labelled "forecast"
 * (with the forecasts as the series `forecast`) so that charts shade and name it.
 *
 * Parameters: `lambda` (HP conventions: 1600 Q, 14 400 M, 100 A), `arOrder` (a number, or "bic":
 * default, the order 0 … 8 Q, 24 M, 4 A with the least Bayesian information criterion on a
 * common sample), `horizon` (12 Q, 36 M, 3 A: three years). Needs max(order + 10, 12)
 * observations. No gaps. Diagnostics: `arOrder` (used), `constant`, `arCoefficients`, `sigma2`,
 * `bic` (per order, when chosen), `cutoffPeriod`.
 *
 * References: Hodrick and Prescott (1997), Journal of Money, Credit and Banking 29(1), 1–16;
 * Kaiser, R. and Maravall, A. (1999), "Estimation of the business cycle: a modified
 * Hodrick–Prescott filter", Spanish Economic Review 1, 175–206 (forecast extension of the sample).
 *
 * Worked example: with arOrder = 2 on 100 × log US real GDP the forecasts equal statsmodels OLS
 * forecasts and the cycle equals hpfilter of the extended series to 1e-8
 * (scripts/make_methods_references.py).
 */
import { cutoffPeriod } from '../../schemas/methods.js';
import { firstDifferences, fitAr, forecastAr, selectArOrder } from '../ar.js';
import { AnalysisError } from '../errors.js';
import { hpCycleInto } from '../whittaker.js';
import { fmt, hpFamilyCautions, LAMBDA_PARAM } from './common.js';
import { HP_CONVENTION } from '../../schemas/methods.js';
import { defineMethod } from './types.js';

/** The largest order the BIC considers, and the default horizon (three years), by frequency. */
export const HP_FORECAST = { Q: { maxOrder: 8, horizon: 12 }, M: { maxOrder: 24, horizon: 36 }, A: { maxOrder: 4, horizon: 3 } } as const;

export const hpForecast = defineMethod({
  id: 'hp-forecast',
  name: 'Hodrick–Prescott with forecast extension',
  twoSided: true,
  params: {
    lambda: LAMBDA_PARAM,
    arOrder: { kind: 'integer', label: 'AR order on growth', min: 0, max: 36, choices: [{ value: 'bic', label: 'chosen by BIC' }] },
    horizon: { kind: 'integer', label: 'Forecast horizon', min: 1, max: 120, unit: 'periods', hint: '{periods} appended before filtering' },
  },
  defaults: (f) => ({ lambda: HP_CONVENTION[f], arOrder: 'bic', horizon: HP_FORECAST[f].horizon }),
  minimumLength: ({ arOrder }) => {
    const q = typeof arOrder === 'number' ? arOrder : 2; // the BIC search shortens its range to the sample
    return { count: Math.max(12, q + 10), why: typeof arOrder === 'number' ? `the AR(${q}) on growth needs rows to fit` : 'the order search needs rows to fit' };
  },
  gaps: 'refused',
  cautions: (p, f) => [
    ...hpFamilyCautions(p.lambda, f),
    'The end of the sample leans on forecasts from an autoregression: the end-of-sample cycle is revised as data replace them.',
  ],
  run(y, { lambda, arOrder, horizon }, { frequency }) {
    const dy = firstDifferences(y);
    let order: number;
    let bic: number[] | undefined;
    const m = y.length;
    try {
      if (arOrder === 'bic') {
        const maxOrder = Math.min(HP_FORECAST[frequency].maxOrder, Math.max(0, Math.floor((dy.length - 4) / 2)));
        ({ order, bic } = selectArOrder(dy, maxOrder, true));
      } else order = arOrder as number;
      const fit = fitAr(dy, order, true);
      const growth = forecastAr(dy, fit, horizon);
      const extended = new Float64Array(m + horizon);
      extended.set(y);
      for (let h = 0; h < horizon; h++) extended[m + h] = extended[m + h - 1] + growth[h];
      const trend = new Float64Array(m + horizon);
      const full = new Float64Array(m + horizon);
      hpCycleInto(extended, lambda, full, trend);
      const cycle = new Float64Array(m + horizon).fill(NaN);
      cycle.set(full.subarray(0, m));
      const forecast = new Float64Array(m + horizon).fill(NaN);
      forecast.set(extended.subarray(m), m);
      return {
        trend,
        cycle,
        series: { forecast },
        extension: { periods: horizon, label: 'forecast' },
        diagnostics: { arOrder: order, constant: fit.constant, arCoefficients: fit.coefficients, sigma2: fit.sigma2, ...(bic ? { bic } : {}), cutoffPeriod: cutoffPeriod(lambda, 2) },
      };
    } catch (error) {
      if (error instanceof RangeError) throw new AnalysisError('series_too_short', `Hodrick–Prescott with forecast extension: ${error.message}.`);
      throw error;
    }
  },
  methodLine: (p, d) => `λ = ${fmt(p.lambda)}, AR(${typeof d.arOrder === 'number' ? d.arOrder : p.arOrder}) forecasts ${fmt(p.horizon)} periods ahead`,
});
