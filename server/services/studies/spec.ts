/** A study's specification run on its stored series: the check behind saving, and the start of every result. */
import { aggregateByAverage } from '../../analysis/aggregate.js';
import { decompose } from '../../analysis/index.js';
import type { Db } from '../../db.js';
import type { Frequency } from '../../schemas/frequency.js';
import type { StudySpec } from '../../schemas/studies.js';
import { readSeriesValues } from '../catalogue/stored-values.js';
import { vintageInForce } from '../catalogue/vintages.js';

/**
 * Runs a specification on its stored series: the data and the decomposition (AnalysisError → 400).
 * With `frequency` below the series' own, the data are first averaged into that frequency
 * (a comparison of series of different frequencies on a common one).
 */
export async function runSpec(db: Db, spec: StudySpec, opts: { frequency?: Frequency } = {}) {
  // A date pin reads the vintage in force on that date (404 when none was released by then).
  const vintage = spec.asOf ? (await vintageInForce(db, spec.seriesId, spec.asOf)).number : spec.vintage;
  const stored = await readSeriesValues(db, spec.seriesId, vintage);
  const to = opts.frequency ?? stored.series.frequency;
  const data = to === stored.series.frequency ? stored : { ...stored, ...aggregateByAverage(stored.periods, stored.values, stored.series.frequency, to) };
  const start = to === stored.series.frequency ? (data.start ?? undefined) : data.periods[0];
  const r = decompose({ frequency: to, start, values: data.values, transform: spec.transform, method: spec.method, params: spec.params });
  return { params: r.params, data: { ...data, start: start ?? null }, result: r, aggregated: to !== stored.series.frequency ? { from: stored.series.frequency, to } : null };
}

/**
 * The unit of the cycle, from the transform and the series' unit: a logged series' gap is a
 * percent deviation from trend (100 × log) or log points; a series in percent (a rate, a ratio to
 * GDP) decomposed as it is has its gap in percentage points; otherwise the series' own unit.
 */
export function cycleUnit(transform: string, unit: string) {
  if (transform === 'log100') return '% of trend';
  if (transform === 'log') return 'log points';
  return /%|percent/i.test(unit) ? 'percentage points' : unit;
}
