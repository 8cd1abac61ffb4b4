/**
 * Hamilton (2018) regression filter.
 *
 * Model: regress y_{t+h} on a constant and the p latest values known at t,
 *   y_{t+h} = β₀ + β₁yₜ + … + β_p y_{t−p+1} + v_{t+h},
 * by least squares (hamilton.ts); the fitted value is the trend, the residual the cycle. One-sided:
 * the estimate at t+h uses data up to t+h only. The first h + p − 1 periods have no value.
 *
 * Parameters: `h` (horizon, periods), `p` (lags). Defaults, Hamilton's recommendation: quarterly
 * h = 8, p = 4; monthly h = 24, p = 12; annual h = 2, p = 1. Needs h + 2p + 1 observations (more
 * rows than coefficients). Gaps: rows with a missing regressor or target are left out.
 * Gain: |1 − Σⱼ βⱼ e^{−iω(h+j−1)}| with the estimated β (or, without a fit, the random walk's).
 * Diagnostics: `coefficients` [β₀, β₁, …] and `observationsUsed`.
 *
 * References: Hamilton, J. D. (2018), "Why you should never use the Hodrick–Prescott filter",
 * Review of Economics and Statistics 100(5), 831–843.
 *
 * Worked example: for a random walk the population coefficients are β₁ = 1, β₂…β_p = 0, so the
 * cycle is the h-period change y_{t+h} − yₜ; the reference test compares with numpy.linalg.lstsq.
 */
import { AnalysisError } from '../errors.js';
import { complexGain } from '../gain.js';
import { hamiltonFilter } from '../hamilton.js';
import { fmt } from './common.js';
import { defineMethod } from './types.js';

const DEFAULTS = { Q: { h: 8, p: 4 }, M: { h: 24, p: 12 }, A: { h: 2, p: 1 } } as const;

export const hamilton = defineMethod({
  id: 'hamilton',
  name: 'Hamilton regression filter',
  twoSided: false,
  params: {
    h: { kind: 'integer', label: 'h (horizon)', min: 1, max: 120, unit: 'periods', hint: '{periods} ahead' },
    p: { kind: 'integer', label: 'p (lags)', min: 1, max: 60 },
  },
  defaults: (f) => ({ ...DEFAULTS[f] }),
  minimumLength: ({ h, p }) => ({ count: h + 2 * p + 1, why: `h + 2p + 1 with h = ${h}, p = ${p}, so that the regression has more rows than coefficients` }),
  gaps: 'local',
  run(y, { h, p }) {
    let result;
    try {
      result = hamiltonFilter(y, h, p);
    } catch (error) {
      throw new AnalysisError('series_too_short', `Hamilton regression: ${(error as Error).message}.`);
    }
    return { trend: result.trend, cycle: result.cycle, diagnostics: { coefficients: result.coefficients, observationsUsed: result.observationsUsed } };
  },
  gain: ({ h, p }, { diagnostics }) => {
    const estimated = diagnostics.coefficients as number[] | undefined;
    const beta = estimated?.slice(1) ?? [1, ...new Array(p - 1).fill(0)];
    return { response: (w) => complexGain(beta, w, h, true), note: estimated ? 'with the estimated coefficients' : 'for a random walk: the h-period change' };
  },
  methodLine: (p) => `h = ${fmt(p.h)}, p = ${fmt(p.p)}`,
});
