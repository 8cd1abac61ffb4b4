/**
 * Baxter–King band-pass filter.
 *
 * Model: a symmetric moving average of 2K + 1 terms approximating the ideal band-pass filter for
 * periods between `low` and `high`, with weights adjusted to sum to zero (bandpass.ts); the cycle
 * is the filtered series, the trend y − cycle. The K periods at each end have no value.
 *
 * Parameters: `low`, `high` (periods), `k` (K, lags). Defaults: quarterly 6, 32, 12; monthly 18,
 * 96, 36; annual 2, 8, 3 (Baxter and King's business-cycle band). Needs 2K + 1 observations.
 * Gaps: no value wherever the window touches one. Gain: |Σⱼ aⱼ cos(jω)|.
 *
 * References: Baxter, M. and King, R. G. (1999), "Measuring business cycles: approximate band-pass
 * filters for economic time series", Review of Economics and Statistics 81(4), 575–593.
 *
 * Worked example: the reference test matches statsmodels' bkfilter (scripts/make_references.py).
 */
import { baxterKingCycle, baxterKingWeights } from '../bandpass.js';
import { fmt, minus } from './common.js';
import { BAND, bandParams, checkBand } from './band.js';
import { defineMethod } from './types.js';

export const baxterKing = defineMethod({
  id: 'baxter-king',
  name: 'Baxter–King',
  twoSided: true,
  params: { ...bandParams, k: { kind: 'integer', label: 'K (lags)', min: 1, max: 500 } },
  defaults: (f) => ({ ...BAND[f] }),
  check: checkBand,
  minimumLength: ({ k }) => ({ count: 2 * k + 1, why: `2K + 1 with K = ${k}` }),
  gaps: 'local',
  run(y, { low, high, k }) {
    const cycle = baxterKingCycle(y, low, high, k);
    return { trend: minus(y, cycle), cycle };
  },
  gain: ({ low, high, k }) => {
    const w = baxterKingWeights(low, high, k);
    const response = (om: number) => {
      let s = 0;
      for (let j = -k; j <= k; j++) s += w[j + k] * Math.cos(om * j);
      return Math.abs(s);
    };
    return { response, band: [low, high] };
  },
  methodLine: (p) => `periods ${fmt(p.low)}–${fmt(p.high)}, K = ${fmt(p.k)}`,
});
