/**
 * Temporal aggregation of a series to a lower frequency by averaging (monthly → quarterly or
 * annual, quarterly → annual), as statistical offices average the months of a quarter for flows
 * and rates (common practice; for stocks an end-of-period value is the other convention).
 *
 * Parameters: `periods` (SDMX, contiguous, of frequency `from`), `values` (null for missing),
 * `to` the target frequency. A target period gets a value only when every sub-period has one;
 * incomplete periods at either end are dropped.
 *
 * Example: aggregateByAverage(['2024-01','2024-02','2024-03'], [1, 2, 3], 'M', 'Q')
 *   → { periods: ['2024-Q1'], values: [2] }
 */
import type { Frequency } from '../schemas/frequency.js';
import { PERIODS_PER_YEAR } from '../schemas/frequency.js';
import { AnalysisError } from './errors.js';

/** The period of frequency `to` that contains `period` (of a higher or equal frequency). */
export function containingPeriod(period: string, to: Frequency): string {
  const year = period.slice(0, 4);
  if (to === 'A') return year;
  if (to === 'Q') return period[5] === 'Q' ? period : `${year}-Q${Math.floor((Number(period.slice(5, 7)) - 1) / 3) + 1}`;
  return period;
}

export function aggregateByAverage(periods: readonly string[], values: readonly (number | null)[], from: Frequency, to: Frequency): { periods: string[]; values: (number | null)[] } {
  if (PERIODS_PER_YEAR[to] > PERIODS_PER_YEAR[from]) throw new AnalysisError('cannot_disaggregate', `A ${from === 'A' ? 'annual' : 'quarterly'} series cannot be turned into a higher frequency; compare on the lowest frequency of the series.`);
  if (from === to) return { periods: [...periods], values: [...values] };
  const per = PERIODS_PER_YEAR[from] / PERIODS_PER_YEAR[to];
  const out = new Map<string, { sum: number; n: number; missing: boolean }>();
  periods.forEach((p, i) => {
    const key = containingPeriod(p, to);
    const acc = out.get(key) ?? { sum: 0, n: 0, missing: false };
    const v = values[i];
    if (v === null || !Number.isFinite(v)) acc.missing = true;
    else {
      acc.sum += v;
      acc.n++;
    }
    out.set(key, acc);
  });
  const keys = [...out.keys()];
  const avg = keys.map((k) => (out.get(k)!.missing || out.get(k)!.n !== per ? null : out.get(k)!.sum / per));
  // Incomplete periods at either end (a series starting in February) are left out, not kept as gaps.
  let a = 0;
  let b = avg.length;
  while (a < b && avg[a] === null) a++;
  while (b > a && avg[b - 1] === null) b--;
  return { periods: keys.slice(a, b), values: avg.slice(a, b) };
}
