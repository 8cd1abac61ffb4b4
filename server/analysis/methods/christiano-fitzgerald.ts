/**
 * Christiano–Fitzgerald asymmetric band-pass filter (random-walk version).
 *
 * Model: the optimal finite-sample approximation to the ideal band-pass filter for periods
 * between `low` and `high` when y is a random walk (possibly with drift, removed first when
 * `drift` is true); the weights change with t and use the whole sample (bandpass.ts, by FFT for
 * long series). The cycle is the filtered series, the trend y − cycle.
 *
 * Parameters: `low`, `high` (periods; defaults as baxter-king), `drift` (default true). Needs 4
 * observations and no gaps. Gain: of the weights of the middle observation of the sample.
 *
 * References: Christiano, L. J. and Fitzgerald, T. J. (2003), "The band pass filter",
 * International Economic Review 44(2), 435–465.
 *
 * Worked example: the reference test matches statsmodels' cffilter (scripts/make_references.py).
 */
import { christianoFitzgerald as cfFilter } from '../bandpass.js';
import { fmt, minus } from './common.js';
import { BAND, bandParams, checkBand } from './band.js';
import { defineMethod } from './types.js';

/** |Σ wⱼ e^{−iωj}| of the weights of observation t = ⌊n/2⌋ of an n-period sample, as in bandpass.ts. */
function middleWeightsGain(low: number, high: number, n: number) {
  const a = (2 * Math.PI) / high;
  const b = (2 * Math.PI) / low;
  const t = Math.floor(n / 2);
  const B = (j: number) => (j === 0 ? (b - a) / Math.PI : (Math.sin(b * j) - Math.sin(a * j)) / (Math.PI * j));
  let sumUp = 0;
  for (let j = 1; j <= n - t - 2; j++) sumUp += B(j);
  let sumDown = 0;
  for (let j = 1; j <= t - 1; j++) sumDown += B(j);
  const Bt = -0.5 * B(0) - sumUp;
  return (om: number) => {
    let re = 0;
    let im = 0;
    const add = (lag: number, wgt: number) => {
      re += wgt * Math.cos(om * lag);
      im -= wgt * Math.sin(om * lag);
    };
    add(0, B(0));
    for (let j = 1; j <= n - t - 2; j++) add(-j, B(j));
    for (let j = 1; j <= t - 1; j++) add(j, B(j));
    add(-(n - 1 - t), Bt);
    add(t, -B(0) - sumUp - sumDown - Bt);
    return Math.hypot(re, im);
  };
}

export const christianoFitzgerald = defineMethod({
  id: 'christiano-fitzgerald',
  name: 'Christiano–Fitzgerald',
  twoSided: true,
  params: { ...bandParams, drift: { kind: 'boolean', label: 'remove drift' } },
  defaults: (f) => ({ low: BAND[f].low, high: BAND[f].high, drift: true }),
  check: checkBand,
  minimumLength: () => ({ count: 4 }),
  gaps: 'refused',
  run(y, { low, high, drift }) {
    const { cycle } = cfFilter(y, low, high, drift);
    return { trend: minus(y, cycle), cycle };
  },
  gain: ({ low, high }, { n }) => {
    const size = Math.max(3, Math.min(n ?? 200, 2000));
    return { response: middleWeightsGain(low, high, size), band: [low, high], note: `weights of the middle observation of a ${size}-period sample` };
  },
  methodLine: (p) => `periods ${fmt(p.low)}–${fmt(p.high)}${p.drift ? ', drift removed' : ''}`,
});
