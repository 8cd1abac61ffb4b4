/**
 * The range of gap estimates across methods on one stored series: each method's cycle on aligned
 * periods, and per period the median, minimum and maximum across the methods that have a value.
 * The decompositions run through runBatch (worker threads for all but small work with cheap methods).
 */
import { methodLine, methodName, findMethod } from '../../analysis/index.js';
import { rangeAcross } from '../../analysis/range.js';
import type { Db } from '../../db.js';
import { HttpError } from '../../lib/errors.js';
import { alignByPeriod } from '../../schemas/align.js';
import type { RangeBody, RangeResult } from '../../schemas/analyses.js';
import { CAUTIONS, RANGE_CAUTION } from '../../schemas/cautions.js';
import type { DecomposeJson } from '../../schemas/decompose.js';
import type { AnalysisPool } from '../../workers/pool.js';
import type { FailedItem } from '../../workers/batch-types.js';
import { readSeriesValues } from '../catalogue/stored-values.js';
import { runBatch } from '../decompose.js';
import { cycleUnit } from './spec.js';
import { vintageInForce } from '../catalogue/vintages.js';
import type { MethodChoice, StudySpec } from '../../schemas/studies.js';

const toNaN = (a: (number | null)[]) => Float64Array.from(a, (v) => (v === null ? NaN : v));
const toNull = (a: ArrayLike<number>) => Array.from(a, (v) => (Number.isFinite(v) ? v : null));

export async function rangeOfEstimates(db: Db, pool: AnalysisPool | undefined, body: RangeBody): Promise<RangeResult> {
  const data = await readSeriesValues(db, body.seriesId, body.vintage);
  const frequency = data.series.frequency;
  const items = body.methods.map((m, k) => ({ id: String(k), frequency, start: data.start ?? undefined, values: data.values, transform: body.transform, method: m.method, params: m.params }));
  const answers = (await runBatch(items, 'full', pool)).map((j) => JSON.parse(j) as DecomposeJson & FailedItem);
  const failed = answers.findIndex((a) => a.error);
  if (failed >= 0) {
    const a = answers[failed];
    throw new HttpError(400, a.error.code, `methods[${failed}] (${methodName(body.methods[failed].method)}): ${a.error.message}`, [{ path: `methods.${failed}`, message: a.error.message }]);
  }
  // A method that forecasts past the data (HP with a forecast extension) answers periods where it
  // gives no cycle: the range ends at the last period some method estimated.
  const all = alignByPeriod(answers.map((a) => ({ periods: a.periods ?? data.periods, values: a.cycle })));
  let end = all.periods.length;
  while (end > 0 && all.values.every((v) => v[end - 1] === null)) end--;
  const aligned = { periods: all.periods.slice(0, end), values: all.values.map((v) => v.slice(0, end)) };
  const range = rangeAcross(aligned.values.map(toNaN));
  return {
    series: { id: data.series.id, code: data.series.code, title: data.series.title, unit: data.series.unit, frequency, source: data.series.source },
    vintage: data.vintage.number,
    asOf: data.vintage.asOf,
    transform: body.transform,
    unitOfCycle: cycleUnit(body.transform, data.series.unit),
    periods: aligned.periods,
    items: answers.map((a, k) => ({
      method: a.method,
      params: a.params,
      // A method listed twice (HP at two λ) is named with its parameters, in legends and downloads alike.
      name: answers.filter((b) => b.method === a.method).length > 1 ? methodLine(a.method, a.params, undefined, a.diagnostics) : methodName(a.method),
      methodLine: methodLine(a.method, a.params, undefined, a.diagnostics),
      twoSided: findMethod(a.method)!.twoSided,
      cycle: aligned.values[k],
    })),
    median: toNull(range.median),
    min: toNull(range.min),
    max: toNull(range.max),
    count: Array.from(range.count),
    cautions: [...CAUTIONS, RANGE_CAUTION],
  };
}

/**
 * A range study's specification run on its stored series: a date pin reads the vintage in force
 * on that date, as for a single-method study.
 */
export async function runRangeSpec(db: Db, pool: AnalysisPool | undefined, spec: Omit<StudySpec, 'method' | 'params'> & { methods: MethodChoice[] }) {
  const vintage = spec.asOf ? (await vintageInForce(db, spec.seriesId, spec.asOf)).number : spec.vintage;
  return rangeOfEstimates(db, pool, { seriesId: spec.seriesId, vintage, transform: spec.transform, methods: spec.methods });
}
