/**
 * ℓ1 trend filtering.
 *
 * Objective: τ minimises ½·Σ (yₜ − τₜ)² + λ·Σ |Δ²τₜ|, a piecewise-linear trend whose kinks are the
 * trend's turning points; solved by a primal–dual interior-point method on the dual (l1trend.ts).
 * Not a linear filter: no gain function.
 *
 * Parameters: `lambda` (λ > 0), required: there is no conventional value (the editor suggests 10,
 * for quarterly data in 100 × log). At λ ≥ λ_max the trend is the least-squares line. Needs a
 * series without gaps, of at most 100 000 observations: the solver factors DDᵀ, whose condition
 * number grows as n⁴, and in double precision that factorization fails near n = 140 000 (measured;
 * the limit leaves a margin). Diagnostics: `dualityGap`, `iterations`, `converged`, `lambdaMax`.
 *
 * References: Kim, S.-J., Koh, K., Boyd, S. and Gorinevsky, D. (2009), "ℓ1 trend filtering",
 * SIAM Review 51(2), 339–360.
 *
 * Worked example: the reference test compares with scipy.optimize.lsq_linear on the dual and
 * checks the optimality conditions (scripts/make_references.py).
 */
import { AnalysisError } from '../errors.js';
import { l1Trend as solveL1 } from '../l1trend.js';
import { fmt, LAMBDA_PARAM, minus } from './common.js';
import { defineMethod } from './types.js';

/** Beyond this many observations the second-difference system cannot be factored accurately (see above). */
export const L1_MAX_OBSERVATIONS = 100_000;

export const l1Trend = defineMethod({
  id: 'l1-trend',
  name: 'ℓ1 trend filtering',
  twoSided: true,
  // An ℓ1 penalty: λ has no cut-off period and the Hodrick–Prescott presets do not apply.
  params: { lambda: { ...LAMBDA_PARAM, squaredPenalty: false, hint: 'Try 10 for quarterly data in 100 × log.' } },
  defaults: () => ({}),
  suggested: () => ({ lambda: 10 }),
  minimumLength: () => ({ count: 3 }),
  gaps: 'refused',
  run(y, { lambda }) {
    if (y.length > L1_MAX_OBSERVATIONS) {
      throw new AnalysisError('series_too_long', `ℓ1 trend filtering takes at most ${L1_MAX_OBSERVATIONS.toLocaleString('en-US')} observations; this series has ${y.length.toLocaleString('en-US')}. Start it later, or use Hodrick–Prescott or Whittaker–Henderson, which have no such limit.`);
    }
    const r = solveL1(y, lambda);
    const warnings: string[] = [];
    if (!r.converged) warnings.push(`ℓ1 trend filtering stopped after ${r.iterations} iterations with a duality gap of ${r.dualityGap.toPrecision(3)}.`);
    if (lambda >= r.lambdaMax) warnings.push(`λ is at or above λ_max = ${r.lambdaMax.toPrecision(4)}: the trend is the least-squares straight line.`);
    return { trend: r.trend, cycle: minus(y, r.trend), diagnostics: { dualityGap: r.dualityGap, iterations: r.iterations, converged: r.converged, lambdaMax: r.lambdaMax }, warnings };
  },
  methodLine: (p) => `λ = ${fmt(p.lambda)}`,
});
