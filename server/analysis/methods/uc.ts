/**
 * Unobserved components by maximum likelihood (Clark 1987; Watson 1986).
 *
 * Model: yₜ = τₜ + cₜ with an AR(2) cycle cₜ = φ₁cₜ₋₁ + φ₂cₜ₋₂ + εₜ and the trend either
 * `local-linear` (Clark 1987: τₜ = τₜ₋₁ + βₜ₋₁ + ηₜ, βₜ = βₜ₋₁ + ζₜ) or `random-walk-drift`
 * (Watson 1986: τₜ = τₜ₋₁ + β + ηₜ); no irregular term. Estimated by maximum likelihood with the
 * Kalman filter, the trend and cycle are the smoother's estimates given the whole sample
 * (two-sided), and the band is cycle ± z·sd from the smoother's variances (uc.ts, kalman.ts).
 *
 * Parameters: `trend` ("local-linear", default, or "random-walk-drift"), `bandLevel` (0.68 or
 * 0.90, default 0.90: z = 0.994 or 1.645). Needs 20 observations. Gaps: the filter skips them
 * (the trend and cycle are estimated there too; the cycle is shown only where y is observed).
 * Outputs: `cycleLower`, `cycleUpper`. Diagnostics: `loglike`, `params` (sigma2Level,
 * sigma2Slope, sigma2Cycle, phi1, phi2), `arCoefficients`, `converged`, `iterations`, `bandLevel`.
 * Warnings: an optimiser that stopped before its gradient test, estimates on the boundary (a
 * variance at zero, a cycle root at one). The band treats the estimated parameters as known.
 *
 * References: Clark, P. K. (1987), Quarterly Journal of Economics 102(4), 797–814. Watson, M. W.
 * (1986), Journal of Monetary Economics 18(1), 49–75. Durbin, J. and Koopman, S. J. (2012),
 * Time Series Analysis by State Space Methods, 2nd ed.
 *
 * Worked example: 100 × log US real GDP 1959Q1–2009Q3, local-linear: log-likelihood −248.6010
 * with φ = (1.664, −0.722); statsmodels' UnobservedComponents fit of the same model reaches
 * −248.6010148 (scripts/make_methods_references.py; tests/unit/methods-references.test.ts).
 */
import { AnalysisError } from '../errors.js';
import { ucFit, type UcTrend } from '../uc.js';
import { defineMethod } from './types.js';

/** Two-sided normal quantiles of the band levels. */
const Z = { 0.68: 0.994457883209753, 0.9: 1.644853626951472 } as const;

export const uc = defineMethod({
  id: 'uc',
  name: 'Unobserved components',
  twoSided: true,
  params: {
    trend: {
      kind: 'enum',
      label: 'Trend',
      options: [
        { value: 'local-linear', label: 'Local linear (drift varies)' },
        { value: 'random-walk-drift', label: 'Random walk with fixed drift' },
      ],
    },
    bandLevel: {
      kind: 'enum',
      label: 'Band',
      options: [
        { value: 0.68, label: '68 %' },
        { value: 0.9, label: '90 %' },
      ],
    },
  },
  defaults: () => ({ trend: 'local-linear', bandLevel: 0.9 }),
  minimumLength: () => ({ count: 20, why: 'to estimate five parameters by maximum likelihood' }),
  gaps: 'weighted',
  cautions: (p) => [`The ${Math.round(p.bandLevel * 100)} % band takes the estimated parameters as known: it understates the uncertainty.`],
  run(y, { trend, bandLevel }) {
    let fit;
    try {
      fit = ucFit(y, trend as UcTrend);
    } catch (error) {
      throw new AnalysisError('unsolvable', `Unobserved components: ${(error as Error).message}.`);
    }
    const z = Z[bandLevel as 0.68 | 0.9];
    const n = y.length;
    const cycleLower = new Float64Array(n);
    const cycleUpper = new Float64Array(n);
    for (let t = 0; t < n; t++) {
      cycleLower[t] = fit.cycle[t] - z * fit.cycleSd[t];
      cycleUpper[t] = fit.cycle[t] + z * fit.cycleSd[t];
    }
    const warnings: string[] = [];
    if (!fit.converged) warnings.push(`The likelihood maximisation stopped after ${fit.iterations} iterations before its convergence test was met: treat the estimates with care.`);
    if (fit.boundary.length) warnings.push(`Estimated on the boundary: ${fit.boundary.join(', ')} (a variance at zero or a cycle root near one); the model may not suit this series.`);
    const { params } = fit;
    return {
      trend: fit.trend,
      cycle: fit.cycle,
      series: { cycleLower, cycleUpper },
      diagnostics: {
        loglike: fit.loglike,
        params: trend === 'local-linear' ? params : { sigma2Level: params.sigma2Level, sigma2Cycle: params.sigma2Cycle, phi1: params.phi1, phi2: params.phi2 },
        arCoefficients: [params.phi1, params.phi2],
        converged: fit.converged,
        iterations: fit.iterations,
        bandLevel,
      },
      warnings,
    };
  },
  methodLine: (p) => `${p.trend === 'local-linear' ? 'local linear trend' : 'random walk with drift'}, AR(2) cycle, ${Math.round(p.bandLevel * 100)} % band`,
});
