/**
 * Whittaker–Henderson smoothing of order d (1, 2 or 3).
 *
 * Objective: τ minimises Σ (yₜ − τₜ)² + λ·Σ (Δᵈτₜ)²; order 2 is the Hodrick–Prescott filter,
 * order 1 smooths towards a level, order 3 penalises changes in curvature. Solved in the cycle
 * form c = Dᵀ(I/λ + DDᵀ)⁻¹Dy (whittaker.ts), O(n·d²).
 *
 * Parameters: `lambda` (λ > 0; defaults as hp: 100 A, 1600 Q, 14 400 M), `order` (1, 2 or 3;
 * default 2). Gaps: weight zero, as hp. Gain of the cycle filter:
 * G(ω) = λ(2 − 2cos ω)^d / (1 + λ(2 − 2cos ω)^d); cut-off where λ(2 − 2cos(2π/P))^d = 1.
 *
 * References: Whittaker, E. T. (1923), "On a new method of graduation", Proceedings of the
 * Edinburgh Mathematical Society 41; Henderson, R. (1924), "A new method of graduation",
 * Transactions of the Actuarial Society of America 25.
 *
 * Worked example: order 2 gives exactly the hp numbers (tests/unit/analysis-properties.test.ts);
 * orders 1 and 3 match a dense solve of (I + λDᵀD)τ = y.
 */
import { cutoffPeriod, HP_CONVENTION } from '../../schemas/methods.js';
import { hpCycleGain } from '../gain.js';
import { hpCycleInto, whittakerCycle } from '../whittaker.js';
import { fmt, hpFamilyCautions, LAMBDA_PARAM, minus } from './common.js';
import { trendWithGaps } from './hp.js';
import { defineMethod } from './types.js';

export const whittaker = defineMethod({
  id: 'whittaker',
  name: 'Whittaker–Henderson',
  twoSided: true,
  params: {
    lambda: { ...LAMBDA_PARAM, orderParam: 'order' },
    order: {
      kind: 'enum',
      label: 'Order of the difference penalty',
      options: [
        { value: 1, label: '1: first differences (level)' },
        { value: 2, label: '2: second differences (Hodrick–Prescott)' },
        { value: 3, label: '3: third differences' },
      ],
    },
  },
  defaults: (f) => ({ lambda: HP_CONVENTION[f], order: 2 }),
  minimumLength: (p) => ({ count: p.order + 1, why: 'order + 1' }),
  gaps: 'weighted',
  cautions: (p, f) => hpFamilyCautions(p.lambda, f),
  run(y, { lambda, order }, { gaps }) {
    const diagnostics = { cutoffPeriod: cutoffPeriod(lambda, order) };
    if (gaps > 0) {
      const trend = trendWithGaps(y, lambda, order);
      return { trend, cycle: minus(y, trend), diagnostics };
    }
    const cycle = new Float64Array(y.length);
    if (order === 2) {
      const trend = new Float64Array(y.length);
      hpCycleInto(y, lambda, cycle, trend);
      return { trend, cycle, diagnostics };
    }
    whittakerCycle(y, lambda, order, cycle);
    return { trend: minus(y, cycle), cycle, diagnostics };
  },
  gain: ({ lambda, order }) => ({ response: (w) => hpCycleGain(lambda, order, w), cutoff: cutoffPeriod(lambda, order) }),
  methodLine: (p) => `λ = ${fmt(p.lambda)}, order ${fmt(p.order)}`,
});
