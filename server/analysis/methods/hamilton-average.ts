/**
 * Averaged Hamilton regression filter (Quast and Wolters 2022).
 *
 * Model: the mean over horizons h = hMin … hMax of Hamilton's (2018) regression cycles,
 *   cₜ = (hMax − hMin + 1)⁻¹ Σₕ vₜ⁽ʰ⁾,   vₜ⁽ʰ⁾ = yₜ − β̂₀⁽ʰ⁾ − Σⱼ β̂ⱼ⁽ʰ⁾ yₜ₋ₕ₋ⱼ₊₁ (j = 1 … p),
 * each regression by least squares on its own rows (hamilton.ts); trend yₜ − cₜ. Quast and
 * Wolters take the mean of the 4- to 12-quarter-ahead forecast errors of the Hamilton regression
 * with p = 4 (their abstract states the 4-to-12 range; the per-horizon regressions are Hamilton's).
 * One-sided; the first hMax + p − 1 periods have no value.
 *
 * Parameters: `hMin`, `hMax` (horizons), `p` (lags). Defaults: quarterly 4, 12, 4; monthly 12,
 * 36, 12; annual 1, 3, 1 (the quarterly span in years). Needs hMax + 2p + 1 observations.
 * Gaps: a period has no value where any horizon's regression has none.
 * Diagnostics: `horizons`, `coefficients` (one row [β₀, β₁, …] per horizon).
 *
 * References: Quast, J. and Wolters, M. H. (2022), "Reliable real-time output gap estimates based
 * on a modified Hamilton filter", Journal of Business & Economic Statistics 40(1),
 * doi:10.1080/07350015.2020.1784747.
 * Hamilton, J. D. (2018), Review of Economics and Statistics 100(5), 831–843.
 *
 * Worked example: with hMin = hMax = 8 it is the Hamilton filter with h = 8; the reference test
 * compares the average with numpy.linalg.lstsq regressions to 1e-8.
 */
import { AnalysisError } from '../errors.js';
import { hamiltonFilter } from '../hamilton.js';
import { fmt } from './common.js';
import { defineMethod } from './types.js';

const DEFAULTS = { Q: { hMin: 4, hMax: 12, p: 4 }, M: { hMin: 12, hMax: 36, p: 12 }, A: { hMin: 1, hMax: 3, p: 1 } } as const;

export const hamiltonAverage = defineMethod({
  id: 'hamilton-average',
  name: 'Averaged Hamilton filter',
  twoSided: false,
  params: {
    hMin: { kind: 'integer', label: 'Shortest horizon', min: 1, max: 120, unit: 'periods', hint: '{periods} ahead' },
    hMax: { kind: 'integer', label: 'Longest horizon', min: 1, max: 120, unit: 'periods', hint: '{periods} ahead' },
    p: { kind: 'integer', label: 'p (lags)', min: 1, max: 60 },
  },
  defaults: (f) => ({ ...DEFAULTS[f] }),
  check: ({ hMin, hMax }) => (hMax >= hMin ? null : { param: 'hMax', message: 'hMax must be at least hMin.' }),
  minimumLength: ({ hMax, p }) => ({ count: hMax + 2 * p + 1, why: `hMax + 2p + 1 with hMax = ${hMax}, p = ${p}` }),
  gaps: 'local',
  run(y, { hMin, hMax, p }) {
    const n = y.length;
    const sum = new Float64Array(n);
    const coefficients: number[][] = [];
    try {
      for (let h = hMin; h <= hMax; h++) {
        const r = hamiltonFilter(y, h, p);
        coefficients.push(r.coefficients);
        for (let t = 0; t < n; t++) sum[t] += r.cycle[t]; // NaN anywhere stays NaN
      }
    } catch (error) {
      throw new AnalysisError('series_too_short', `Averaged Hamilton filter: ${(error as Error).message}.`);
    }
    const count = hMax - hMin + 1;
    const cycle = sum.map((s) => s / count);
    const trend = new Float64Array(n);
    for (let t = 0; t < n; t++) trend[t] = y[t] - cycle[t];
    const horizons = Array.from({ length: count }, (_, i) => hMin + i);
    return { trend, cycle, diagnostics: { horizons, coefficients } };
  },
  methodLine: (p) => `h = ${fmt(p.hMin)}–${fmt(p.hMax)}, p = ${fmt(p.p)}`,
});
