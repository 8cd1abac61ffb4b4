/**
 * Data-frame work on vintages with danfojs: aligning vintages by period, revisions between two
 * vintages, the revision triangle and their summaries.
 */
import * as dfd from 'danfojs';
import type { RevisionRow, RevisionStatus, RevisionSummary } from '../schemas/catalogue.js';

export type { RevisionRow, RevisionStatus, RevisionSummary };

export interface VintageData {
  label: string;
  periods: string[];
  values: (number | null)[];
}

export interface Aligned {
  periods: string[];
  /** columns[label][i]: the value at periods[i], null when missing or absent. */
  columns: Record<string, (number | null)[]>;
  /** present[label][i]: whether the vintage has a row for periods[i] (a stored null counts). */
  present: Record<string, boolean[]>;
}

const column = (df: dfd.DataFrame, name: string) => (df.column(name).values as unknown[]).map((v) => (v === undefined || v === null || (typeof v === 'number' && Number.isNaN(v)) ? null : v));

/** Outer-joins vintages on period, sorted by period (SDMX periods of one frequency sort as text). */
export function alignVintages(vintages: VintageData[]): Aligned {
  if (vintages.length === 0) return { periods: [], columns: {}, present: {} };
  let merged: dfd.DataFrame | null = null;
  vintages.forEach((v, k) => {
    const frame = new dfd.DataFrame({
      period: v.periods.length ? v.periods : [],
      [`v${k}`]: v.values.map((x) => (x === null ? NaN : x)),
      [`p${k}`]: v.periods.map(() => 1),
    }, { columns: ['period', `v${k}`, `p${k}`] });
    merged = merged ? dfd.merge({ left: merged, right: frame, on: ['period'], how: 'outer' }) : frame;
  });
  const df = (merged as unknown as dfd.DataFrame).sortValues('period') as dfd.DataFrame;
  if (df.shape[0] === 0) return { periods: [], columns: Object.fromEntries(vintages.map((v) => [v.label, []])), present: Object.fromEntries(vintages.map((v) => [v.label, []])) };
  const periods = column(df, 'period') as string[];
  const columns: Aligned['columns'] = {};
  const present: Aligned['present'] = {};
  vintages.forEach((v, k) => {
    columns[v.label] = column(df, `v${k}`) as (number | null)[];
    present[v.label] = column(df, `p${k}`).map((x) => x === 1);
  });
  return { periods, columns, present };
}

/** Period-by-period revisions from vintage `a` to vintage `b`. */
export function compareVintages(a: VintageData, b: VintageData): { rows: RevisionRow[]; summary: RevisionSummary } {
  const al = alignVintages([a, b]);
  const A = al.columns[a.label];
  const B = al.columns[b.label];
  const inA = al.present[a.label];
  const inB = al.present[b.label];
  const rows: RevisionRow[] = al.periods.map((period, i) => {
    const from = A[i];
    const to = B[i];
    let status: RevisionStatus;
    if (!inA[i]) status = 'new';
    else if (!inB[i]) status = 'removed';
    else status = from === to ? 'unchanged' : 'revised';
    const revision = status === 'revised' && from !== null && to !== null ? to - from : null;
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
