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
import { FREQUENCY_LABELS, PERIOD_WORD, PERIODS_PER_YEAR, type Frequency } from '../../schemas/frequency.js';
import { badRequest } from '../../lib/errors.js';
import type { CompareBody, CompareResult, StudyResult, StudySpec } from '../../schemas/studies.js';
import { runSpec, type SpecOptions } from './spec.js';
import { getStudy, singleMethodOnly } from './studies.js';
import { runRangeSpec } from './range.js';
import type { AnalysisPool } from '../../workers/pool.js';
import type { RangeResult } from '../../schemas/analyses.js';
import type { Study } from '../../schemas/studies.js';


import { cycleUnit } from './spec.js';

export { cycleUnit };

/**
 * What the end of the sample means for this result: a two-sided filter's last two years will be
 * revised (shaded); a filter that gives no value near the ends (Baxter–King loses K periods at
 * each end) says how many periods it lost instead, and shades nothing it did not estimate.
 */
export function endOfSample(input: ArrayLike<number>, cycle: ArrayLike<number>, frequency: Frequency, twoSided: boolean) {
  const word = PERIOD_WORD[frequency][1];
  const lost = (from: number, step: number) => {
    let k = 0;
    for (let i = from; i >= 0 && i < cycle.length && Number.isFinite(input[i]) && !Number.isFinite(cycle[i]); i += step) k++;
    return k;
  };
  const trailing = lost(cycle.length - 1, -1);
  const leading = lost(0, 1);
  const years = 2;
  if (twoSided && trailing > 0) return { endOfSamplePeriods: 0, endNote: `no estimate for the first ${leading} and the last ${trailing} ${word}: the filter needs ${trailing} ${word} on each side` };
  if (twoSided) return { endOfSamplePeriods: years * PERIODS_PER_YEAR[frequency], endNote: `last ${years * PERIODS_PER_YEAR[frequency]} ${word} (${years} years): estimates will be revised` };
  return { endOfSamplePeriods: 0, endNote: null };
}

export async function computeSpec(db: Db, spec: StudySpec, opts: SpecOptions = {}): Promise<StudyResult> {
  const { data, result: r, aggregated } = await runSpec(db, spec, opts);
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
    vintagePin: spec.asOf ? data.vintage.number : spec.vintage,
    series: { id: data.series.id, code: data.series.code, title: data.series.title, unit: data.series.unit, frequency: data.series.frequency, source: data.series.source },
    statistics: finiteRecord(stats),
    turningPoints: tps.map((t) => ({ ...t, period: data.periods[t.index] })),
    gain: gainCurve({ method: r.method, params: r.params, n: data.values.length, diagnostics: r.diagnostics }),
    methodLine: methodLine(r.method, r.params, r.transform, r.diagnostics),
    vintageStamp: `data as of ${data.vintage.asOf}, vintage ${data.vintage.number}`,
    twoSided,
    ...endOfSample(r.input, r.cycle, r.frequency, twoSided),
    cautions: [...CAUTIONS],
    unitOfCycle: cycleUnit(r.transform, data.series.unit),
    ...(aggregated ? { aggregated: { ...aggregated, how: 'average' as const } } : {}),
  };
}

/** A single-method study's result (exports, scripts); a range study is refused with what to use instead. */
export async function studyResult(db: Db, id: number, pool?: AnalysisPool) {
  const s = singleMethodOnly(await getStudy(db, id), 'This');
  const result = await computeSpec(db, s, { pool });
  return { study: s, ...result };
}

/** A range study's result: the range of gap estimates across its methods, as POST /studies/range answers it. */
export async function rangeStudyResult(db: Db, pool: AnalysisPool | undefined, s: Study): Promise<RangeResult & { kind: 'range'; study: Study }> {
  const r = await runRangeSpec(db, pool, { ...s, methods: s.methods! });
  return { kind: 'range', study: s, ...r };
}

/** GET /studies/:id/result: the decomposition, or for a range study the range across its methods (told apart by `kind`). */
export async function studyAnswer(db: Db, pool: AnalysisPool | undefined, id: number) {
  const s = await getStudy(db, id);
  if (s.kind === 'range') return rangeStudyResult(db, pool, s);
  return { kind: 'single' as const, study: s, ...(await computeSpec(db, s, { pool })) };
}

// ------------------------------------------------------------------ comparisons

/**
 * Series of different frequencies are compared on a common frequency the person chooses (higher
 * frequencies averaged into it), or refused with a message that says so: one period axis, one
 * convention for λ, statistics on the same periods.
 */
async function commonFrequency(db: Db, body: CompareBody): Promise<Frequency | undefined> {
  const rows: { id: number; code: string; frequency: Frequency }[] = await db('series').whereIn('id', [...new Set(body.items.map((i) => i.seriesId))]).select('id', 'code', 'frequency');
  const kinds = [...new Set(rows.map((r) => r.frequency))];
  if (body.frequency) {
    const lower = rows.filter((r) => PERIODS_PER_YEAR[r.frequency] < PERIODS_PER_YEAR[body.frequency!]);
    if (lower.length) throw badRequest('frequency_too_high', `${lower.map((r) => r.code).join(', ')} ${lower.length > 1 ? 'are' : 'is'} ${FREQUENCY_LABELS[lower[0].frequency]}: compare on a ${FREQUENCY_LABELS[lower[0].frequency]} or lower frequency.`);
    return body.frequency;
  }
  if (kinds.length > 1) {
    const by = kinds.map((f) => `${FREQUENCY_LABELS[f]}: ${rows.filter((r) => r.frequency === f).map((r) => r.code).join(', ')}`).join('; ');
    throw badRequest('mixed_frequencies', `These series have different frequencies (${by}). Choose a common frequency to compare them on (higher frequencies are then averaged into it), or compare series of one frequency.`, { frequencies: Object.fromEntries(rows.map((r) => [r.code, r.frequency])) });
  }
  return undefined;
}

export async function compare(db: Db, body: CompareBody, pool?: AnalysisPool): Promise<CompareResult> {
  const frequency = await commonFrequency(db, body);
  // Computed side by side (on the worker threads when slow), listed in the order asked.
  const computed = await Promise.all(body.items.map((item) => computeSpec(db, item, { frequency, pool })));
  const results: (StudyResult & { label: string })[] = computed.map((r, k) => ({ label: body.items[k].label ?? `${r.series.code} · ${r.methodLine}`, ...r }));
  const { periods: all, values: cycles } = alignByPeriod(results.map((r) => ({ periods: r.periods, values: r.cycle })));
  const ref = Math.min(body.reference, results.length - 1);
  const toNaN = (a: (number | null)[]) => Float64Array.from(a, (v) => (v === null ? NaN : v));
  const refCycle = toNaN(cycles[ref]);
  const frequencies = new Set(results.map((r) => r.frequency));
  return {
    periods: all,
    reference: ref,
    mixedFrequencies: frequencies.size > 1,
    frequency: results[0]?.frequency ?? 'Q',
    aggregated: results.filter((r) => r.aggregated).map((r) => `${r.series.code}: ${FREQUENCY_LABELS[r.aggregated!.from]} values averaged into ${FREQUENCY_LABELS[r.aggregated!.to]} periods`),
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
        twoSided: r.twoSided,
        endOfSamplePeriods: r.endOfSamplePeriods,
        cycle: cycles[k],
        statistics: finiteRecord(stats),
        crossCorrelations: frequencies.size > 1 ? [] : crossCorrelations(c, refCycle, body.maxLag).map((x) => ({ ...x, r: finiteOrNull(x.r) })),
      };
    }),
  };
}
