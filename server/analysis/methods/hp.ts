/**
 * Hodrick–Prescott filter (two-sided).
 *
 * Objective: the trend τ minimises Σ (yₜ − τₜ)² + λ·Σ (Δ²τₜ)², i.e. (I + λ·DᵀD)·τ = y with D the
 * second-difference matrix; the cycle is c = y − τ. Solved in the cycle form (whittaker.ts):
 * accurate for λ from 1e-6 to 1e12, O(n) time.
 *
 * Parameters: `lambda` (λ > 0). Defaults: 1600 quarterly (Hodrick and Prescott 1997), 100 annual
 * and 14 400 monthly (common practice); Ravn and Uhlig (2002) scale λ by the fourth power of the
 * frequency ratio instead (a preset of the editor).
 * Gaps: weight zero; the trend runs through them (at λ ≥ 100 by the filled-gap iteration, else by
 * the direct weighted solve).
 * Gain of the cycle filter (infinite sample): G(ω) = λ(2 − 2cos ω)² / (1 + λ(2 − 2cos ω)²); the
 * trend gain is one half at the cut-off period, about 39.7 quarters for λ = 1600.
 *
 * References: Hodrick, R. J. and Prescott, E. C. (1997), "Postwar U.S. business cycles: an
 * empirical investigation", Journal of Money, Credit and Banking 29(1), 1–16.
 *
 * Worked example: y = [1, 2, 4, 7, 11] with λ = 1 has the trend [13/24, 9/4, 53/12, 29/4, 253/24]
 * (exact rational arithmetic in scripts/make_references.py; tests/unit/analysis-references.test.ts).
 */
import { cutoffPeriod } from '../../schemas/methods.js';
import { hpCycleGain } from '../gain.js';
import { hpCycleInto, whittakerTrendFilled, whittakerTrendWeighted } from '../whittaker.js';
import { hpLambdaOnly, minus, observationWeights, solveOrRefuse } from './common.js';
import { defineMethod } from './types.js';

/** The trend of a series with interior gaps for the Whittaker–Henderson family (hp and whittaker share it). */
export function trendWithGaps(y: Float64Array, lambda: number, order: number): Float64Array {
  const filled = lambda >= 100 ? whittakerTrendFilled(y, lambda, order) : null;
  return filled ?? solveOrRefuse(() => whittakerTrendWeighted(y, observationWeights(y), lambda, order));
}

export const hp = defineMethod({
  id: 'hp',
  name: 'Hodrick–Prescott',
  twoSided: true,
  ...hpLambdaOnly,
  run(y, { lambda }, { gaps }) {
    if (gaps > 0) {
      const trend = trendWithGaps(y, lambda, 2);
      return { trend, cycle: minus(y, trend), diagnostics: { cutoffPeriod: cutoffPeriod(lambda, 2) } };
    }
    const trend = new Float64Array(y.length);
    const cycle = new Float64Array(y.length);
    hpCycleInto(y, lambda, cycle, trend);
    return { trend, cycle, diagnostics: { cutoffPeriod: cutoffPeriod(lambda, 2) } };
  },
  gain: ({ lambda }) => ({ response: (w) => hpCycleGain(lambda, 2, w), cutoff: cutoffPeriod(lambda, 2) }),
});
