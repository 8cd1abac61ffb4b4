/**
 * One-sided ("real-time") Hodrick–Prescott filter.
 *
 * Model: the estimate at t is the end point of the two-sided HP filter applied to y₀…yₜ, so it
 * uses no data after t and is not revised by later observations (only by revisions of the data).
 * Complete series: one forward pass through the Toeplitz factor gives every end point in O(n)
 * (whittaker.ts hpOneSidedCycle); with gaps, an updating factorization of the weighted system.
 *
 * Parameters: `lambda` (defaults as hp; the Basel Committee's credit-to-GDP gap uses 400 000 on
 * quarterly data, a preset). The first two periods have no value.
 * Gain: of the end-point filter of a long sample, |1 − Σⱼ wⱼ e^{−iωj}|; it also shifts the phase.
 *
 * References: Basel Committee on Banking Supervision (2010), "Guidance for national authorities
 * operating the countercyclical capital buffer"; Hodrick and Prescott (1997).
 *
 * Worked example: the reference test checks it against the end points of statsmodels' hpfilter
 * on expanding samples (scripts/make_references.py).
 */
import { cutoffPeriod } from '../../schemas/methods.js';
import { complexGain, hpEndpointWeights } from '../gain.js';
import { hpOneSidedCycle, hpOneSidedTrendWeighted } from '../hp-one-sided.js';
import { hpLambdaOnly, minus, observationWeights, solveOrRefuse } from './common.js';
import { defineMethod } from './types.js';

export const hpOneSided = defineMethod({
  id: 'hp-one-sided',
  name: 'Hodrick–Prescott, one-sided',
  twoSided: false,
  ...hpLambdaOnly,
  run(y, { lambda }, { gaps }) {
    const warnings = ['The one-sided filter starts at the third period, and its first years rest on few observations.'];
    const diagnostics = { cutoffPeriod: cutoffPeriod(lambda, 2) };
    if (gaps > 0) {
      const trend = solveOrRefuse(() => hpOneSidedTrendWeighted(y, observationWeights(y), lambda));
      return { trend, cycle: minus(y, trend), diagnostics, warnings };
    }
    const cycle = hpOneSidedCycle(y, lambda);
    return { trend: minus(y, cycle), cycle, diagnostics, warnings };
  },
  gain: ({ lambda }) => {
    const cutoff = cutoffPeriod(lambda, 2);
    const weights = hpEndpointWeights(lambda, Math.min(4000, Math.max(400, Math.ceil(20 * (cutoff ?? 40)))));
    return { response: (w) => complexGain(weights, w, 0, true), cutoff, note: 'gain of the end-point (real-time) filter; it also shifts the phase' };
  },
});
