/** The real-time revision analysis of a study, across the vintages of its series. */
import { methodLine, reliability } from '../../analysis/index.js';
import type { Db } from '../../db.js';
import type { Progress } from '../../lib/stream.js';
import type { BatchSummaryItem } from '../../schemas/decompose.js';
import { PERIOD_WORD, PERIODS_PER_YEAR } from '../../schemas/frequency.js';
import type { RealtimeResult } from '../../schemas/studies.js';
import type { BatchItem, FailedItem } from '../../workers/batch-types.js';
import type { AnalysisPool } from '../../workers/pool.js';
import { runBatch } from '../decompose.js';
import { finiteRecord } from '../../lib/numbers.js';
import { cycleUnit } from './results.js';
import { getStudy, singleMethodOnly } from './studies.js';
import { bandFromFan, studyVintages, vintageFan } from './revision-band.js';

/**
 * Applies the study's method to every vintage of its series and compares the real-time
 * estimates (each vintage's end point) with the final one (the latest vintage, full sample), as
 * Orphanides and van Norden (2002) do; and the quasi-real-time estimates (the latest data cut at
 * each period) to separate revisions of the data from revisions that come from the filter's end
 * point. total revision = (real-time − quasi-real-time) + (quasi-real-time − final).
 */
export async function realtimeAnalysis(db: Db, pool: AnalysisPool | undefined, id: number, onProgress?: Progress): Promise<RealtimeResult> {
  const s = singleMethodOnly(await getStudy(db, id), 'The real-time analysis');
  const { vintages, datas, latest, freq, item } = await studyVintages(db, s, 'The real-time analysis');

  // (a, b) Every vintage's whole gap: the fan, and its end point.
  onProgress?.('vintages', 0, vintages.length);
  const fan = await vintageFan(datas, vintages, item, pool);
  onProgress?.('vintages', vintages.length, vintages.length);
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
    // The band of past revisions by distance from the end: earlier vintages against the final one.
    revisionBand: bandFromFan(fan, datas, latest, 2 * ppy),
  };
}
