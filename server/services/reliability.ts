/**
 * The real-time reliability table of a series: each method applied to every vintage, its
 * real-time end points against the final estimate (the latest vintage), in the statistics of
 * Orphanides and van Norden (2002), and the spread of past revisions by distance from the end
 * (server/analysis/realtime.ts). One request; the decompositions run on the worker threads
 * (runBatch), with progress per method.
 */
import { methodLine, methodName } from '../analysis/index.js';
import { realtimeReliability, revisionBand, revisionSpread, type VintageCycle } from '../analysis/realtime.js';
import type { Db } from '../db.js';
import { conflict } from '../lib/errors.js';
import { finiteOrNull } from '../lib/numbers.js';
import type { Progress } from '../lib/stream.js';
import type { ReliabilityBody, ReliabilityResult } from '../schemas/analyses.js';
import { REVISION_BAND_CAUTION } from '../schemas/cautions.js';
import type { DecomposeJson } from '../schemas/decompose.js';
import { PERIODS_PER_YEAR } from '../schemas/frequency.js';
import type { FailedItem } from '../workers/batch-types.js';
import type { AnalysisPool } from '../workers/pool.js';
import { readSeriesValues, type SeriesValues } from './catalogue/stored-values.js';
import { listVintages } from './catalogue/vintages.js';
import { runBatch } from './decompose.js';
import { cycleUnit } from './studies/results.js';

const toNaN = (a: (number | null)[]) => Float64Array.from(a, (v) => (v === null ? NaN : v));

export async function reliabilityTable(db: Db, pool: AnalysisPool | undefined, seriesId: number, body: ReliabilityBody, onProgress?: Progress): Promise<ReliabilityResult> {
  const vintages = (await listVintages(db, seriesId)).sort((a, b) => a.number - b.number);
  if (vintages.length < 3) throw conflict('too_few_vintages', `The reliability table needs at least three vintages of the series; it has ${vintages.length}. Load more releases first.`);
  const datas: SeriesValues[] = [];
  for (const v of vintages) datas.push(await readSeriesValues(db, seriesId, v.number));
  const latest = datas[datas.length - 1];
  const frequency = latest.series.frequency;
  const depth = body.depth ?? 2 * PERIODS_PER_YEAR[frequency];
  const items: ReliabilityResult['items'] = [];
  onProgress?.('methods', 0, body.methods.length);
  for (const [k, m] of body.methods.entries()) {
    const batch = datas.map((d, i) => ({ id: String(i), frequency, start: d.start ?? undefined, values: d.values, transform: body.transform, method: m.method, params: m.params }));
    const answers = (await runBatch(batch, 'full', pool)).map((j) => JSON.parse(j) as DecomposeJson & FailedItem);
    const final = answers[answers.length - 1];
    if (final.error) {
      items.push({ method: m.method, params: m.params, name: methodName(m.method), methodLine: '', statistics: { correlation: null, noiseToSignal: null, signChangeShare: null, meanAbsoluteRevision: null, periods: 0 }, revisionSpread: [], revisionBand: [], error: final.error });
    } else {
      // Vintages the method cannot decompose (too short) give no real-time estimate; the final
      // vintage is the reference, not a real-time estimate of itself.
      const cycles: VintageCycle[] = answers.slice(0, -1).flatMap((a, i) => (a.error ? [] : [{ periods: a.periods ?? datas[i].periods, cycle: toNaN(a.cycle) }]));
      const finalCycle: VintageCycle = { periods: final.periods ?? latest.periods, cycle: toNaN(final.cycle) };
      const stats = realtimeReliability(cycles, finalCycle);
      const spread = revisionSpread(cycles, finalCycle, depth);
      items.push({
        method: m.method,
        params: final.params,
        name: methodName(m.method),
        methodLine: methodLine(m.method, final.params, undefined, final.diagnostics),
        statistics: { correlation: finiteOrNull(stats.correlation), noiseToSignal: finiteOrNull(stats.noiseToSignal), signChangeShare: finiteOrNull(stats.signChangeShare), meanAbsoluteRevision: finiteOrNull(stats.meanAbsoluteRevision), periods: stats.periods },
        revisionSpread: spread.map((s) => ({ distance: s.distance, count: s.count, sd: finiteOrNull(s.sd), p05: finiteOrNull(s.p05), p95: finiteOrNull(s.p95) })),
        revisionBand: revisionBand(finalCycle, spread).map((b) => ({ ...b, lower: finiteOrNull(b.lower), upper: finiteOrNull(b.upper) })),
      });
    }
    onProgress?.('methods', k + 1, body.methods.length);
  }
  const few = items.filter((i) => !i.error && i.statistics.periods < 8);
  return {
    series: { id: latest.series.id, code: latest.series.code, title: latest.series.title, unit: latest.series.unit, frequency },
    transform: body.transform,
    unitOfCycle: cycleUnit(body.transform, latest.series.unit),
    vintages: vintages.length,
    finalVintage: vintages[vintages.length - 1].number,
    items,
    notes: [
      'Real-time: each vintage’s last estimate, against the final estimate (the latest vintage) of the same period.',
      REVISION_BAND_CAUTION,
      ...(few.length ? [`${few.map((i) => i.name).join(', ')}: fewer than 8 real-time estimates, so the statistics rest on few periods.`] : []),
    ],
  };
}
