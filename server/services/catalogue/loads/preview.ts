/**
 * The preview of a load: a file read and checked against the Catalogue, series by series, with
 * what it would change (new, revised, removed values) and every problem by row and column.
 * Nothing is written here; loads/store.ts stores a checked load.
 */
import type { Db } from '../../../db.js';
import { unprocessable, type FileProblem } from '../../../lib/errors.js';
import type { Progress } from '../../../lib/stream.js';
import { checkObservations, splitSeries, type SeriesRows } from '../../../importers/observations.js';
import { readTable } from '../../../importers/table.js';
import type { LoadPreview, RevisionRow, RevisionSummary, Series, SeriesPreview } from '../../../schemas/catalogue.js';
import { compareVintages } from '../revisions.js';
import { toSeries } from '../rows.js';
import { getSeries } from '../series.js';
import { checksumOf } from '../vintages.js';

/** A series' part of a load, checked, with its sorted observations (kept out of large answers). */
export interface CheckedSeries extends Omit<SeriesPreview, 'observations'> {
  periods: string[];
  values: (number | null)[];
}

/** A whole load, checked: what loads/store.ts stores. */
export interface CheckedLoad extends Omit<LoadPreview, 'series'> {
  series: CheckedSeries[];
}

/** A group of rows and the Catalogue series it goes to (none: the preview says so, as an error). */
export interface AssignedGroup {
  group: SeriesRows;
  seriesId: number | undefined;
}

export interface UploadedFile {
  buffer: Buffer;
  filename: string;
  format?: string;
}

async function latestObservations(db: Db, seriesIds: number[]) {
  const out = new Map<number, { number: number; periods: string[]; values: (number | null)[]; checksum: string }>();
  for (let i = 0; i < seriesIds.length; i += 500) {
    const ids = seriesIds.slice(i, i + 500);
    const latest = await db('vintages as v')
      .whereIn('v.series_id', ids)
      .whereRaw('v.number = (SELECT MAX(v2.number) FROM vintages v2 WHERE v2.series_id = v.series_id)')
      .select('v.id', 'v.series_id', 'v.number', 'v.checksum');
    if (!latest.length) continue;
    const byVintage = new Map(latest.map((l) => [l.id, l]));
    const obs = await db('observations').whereIn('vintage_id', latest.map((l) => l.id)).orderBy(['vintage_id', 'period']).select('vintage_id', 'period', 'value');
    for (const l of latest) out.set(l.series_id, { number: l.number, periods: [], values: [], checksum: l.checksum });
    for (const o of obs) {
      const target = out.get(byVintage.get(o.vintage_id)!.series_id)!;
      target.periods.push(o.period);
      target.values.push(o.value === null ? null : Number(o.value));
    }
  }
  return out;
}

/** Finds the Catalogue series a group of rows belongs to: by code, SDMX key, or key with "_". */
function matcher(all: { id: number; code: string; sdmx_key: string | null }[]) {
  const byCode = new Map(all.map((s) => [s.code.toUpperCase(), s.id]));
  const byKey = new Map(all.filter((s) => s.sdmx_key).map((s) => [s.sdmx_key!.toUpperCase(), s.id]));
  return (g: SeriesRows): number | undefined => {
    if (g.code && byCode.has(g.code.toUpperCase())) return byCode.get(g.code.toUpperCase());
    if (g.key) {
      const k = g.key.toUpperCase();
      return byKey.get(k) ?? byCode.get(k) ?? byCode.get(k.replace(/\./g, '_'));
    }
    return undefined;
  };
}

/** Which Catalogue series each group of rows goes to; for a load into one series, that series'. */
async function assignGroups(db: Db, groups: SeriesRows[], isSdmx: boolean, targetSeriesId: number | undefined, problems: FileProblem[]) {
  if (targetSeriesId === undefined) {
    const match = matcher(await db('series').select('id', 'code', 'sdmx_key'));
    return groups.map((g) => ({ group: g, seriesId: match(g) }));
  }
  const target = await getSeries(db, targetSeriesId);
  if (groups.length === 1 && !isSdmx) return [{ group: groups[0], seriesId: target.id as number | undefined }];
  const match = matcher(await db('series').select('id', 'code', 'sdmx_key'));
  const mine = groups.filter((g) => match(g) === target.id);
  const chosen = mine.length ? mine : groups.length === 1 ? groups : [];
  if (!chosen.length) {
    throw unprocessable('series_not_in_file', `The file carries ${groups.length} series and none is ${target.code} (matched by SERIES_CODE, the series' SDMX key, or its code).`, groups.slice(0, 20).map((g) => ({ row: g.rowNumbers[0] ?? null, column: null, message: `series key ${g.code ?? g.key}` })));
  }
  const skipped = groups.length - chosen.length;
  if (skipped) problems.push({ row: null, column: null, message: `${skipped} other series in the file ${skipped === 1 ? 'was' : 'were'} skipped; load them from the Loads page.`, severity: 'warning' });
  return chosen.map((g) => ({ group: g, seriesId: target.id as number | undefined }));
}

/**
 * Reads and checks a file. For a load into one series (`targetSeriesId`), the file's rows are
 * that series' (an SDMX-CSV may carry others: those are skipped with a warning). Otherwise every
 * series in the file is matched to the Catalogue.
 */
