/** A study's specification run on its stored series: the check behind saving, and the start of every result. */
import { aggregateByAverage } from '../../analysis/aggregate.js';
import { decompose, fromJsonResponse, type DecomposeRequest, type DecomposeResult } from '../../analysis/index.js';
import type { Db } from '../../db.js';
import type { Frequency } from '../../schemas/frequency.js';
import type { StudySpec } from '../../schemas/studies.js';
import { readSeriesValues } from '../catalogue/stored-values.js';
import { vintageInForce } from '../catalogue/vintages.js';
import type { AnalysisPool } from '../../workers/pool.js';
import { decomposeOnWorker, inlineWork } from '../decompose.js';

export interface SpecOptions {
  /** Compare on this frequency (averaging a higher one into it). */
  frequency?: Frequency;
  /** The worker threads: work too large or too slow for the request thread goes there (services/decompose.ts inlineWork). */
  pool?: AnalysisPool;
}

/** A decomposition on the request thread when it is small and cheap, else on a worker thread (without a pool, here). */
async function decomposeAnywhere(request: DecomposeRequest, pool: AnalysisPool | undefined): Promise<DecomposeResult> {
  if (!pool || inlineWork(request.values.length, [request.method])) return decompose(request);
  // Studies are not charged to the per-account budget that POST /decompose pays (nothing spent).
  const bytes = await decomposeOnWorker(pool, request, async () => {});
  return fromJsonResponse(JSON.parse(Buffer.from(bytes).toString('utf8')));
}

/**
 * Runs a specification on its stored series: the data and the decomposition (AnalysisError → 400).
 * With `frequency` below the series' own, the data are first averaged into that frequency
 * (a comparison of series of different frequencies on a common one).
 */
export async function runSpec(db: Db, spec: StudySpec, opts: SpecOptions = {}) {
  // A date pin reads the vintage in force on that date (404 when none was released by then).
  const vintage = spec.asOf ? (await vintageInForce(db, spec.seriesId, spec.asOf)).number : spec.vintage;
  const stored = await readSeriesValues(db, spec.seriesId, vintage);
  const to = opts.frequency ?? stored.series.frequency;
  const data = to === stored.series.frequency ? stored : { ...stored, ...aggregateByAverage(stored.periods, stored.values, stored.series.frequency, to) };
  const start = to === stored.series.frequency ? (data.start ?? undefined) : data.periods[0];
  const r = await decomposeAnywhere({ frequency: to, start, values: data.values, transform: spec.transform, method: spec.method, params: spec.params }, opts.pool);
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
