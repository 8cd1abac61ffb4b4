/** The real-time revision analysis of a study, across the vintages of its series. */
import { methodLine, reliability } from '../../analysis/index.js';
import { revisionBand, revisionSpread } from '../../analysis/realtime.js';
import type { Db } from '../../db.js';
import { conflict, HttpError } from '../../lib/errors.js';
import type { Progress } from '../../lib/stream.js';
import type { BatchSummaryItem, DecomposeJson } from '../../schemas/decompose.js';
import { PERIOD_WORD, PERIODS_PER_YEAR } from '../../schemas/frequency.js';
import type { RealtimeResult } from '../../schemas/studies.js';
import type { BatchItem, FailedItem } from '../../workers/batch-types.js';
import type { AnalysisPool } from '../../workers/pool.js';
import { readStoredValues, type SeriesValues } from '../catalogue/stored-values.js';
import { listVintages } from '../catalogue/vintages.js';
import { runBatch } from '../decompose.js';
import { finiteOrNull, finiteRecord } from '../../lib/numbers.js';
import { cycleUnit } from './results.js';
import { getStudy, singleMethodOnly } from './studies.js';

/**
 * Applies the study's method to every vintage of its series and compares the real-time
 * estimates (each vintage's end point) with the final one (the latest vintage, full sample), as
 * Orphanides and van Norden (2002) do; and the quasi-real-time estimates (the latest data cut at
 * each period) to separate revisions of the data from revisions that come from the filter's end
 * point. total revision = (real-time − quasi-real-time) + (quasi-real-time − final).
 */
export async function realtimeAnalysis(db: Db, pool: AnalysisPool | undefined, id: number, onProgress?: Progress): Promise<RealtimeResult> {
  const s = singleMethodOnly(await getStudy(db, id), 'The real-time analysis');
  const vintages = (await listVintages(db, s.seriesId)).sort((a, b) => a.number - b.number);
  if (vintages.length < 2) throw conflict('too_few_vintages', 'The real-time analysis needs at least two vintages of the series.');
  // Every vintage in one read (a handful of queries, cached by vintage), not one read each.
  const found = await readStoredValues(db, vintages.map((v) => ({ seriesId: s.seriesId, vintage: v.number })));
  const datas: SeriesValues[] = vintages.map((v) => {
    const d = found.get(`${s.seriesId}@${v.number}`)!;
    if (d instanceof HttpError) throw d;
    return d;
  });
  const latest = datas[datas.length - 1];
  const freq = latest.series.frequency;
  const item = (d: (typeof datas)[number], values: (number | null)[], id: string): BatchItem => ({ id, frequency: freq, start: d.start ?? undefined, values, transform: s.transform, method: s.method, params: s.params });

  // (a, b) Every vintage's whole gap: the fan, and its end point.
  onProgress?.('vintages', 0, vintages.length);
  const fanStrings = await runBatch(datas.map((d, k) => item(d, d.values, String(vintages[k].number))), 'full', pool);
  onProgress?.('vintages', vintages.length, vintages.length);
  const fan = fanStrings.map((j) => JSON.parse(j) as DecomposeJson & FailedItem);
  const failed = fan.find((f) => f.error);
  if (failed) throw new HttpError(400, failed.error.code, `Vintage ${failed.id}: ${failed.error.message}`);
  const final = fan[fan.length - 1];
  const finalAt = new Map<string, number | null>(latest.periods.map((p, i) => [p, final.cycle[i]]));
  const realTime = fan.map((f, k) => {
    const periods = datas[k].periods;
    let last = f.cycle.length - 1;
    while (last >= 0 && f.cycle[last] === null) last--;
    return { vintage: vintages[k].number, asOf: vintages[k].asOf, period: last >= 0 ? periods[last] : null, value: last >= 0 ? (f.cycle[last] as number) : null, final: last >= 0 ? (finalAt.get(periods[last]) ?? null) : null };
  });

  // Quasi-real-time: the latest vintage truncated at each period from a minimum sample on.
  const n = latest.values.length;
  const ppy = PERIODS_PER_YEAR[freq];
  const minimum = Math.min(n - 1, Math.max(5 * ppy, 24));
  const cuts: BatchItem[] = [];
  for (let t = minimum; t <= n; t++) cuts.push(item(latest, latest.values.slice(0, t), String(t)));
  const quasi: { period: string; value: number | null; final: number | null }[] = [];
  const CHUNK = 100;
  for (let i = 0; i < cuts.length; i += CHUNK) {
    const part = await runBatch(cuts.slice(i, i + CHUNK), 'summary', pool);
    for (const j of part) {
      const r = JSON.parse(j) as BatchSummaryItem & Partial<FailedItem>;
      const t = Number(r.id);
      const period = latest.periods[t - 1];
      // The end point of the cut sample; null when the method has no value there (Baxter–King).
      const at = r.last && r.last.index === t - 1 ? r.last.cycle : null;
      quasi.push({ period, value: r.error ? null : at, final: finalAt.get(period) ?? null });
    }
    onProgress?.('quasi-real-time', Math.min(cuts.length, i + CHUNK), cuts.length);
  }

  const arr = (xs: (number | null)[]) => Float64Array.from(xs, (v) => (v === null ? NaN : v));
  const rel = (a: (number | null)[], b: (number | null)[]) => {
    return finiteRecord(reliability(arr(a), arr(b)));
  };
  const quasiAt = new Map(quasi.map((q) => [q.period, q.value]));
  // The band of past revisions by distance from the end (analysis/realtime.ts): earlier vintages against the final one.
  const nan = (xs: (number | null)[]) => Float64Array.from(xs, (v) => (v === null ? NaN : v));
  const finalLine = { periods: latest.periods, cycle: nan(final.cycle) };
  const spread = revisionSpread(fan.slice(0, -1).map((f, k) => ({ periods: datas[k].periods, cycle: nan(f.cycle) })), finalLine, 2 * ppy);
  const rtPoints = realTime.filter((p) => p.period !== null);
  return {
    study: { id: s.id, title: s.title, method: s.method, params: s.params, transform: s.transform },
    series: { id: s.seriesId, code: s.series.code, unit: s.series.unit, frequency: freq },
    unitOfCycle: cycleUnit(s.transform, s.series.unit),
    methodLine: methodLine(s.method, s.params, s.transform),
    finalVintage: vintages[vintages.length - 1].number,
    fan: fan.map((f, k) => ({ vintage: vintages[k].number, asOf: vintages[k].asOf, periods: datas[k].periods, cycle: f.cycle })),
    final: { vintage: vintages[vintages.length - 1].number, periods: latest.periods, cycle: final.cycle },
    realTime,
    quasiRealTime: quasi,
    statistics: {
      realTime: rel(rtPoints.map((p) => p.value), rtPoints.map((p) => p.final)),
      quasiRealTime: rel(quasi.map((q) => q.value), quasi.map((q) => q.final)),
      /** Real-time against quasi-real-time at the vintages' end points: the part due to data revisions. */
      dataRevisions: rel(rtPoints.map((p) => p.value), rtPoints.map((p) => quasiAt.get(p.period!) ?? null)),
    },
    note:
      rtPoints.length < 8
        ? `Only ${rtPoints.length} vintages give a real-time end point, so the real-time statistics rest on few periods; the quasi-real-time statistics use ${quasi.length}.`
        : null,
    word: PERIOD_WORD[freq][1],
    revisionBand: revisionBand(finalLine, spread).map((b) => ({ ...b, lower: finiteOrNull(b.lower), upper: finiteOrNull(b.upper) })),
  };
}