export async function previewLoad(db: Db, file: UploadedFile, targetSeriesId?: number, onProgress?: Progress): Promise<CheckedLoad> {
  onProgress?.('reading', 0, 1);
  const table = await readTable(file.buffer, file.filename, file.format);
  const groups = splitSeries(table);
  onProgress?.('reading', 1, 1);
  const problems: FileProblem[] = [];
  const assigned = await assignGroups(db, groups, table.format === 'sdmx-csv', targetSeriesId, problems);

  return checkAssigned(db, { format: table.format, filename: file.filename, assigned, problems, onProgress });
}

/**
 * Checks groups of rows already assigned to Catalogue series, as every load is checked: the
 * observations against each series' frequency and unit, and against its latest vintage. A feed's
 * run calls this with the series its mapping names.
 */
export async function checkAssigned(
  db: Db,
  { format, filename, assigned, problems, onProgress }: { format: LoadPreview['format']; filename: string; assigned: AssignedGroup[]; problems: FileProblem[]; onProgress?: Progress },
): Promise<CheckedLoad> {
  const ids = [...new Set(assigned.map((a) => a.seriesId).filter((x): x is number => x !== undefined))];
  const meta = new Map<number, Series>();
  for (let i = 0; i < ids.length; i += 1000) {
    for (const r of await db('series').whereIn('id', ids.slice(i, i + 1000))) meta.set(r.id, toSeries(r));
  }
  const latest = await latestObservations(db, ids);
  const seen = new Set<number>();
  const previews: CheckedSeries[] = [];
  let k = 0;
  for (const { group, seriesId } of assigned) {
    k++;
    if (k % 100 === 0) onProgress?.('checking', k, assigned.length);
    const s = seriesId !== undefined ? meta.get(seriesId) : undefined;
    if (!s) {
      previews.push(emptyPreview(group, `No series in the Catalogue has the code or SDMX key ${group.code ?? group.key ?? '(none)'}; create it first.`));
      continue;
    }
    if (seen.has(s.id)) {
      previews.push(emptyPreview(group, `A second block of rows for ${s.code}; put all of a series' rows under one key.`));
      continue;
    }
    seen.add(s.id);
    previews.push(checkSeries(group, s, latest.get(s.id)));
  }
  onProgress?.('checking', assigned.length, assigned.length);
  const errors = previews.reduce((n, p) => n + p.errors, 0);
  const warnings = previews.reduce((n, p) => n + p.warnings, 0) + problems.length;
  return {
    format,
    filename,
    series: previews,
    problems,
    errors,
    warnings,
    observations: previews.reduce((n, p) => n + p.rowCount, 0),
    canStore: errors === 0 && previews.some((p) => !p.identicalToLatest),
  };
}

function checkSeries(group: SeriesRows, s: Series, prev: { number: number; periods: string[]; values: (number | null)[]; checksum: string } | undefined): CheckedSeries {
  const checked = checkObservations(group, { frequency: s.frequency, unit: s.unit });
  const checksum = checked.errorCount === 0 ? checksumOf(checked.periods, checked.values) : null;
  let changes: RevisionSummary | null = null;
  let changedPeriods: RevisionRow[] = [];
  if (checked.errorCount === 0 && prev) {
    const cmp = compareVintages(prev, checked);
    changes = cmp.summary;
    changedPeriods = cmp.rows.filter((r) => r.status !== 'unchanged').slice(0, 500);
  } else if (checked.errorCount === 0) {
    changes = { revised: 0, new: checked.periods.length, removed: 0, unchanged: 0, meanRevision: null, meanAbsoluteRevision: null, maxAbsoluteRevision: null };
  }
  const identical = !!prev && checksum === prev.checksum;
  const ps = [...checked.problems];
  if (identical) ps.push({ row: null, column: null, message: `The file matches vintage ${prev!.number} exactly: there is nothing new to store.`, severity: 'warning' });
  return {
    series: { id: s.id, code: s.code, title: s.title, frequency: s.frequency, unit: s.unit },
    key: group.code ?? group.key,
    rowCount: checked.periods.length,
    firstPeriod: checked.periods[0] ?? null,
    lastPeriod: checked.periods[checked.periods.length - 1] ?? null,
    missingValues: checked.values.filter((v) => v === null).length,
    checksum,
    latestVintage: prev?.number ?? null,
    identicalToLatest: identical,
    changes,
    changedPeriods,
    problems: ps,
    errors: checked.errorCount,
    warnings: ps.filter((p) => p.severity === 'warning').length,
    periods: checked.periods,
    values: checked.values,
  };
}

function emptyPreview(group: SeriesRows, message: string): CheckedSeries {
  const problems: FileProblem[] = [{ row: group.rowNumbers[0] ?? null, column: null, message, severity: 'error' }];
  return {
    series: null,
    key: group.code ?? group.key,
    rowCount: group.rowNumbers.length,
    firstPeriod: null,
    lastPeriod: null,
    missingValues: 0,
    checksum: null,
    latestVintage: null,
    identicalToLatest: false,
    changes: null,
    changedPeriods: [],
    problems,
    errors: problems.length,
    warnings: 0,
    periods: [],
    values: [],
  };
}

/** The JSON form of a preview; large loads leave out the observations. */
export function previewJson(p: CheckedLoad, { withObservations }: { withObservations: boolean }): LoadPreview {
  return {
    ...p,
    series: p.series.map(({ periods, values, ...rest }) => ({
      ...rest,
      ...(withObservations ? { observations: { periods, values } } : {}),
    })),
  };
}

export function allProblems(p: CheckedLoad): FileProblem[] {
  return [...p.problems, ...p.series.flatMap((s) => s.problems)];
}
