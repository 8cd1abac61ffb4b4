/**
 * Revisions between vintages: period by period between two vintages (with danfojs summaries), and
 * the revision triangle (periods down, vintages across).
 */
import { revisionOf } from '../../schemas/numbers.js';
import * as dfd from 'danfojs';
import type { Db } from '../../db.js';
import { alignByPeriod, type PeriodLine } from '../../schemas/align.js';
import type { RevisionRow, RevisionStatus, RevisionSummary } from '../../schemas/catalogue.js';
import { getSeries } from './series.js';
import { listVintages, observationsOf, resolveVintage } from './vintages.js';

/** Period-by-period revisions from vintage `a` to vintage `b`. */
export function compareVintages(a: PeriodLine, b: PeriodLine): { rows: RevisionRow[]; summary: RevisionSummary } {
  const al = alignByPeriod([a, b]);
  const [A, B] = al.values;
  const [inA, inB] = al.present;
  const rows: RevisionRow[] = al.periods.map((period, i) => {
    const from = A[i];
    const to = B[i];
    let status: RevisionStatus;
    if (!inA[i]) status = 'new';
    else if (!inB[i]) status = 'removed';
    else status = from === to ? 'unchanged' : 'revised';
    const revision = status === 'revised' && from !== null && to !== null ? revisionOf(from, to) : null;
    return { period, from: inA[i] ? from : null, to: inB[i] ? to : null, revision, percent: revision !== null && from ? (100 * revision) / Math.abs(from) : null, status };
  });
  const revs = rows.filter((r) => r.revision !== null).map((r) => r.revision!);
  let summary: RevisionSummary = { revised: 0, new: 0, removed: 0, unchanged: 0, meanRevision: null, meanAbsoluteRevision: null, maxAbsoluteRevision: null };
  for (const r of rows) summary[r.status]++;
  if (revs.length) {
    const s = new dfd.Series(revs);
    const abs = s.abs();
    summary = { ...summary, meanRevision: Number(s.mean()), meanAbsoluteRevision: Number(abs.mean()), maxAbsoluteRevision: Number(abs.max()) };
  }
  return { rows, summary };
}

/**
 * The summary of compareVintages(a, b) alone, in one pass over two period-sorted lines of one
 * frequency (canonical periods sort as text): what a history load reports for each of its hundreds
 * of releases, where the per-period rows are not needed.
 */
export function revisionSummaryOf(a: PeriodLine, b: PeriodLine): RevisionSummary {
  const s: RevisionSummary = { revised: 0, new: 0, removed: 0, unchanged: 0, meanRevision: null, meanAbsoluteRevision: null, maxAbsoluteRevision: null };
  let sum = 0;
  let sumAbs = 0;
  let maxAbs = 0;
  let n = 0;
  let i = 0;
  let j = 0;
  while (i < a.periods.length || j < b.periods.length) {
    const pa = a.periods[i];
    const pb = b.periods[j];
    if (pb === undefined || (pa !== undefined && pa < pb)) {
      s.removed++;
      i++;
    } else if (pa === undefined || pb < pa) {
      s.new++;
      j++;
    } else {
      const from = a.values[i++];
      const to = b.values[j++];
      if (from === to) s.unchanged++;
      else {
        s.revised++;
        if (from !== null && to !== null) {
          const r = revisionOf(from, to);
          sum += r;
          sumAbs += Math.abs(r);
          maxAbs = Math.max(maxAbs, Math.abs(r));
          n++;
        }
      }
    }
  }
  if (n) Object.assign(s, { meanRevision: sum / n, meanAbsoluteRevision: sumAbs / n, maxAbsoluteRevision: maxAbs });
  return s;
}

export async function revisions(db: Db, seriesId: number, from: number | 'latest', to: number | 'latest') {
  const series = await getSeries(db, seriesId);
  const a = await resolveVintage(db, seriesId, from);
  const b = await resolveVintage(db, seriesId, to);
  const [oa, ob] = await Promise.all([observationsOf(db, a.id), observationsOf(db, b.id)]);
  const { rows, summary } = compareVintages(oa, ob);
  return { series: { id: series.id, code: series.code, unit: series.unit, frequency: series.frequency }, from: a, to: b, items: rows, summary };
}

/** The revision triangle: periods down, vintages across (null where a vintage has no value). */
export async function revisionTriangle(db: Db, seriesId: number) {
  const series = await getSeries(db, seriesId);
  const vintages = (await listVintages(db, seriesId)).sort((x, y) => x.number - y.number);
  const ids = await db('vintages').where('series_id', seriesId).select('id', 'number');
  const idOf = new Map(ids.map((r) => [r.number, r.id]));
  const data = await Promise.all(vintages.map((v) => observationsOf(db, idOf.get(v.number)!)));
  const aligned = alignByPeriod(data);
  return {
    series: { id: series.id, code: series.code, unit: series.unit, frequency: series.frequency },
    vintages: vintages.map((v) => ({ number: v.number, asOf: v.asOf })),
    periods: aligned.periods,
    values: aligned.periods.map((_, i) => vintages.map((_v, k) => (aligned.present[k][i] ? aligned.values[k][i] : null))),
  };
}
