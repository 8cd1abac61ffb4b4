/**
 * Beveridge–Nelson filter (Kamber, Morley and Wong 2018).
 *
 * Model: an AR(p) on demeaned first differences xₜ = Δyₜ − μ (μ the sample mean), with the
 * signal-to-noise ratio δ = σ²_{Δτ}/σ²_e imposed through the sum of the AR coefficients,
 * ρ = φ₁ + … + φ_p = 1 − 1/√δ (the paper's section II, the Dickey–Fuller form of the AR); the
 * remaining coefficients by least squares given ρ. The cycle is the BN cycle
 * cₜ = −Σ_{j≥1} Eₜ[xₜ₊ⱼ] (minus the growth still to come above its mean); trend yₜ − cₜ (bn.ts).
 * One-sided: cₜ uses data up to t only. The first p periods have no value.
 *
 * Parameters: `p` (lags: quarterly 12, monthly 36, annual 4; the paper uses 12 for quarterly
 * data), `delta`: a number > 0 (imposed), "auto" (default: the paper's rule, the δ that maximises
 * the amplitude-to-noise ratio var(c)/σ²_e on a grid from 0.01 to 1) or "none" (no restriction:
 * the classic Beveridge–Nelson (1981) decomposition; for an AR(1) the cycle is
 * −φ/(1 − φ)·(Δyₜ − μ), the closed form the tests check). Needs p + 10 observations. No gaps.
 * Differences from the paper: the paper estimates the φ* with a shrinkage prior (Bayesian); here
 * they are least squares given ρ; its optional dynamic demeaning (breaks in μ) is not offered.
 * Diagnostics: `delta` (used; null for "none"), `impliedDelta` (of the unrestricted AR), `rho`,
 * `arCoefficients`, `sigma2`, `mean`, `amplitudeToNoise`.
 *
 * References: Kamber, G., Morley, J. and Wong, B. (2018), "Intuitive and reliable estimates of the
 * output gap from a Beveridge–Nelson filter", Review of Economics and Statistics 100(3), 550–566.
 * Beveridge, S. and Nelson, C. R. (1981), "A new approach to decomposition of economic time series
 * into permanent and transitory components…", Journal of Monetary Economics 7(2), 151–174.
 * Morley, J. C. (2002), "A state-space approach to calculating the Beveridge–Nelson
 * decomposition", Economics Letters 75(1), 123–127.
 *
 * Worked example: 100 × log US real GDP 1959Q1–2009Q3 (statsmodels' macro data), p = 12,
 * delta "auto" chooses δ = 0.232 (the paper reports 0.24 on 1947–2016 data, as recalled from
 * memory, not checked against the printed paper); the unrestricted AR implies δ ≈ 1.93.
 */
import { bnFilter } from '../bn.js';
import { AnalysisError } from '../errors.js';
import { fmt } from './common.js';
import { defineMethod } from './types.js';

const LAGS = { Q: 12, M: 36, A: 4 } as const;

export const bnFilterMethod = defineMethod({
  id: 'bn-filter',
  name: 'Beveridge–Nelson filter',
  twoSided: false,
  params: {
    p: { kind: 'integer', label: 'p (lags of growth)', min: 1, max: 60 },
    delta: {
      kind: 'number',
      label: 'Signal-to-noise ratio δ',
      min: 0.0001,
      max: 100,
      hint: 'Lower δ: a smoother trend and a larger cycle',
      choices: [
        { value: 'auto', label: 'chosen by the amplitude-to-noise rule' },
        { value: 'none', label: 'none (classic Beveridge–Nelson)' },
      ],
    },
  },
  defaults: (f) => ({ p: LAGS[f], delta: 'auto' }),
  minimumLength: ({ p }) => ({ count: p + 10, why: `p + 10 with p = ${p}, so that the autoregression on growth has enough rows` }),
  gaps: 'refused',
  cautions: (params) =>
    params.delta === 'none'
      ? ['Without a restriction on δ the Beveridge–Nelson cycle is often small and noisy: most movement goes to the trend.']
      : ['The Beveridge–Nelson cycle depends on the imposed signal-to-noise ratio δ: compare a few values.'],
  run(y, { p, delta }) {
    let r;
    try {
      r = bnFilter(y, p, delta as number | 'auto' | 'none');
    } catch (error) {
      throw new AnalysisError('series_too_short', `Beveridge–Nelson filter: ${(error as Error).message}.`);
    }
    const warnings: string[] = [];
    if (delta === 'none' && Math.abs(1 - r.rho) < 1e-3) warnings.push('The unrestricted autoregression has a root near one: the Beveridge–Nelson cycle is not reliable; impose δ instead.');
    return {
      trend: r.trend,
      cycle: r.cycle,
      diagnostics: { delta: r.delta, impliedDelta: r.impliedDelta, rho: r.rho, arCoefficients: r.phi, sigma2: r.sigma2, mean: r.mean, amplitudeToNoise: r.amplitudeToNoise },
      warnings,
    };
  },
  methodLine: (params, diagnostics) => {
    const used = typeof diagnostics.delta === 'number' ? diagnostics.delta : null;
    const d = params.delta === 'auto' ? `δ = ${used === null ? 'auto' : fmt(used)} (chosen)` : params.delta === 'none' ? 'no δ restriction' : `δ = ${fmt(params.delta)}`;
    return `p = ${fmt(params.p)}, ${d}`;
  },
});
