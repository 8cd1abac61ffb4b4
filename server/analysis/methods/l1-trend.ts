/**
 * ℓ1 trend filtering.
 *
 * Objective: τ minimises ½·Σ (yₜ − τₜ)² + λ·Σ |Δ²τₜ|, a piecewise-linear trend whose kinks are the
 * trend's turning points; solved by a primal–dual interior-point method on the dual (l1trend.ts).
 * Not a linear filter: no gain function.
 *
 * Parameters: `lambda` (λ > 0), required: there is no conventional value (the editor suggests 10,
 * for quarterly data in 100 × log). At λ ≥ λ_max the trend is the least-squares line. Needs a
 * series without gaps. Diagnostics: `dualityGap`, `iterations`, `converged`, `lambdaMax`.
 *
 * References: Kim, S.-J., Koh, K., Boyd, S. and Gorinevsky, D. (2009), "ℓ1 trend filtering",
 * SIAM Review 51(2), 339–360.
 *
 * Worked example: the reference test compares with scipy.optimize.lsq_linear on the dual and
 * checks the optimality conditions (scripts/make_references.py).
 */
import { l1Trend as solveL1 } from '../l1trend.js';
import { fmt, LAMBDA_PARAM, minus } from './common.js';
import { defineMethod } from './types.js';

export const l1Trend = defineMethod({
  id: 'l1-trend',
  name: 'ℓ1 trend filtering',
  twoSided: true,
  params: { lambda: { ...LAMBDA_PARAM, hint: 'Try 10 for quarterly data in 100 × log.' } },
  defaults: () => ({}),
  suggested: () => ({ lambda: 10 }),
  minimumLength: () => ({ count: 3 }),
  gaps: 'refused',
  run(y, { lambda }) {
    const r = solveL1(y, lambda);
    const warnings: string[] = [];
    if (!r.converged) warnings.push(`ℓ1 trend filtering stopped after ${r.iterations} iterations with a duality gap of ${r.dualityGap.toPrecision(3)}.`);
    if (lambda >= r.lambdaMax) warnings.push(`λ is at or above λ_max = ${r.lambdaMax.toPrecision(4)}: the trend is the least-squares straight line.`);
    return { trend: r.trend, cycle: minus(y, r.trend), diagnostics: { dualityGap: r.dualityGap, iterations: r.iterations, converged: r.converged, lambdaMax: r.lambdaMax }, warnings };
  },
  methodLine: (p) => `λ = ${fmt(p.lambda)}`,
});
