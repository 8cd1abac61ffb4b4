/**
 * Boosted Hodrick–Prescott filter.
 *
 * Model: apply the HP smoother S = (I + λDᵀD)⁻¹ again to what is left of the cycle,
 * c⁽ᵐ⁾ = (I − S)ᵐ y, and stop by Phillips and Shi's information criterion (BIC form) at its first
 * local minimum, or after a fixed number of rounds (boosted.ts).
 *
 * Parameters: `lambda` (defaults as hp), `stopping` ("bic" or "fixed"; default "bic"),
 * `iterations` (the cap, or the fixed count; default 100). BIC stopping handles up to 4 000
 * observations; no gaps. Gain: the HP cycle gain to the power of the iterations run.
 * Diagnostics: `iterationsUsed`, and `criterion` (IC at each iteration) with BIC stopping.
 *
 * References: Phillips, P. C. B. and Shi, Z. (2021), "Boosting: why you can use the HP filter",
 * International Economic Review 62(2), 521–570.
 *
 * Worked example: the reference test iterates statsmodels' hpfilter with a dense-matrix BIC and
 * finds the same stopping iteration and cycle (scripts/make_references.py).
 */
import { cutoffPeriod, HP_CONVENTION } from '../../schemas/methods.js';
import { boostedHp as boost, BOOSTED_BIC_MAX_N } from '../boosted.js';
import { AnalysisError } from '../errors.js';
import { hpCycleGain } from '../gain.js';
import { fmt, hpFamilyCautions, LAMBDA_PARAM } from './common.js';
import { defineMethod } from './types.js';

export const boostedHp = defineMethod({
  id: 'boosted-hp',
  name: 'Boosted HP',
  twoSided: true,
  params: {
    lambda: LAMBDA_PARAM,
    stopping: {
      kind: 'enum',
      label: 'Stopping',
      options: [
        { value: 'bic', label: 'BIC (Phillips–Shi)' },
        { value: 'fixed', label: 'fixed number' },
      ],
    },
    iterations: { kind: 'integer', label: 'Iterations (at most, with BIC)', min: 1, max: 500 },
  },
  defaults: (f) => ({ lambda: HP_CONVENTION[f], stopping: 'bic', iterations: 100 }),
  minimumLength: () => ({ count: 3 }),
  gaps: 'refused',
  cautions: (p, f) => hpFamilyCautions(p.lambda, f),
  run(y, { lambda, stopping, iterations }) {
    if (stopping === 'bic' && y.length > BOOSTED_BIC_MAX_N) {
      throw new AnalysisError('series_too_long', `Boosted HP with BIC stopping handles at most ${BOOSTED_BIC_MAX_N} observations; use stopping "fixed" for longer series.`);
    }
    const r = boost(y, lambda, stopping, iterations);
    const warnings = stopping === 'bic' && r.iterations === iterations ? [`The BIC rule did not stop within ${iterations} iterations; the result is after the cap.`] : [];
    return {
      trend: r.trend,
      cycle: r.cycle,
      diagnostics: { iterationsUsed: r.iterations, ...(r.criterion.length ? { criterion: r.criterion } : {}), cutoffPeriod: cutoffPeriod(lambda, 2) },
      warnings,
    };
  },
  gain: ({ lambda, iterations }, { diagnostics }) => {
    const m = (diagnostics.iterationsUsed as number | undefined) ?? iterations;
    return { response: (w) => Math.pow(hpCycleGain(lambda, 2, w), m), cutoff: cutoffPeriod(lambda, 2), note: `after ${m} iteration${m === 1 ? '' : 's'}` };
  },
  methodLine: (p, d) => `λ = ${fmt(p.lambda)}, ${p.stopping === 'bic' ? 'BIC stopping' : 'fixed'}${d.iterationsUsed !== undefined ? `, ${fmt(d.iterationsUsed)} iterations` : ''}`,
});
