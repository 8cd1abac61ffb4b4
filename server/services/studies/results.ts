/**
 * The result of a study's specification: the decomposition of the stored series with statistics,
 * turning points, the gain, the method line, the vintage stamp and the cautions; and comparisons
 * of several specifications on aligned periods.
 */
import { crossCorrelations, cycleStatistics, findMethod, gainCurve, methodLine, nullable, turningPoints } from '../../analysis/index.js';
import type { Db } from '../../db.js';
import { finiteOrNull, finiteRecord } from '../../lib/numbers.js';
import { alignByPeriod } from '../../schemas/align.js';
import { CAUTIONS } from '../../schemas/cautions.js';
import { PERIODS_PER_YEAR } from '../../schemas/frequency.js';
import type { CompareBody, CompareResult, StudyResult, StudySpec } from '../../schemas/studies.js';
import { runSpec } from './spec.js';
import { getStudy } from './studies.js';


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

export async function computeSpec(db: Db, spec: StudySpec): Promise<StudyResult> {
  const { data, result: r } = await runSpec(db, spec);
  const stats = cycleStatistics(r.cycle, r.frequency);
  const tps = turningPoints(r.cycle, r.frequency);
  const twoSided = findMethod(r.method)!.twoSided;
  return {
    method: r.method,
    params: r.params,
    transform: r.transform,
    frequency: r.frequency,
    periods: r.periods ?? data.periods,
    input: nullable(r.input),
    trend: nullable(r.trend),
    cycle: nullable(r.cycle),
    ...(Object.keys(r.series).length ? { extra: Object.fromEntries(Object.entries(r.series).map(([k, v]) => [k, nullable(v)])) } : {}),
    ...(r.extension ? { extension: r.extension } : {}),
    warnings: r.warnings,
    diagnostics: { ...r.diagnostics },
    vintage: data.vintage.number,
    asOf: data.vintage.asOf,
    vintagePin: spec.vintage,
    series: { id: data.series.id, code: data.series.code, title: data.series.title, unit: data.series.unit, frequency: data.series.frequency, source: data.series.source },
    statistics: finiteRecord(stats),
    turningPoints: tps.map((t) => ({ ...t, period: data.periods[t.index] })),
    gain: gainCurve({ method: r.method, params: r.params, n: data.values.length, diagnostics: r.diagnostics }),
    methodLine: methodLine(r.method, r.params, r.transform, r.diagnostics),
    vintageStamp: `data as of ${data.vintage.asOf}, vintage ${data.vintage.number}`,
    twoSided,
    endOfSamplePeriods: twoSided ? 2 * PERIODS_PER_YEAR[r.frequency] : 0,
    cautions: [...CAUTIONS],
    unitOfCycle: cycleUnit(r.transform, data.series.unit),
  };
}

export async function studyResult(db: Db, id: number) {
  const s = await getStudy(db, id);
  const result = await computeSpec(db, s);
  return { study: s, ...result };
}

// ------------------------------------------------------------------ comparisons

export async function compare(db: Db, body: CompareBody): Promise<CompareResult> {
  const results: (StudyResult & { label: string })[] = [];
  for (const item of body.items) {
    const r = await computeSpec(db, item);
    results.push({ label: item.label ?? `${r.series.code} · ${r.methodLine}`, ...r });
  }
  const { periods: all, values: cycles } = alignByPeriod(results.map((r) => ({ periods: r.periods, values: r.cycle })));
  const ref = Math.min(body.reference, results.length - 1);
  const toNaN = (a: (number | null)[]) => Float64Array.from(a, (v) => (v === null ? NaN : v));
  const refCycle = toNaN(cycles[ref]);
  const frequencies = new Set(results.map((r) => r.frequency));
  return {
    periods: all,
    reference: ref,
    mixedFrequencies: frequencies.size > 1,
    items: results.map((r, k) => {
      const c = toNaN(cycles[k]);
      const stats = cycleStatistics(c, r.frequency, k === ref ? undefined : refCycle);
      return {
        label: r.label,
        seriesId: r.series.id,
        code: r.series.code,
        method: r.method,
        params: r.params,
        transform: r.transform,
        vintage: r.vintage,
        methodLine: r.methodLine,
        vintageStamp: r.vintageStamp,
        unitOfCycle: r.unitOfCycle,
        cycle: cycles[k],
        statistics: finiteRecord(stats),
        crossCorrelations: frequencies.size > 1 ? [] : crossCorrelations(c, refCycle, body.maxLag).map((x) => ({ ...x, r: finiteOrNull(x.r) })),
      };
    }),
  };
}
