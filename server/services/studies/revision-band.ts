/**
 * A study's method on every vintage of its series (the fan), and from it the band of past
 * revisions: how far earlier vintages' estimates were revised at each distance from the end of
 * their sample, placed around the latest estimate's last periods (analysis/realtime.ts). The band
 * is a record of past revisions — not a forecast and not a confidence interval.
 */
import { revisionBand, revisionSpread } from '../../analysis/realtime.js';
import type { Db } from '../../db.js';
import { conflict, HttpError } from '../../lib/errors.js';
import { finiteOrNull } from '../../lib/numbers.js';
import type { DecomposeJson } from '../../schemas/decompose.js';
import { PERIODS_PER_YEAR } from '../../schemas/frequency.js';
import type { Study } from '../../schemas/studies.js';
import type { BatchItem, FailedItem } from '../../workers/batch-types.js';
import type { AnalysisPool } from '../../workers/pool.js';
import { readStoredValues, type SeriesValues } from '../catalogue/stored-values.js';
import { listVintages } from '../catalogue/vintages.js';
import { runBatch } from '../decompose.js';

/** Every vintage of the study's series, read at once, and the batch item that decomposes values with the study's method. */
export async function studyVintages(db: Db, s: Study, what: string) {
  const vintages = (await listVintages(db, s.seriesId)).sort((a, b) => a.number - b.number);
  if (vintages.length < 2) throw conflict('too_few_vintages', `${what} needs at least two vintages of the series.`);
  // Every vintage in one read (a handful of queries, cached by vintage), not one read each.
  const found = await readStoredValues(db, vintages.map((v) => ({ seriesId: s.seriesId, vintage: v.number })));
  const datas: SeriesValues[] = vintages.map((v) => {
    const d = found.get(`${s.seriesId}@${v.number}`)!;
    if (d instanceof HttpError) throw d;
    return d;
  });
  const freq = datas[datas.length - 1].series.frequency;
  const item = (d: SeriesValues, values: (number | null)[], id: string): BatchItem => ({ id, frequency: freq, start: d.start ?? undefined, values, transform: s.transform, method: s.method, params: s.params });
  return { vintages, datas, latest: datas[datas.length - 1], freq, item };
}

/** The method on every vintage's whole sample (the worker threads when heavy); a failure names its vintage. */
export async function vintageFan(datas: SeriesValues[], vintages: { number: number }[], item: (d: SeriesValues, values: (number | null)[], id: string) => BatchItem, pool: AnalysisPool | undefined) {
  const fan = (await runBatch(datas.map((d, k) => item(d, d.values, String(vintages[k].number))), 'full', pool)).map((j) => JSON.parse(j) as DecomposeJson & FailedItem);
  const failed = fan.find((f) => f.error);
  if (failed) throw new HttpError(400, failed.error.code, `Vintage ${failed.id}: ${failed.error.message}`);
  return fan;
}

const nan = (xs: (number | null)[]) => Float64Array.from(xs, (v) => (v === null ? NaN : v));

/** The band of past revisions (two years deep) around the latest estimate, from the fan against its last member. */
export function bandFromFan(fan: DecomposeJson[], datas: SeriesValues[], latest: SeriesValues, depth: number) {
  const finalLine = { periods: latest.periods, cycle: nan(fan[fan.length - 1].cycle) };
  const spread = revisionSpread(fan.slice(0, -1).map((f, k) => ({ periods: datas[k].periods, cycle: nan(f.cycle) })), finalLine, depth);
  return revisionBand(finalLine, spread).map((b) => ({ ...b, lower: finiteOrNull(b.lower), upper: finiteOrNull(b.upper) }));
}

/**
 * A single-method study's band of past revisions (the exhibit option) around its estimate on
 * vintage `upTo`: the vintages up to that one, the last of them standing for the final estimate.
 */
export async function studyRevisionBand(db: Db, pool: AnalysisPool | undefined, s: Study, upTo: number) {
  const all = await studyVintages(db, s, 'The band of past revisions');
  const keep = all.vintages.map((v, k) => (v.number <= upTo ? k : -1)).filter((k) => k >= 0);
  if (keep.length < 2) throw conflict('too_few_vintages', `The band of past revisions needs at least two vintages up to vintage ${upTo}.`);
  const vintages = keep.map((k) => all.vintages[k]);
  const datas = keep.map((k) => all.datas[k]);
  const fan = await vintageFan(datas, vintages, all.item, pool);
  return bandFromFan(fan, datas, datas[datas.length - 1], 2 * PERIODS_PER_YEAR[all.freq]);
}
