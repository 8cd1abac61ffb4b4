/**
 * A release history read from a grid (importers/grid.ts): `wide` (periods down the first column,
 * one release per column, an optional row of release dates) or `long` (columns period, value and
 * vintage / as_of / release_date). Finds the header row, the release-date row and the layout when
 * they are not given, says how each header was read, and reports every problem by row and column.
 * Pure: nothing here knows the database (services/catalogue/history.ts compares and stores).
 */
import { formatPeriod } from '../analysis/periods.js';
import type { FileProblem } from '../schemas/catalogue.js';
import type { Frequency } from '../schemas/frequency.js';
import { columnLetter, type Grid } from './grid.js';
import { readValue } from './observations.js';
import { readPeriodCell, readReleaseLabel, type LabelReading } from './release-labels.js';

export type HistoryLayout = 'wide' | 'long';

export interface HistoryOptions {
  layout?: HistoryLayout;
  headerRow?: number;
  releaseDateRow?: number;
}

export interface HeaderReading {
  column: string;
  text: string;
  readAs: string;
  asOf: string | null;
}

export interface Release {
  /** Where the release is in the file: a column letter (wide) or the first row of its rows (long). */
  column: string;
  label: string;
  asOf: string;
  periods: string[];
  values: (number | null)[];
}

export interface HistoryRead {
  layout: HistoryLayout;
  headerRow: number;
  releaseDateRow: number | null;
  detected: { layout: boolean; headerRow: boolean; releaseDateRow: boolean };
  headers: HeaderReading[];
  releases: Release[];
  problems: FileProblem[];
}

const LONG_RELEASE = ['vintage', 'as_of', 'as of', 'asof', 'release_date', 'release date', 'releasedate'];
const lower = (s: string | undefined) => String(s ?? '').trim().toLowerCase();
const blank = (row: string[] | undefined) => !row || row.every((c) => !String(c ?? '').trim());

/** 1-based row of a long layout's header in the first 50 rows, or null. */
function longHeader(rows: string[][]): number | null {
  for (let r = 0; r < Math.min(rows.length, 50); r++) {
    const h = rows[r].map(lower);
    if (h.includes('period') && h.includes('value') && h.some((c) => LONG_RELEASE.includes(c))) return r + 1;
  }
  return null;
}

export function readHistory(grid: Grid, frequency: Frequency, options: HistoryOptions = {}): HistoryRead {
  const layout = options.layout ?? (longHeader(grid.rows) ? 'long' : 'wide');
  const out = layout === 'long' ? readLong(grid.rows, frequency, options.headerRow) : readWide(grid.rows, frequency, options);
  out.detected.layout = !options.layout;
  return out;
}

class Problems {
  list: FileProblem[] = [];
  add(row: number | null, column: string | null, message: string, severity: 'error' | 'warning' = 'error') {
    if (this.list.length < 1000) this.list.push({ row, column, message, severity });
  }
}

/** Values down one release, by period: duplicates and unreadable cells are problems. */
function collect(cells: { row: number; period: string; value: string }[], frequency: Frequency, column: string, problems: Problems, periodCache = new Map<string, ReturnType<typeof readPeriodCell>>()) {
  const byIndex = new Map<number, { row: number; period: string; value: number | null }>();
  for (const c of cells) {
    if (!c.value.trim()) continue;
    let p = periodCache.get(c.period);
    if (!p) periodCache.set(c.period, (p = readPeriodCell(c.period, frequency)));
    if ('error' in p) {
      problems.add(c.row, column, p.error);
      continue;
    }
    const v = readValue(c.value);
    if ('error' in v) {
      problems.add(c.row, column, v.error);
      continue;
    }
    const seen = byIndex.get(p.index);
    if (seen) {
      problems.add(c.row, column, `${p.period} appears again (first on row ${seen.row}).`);
      continue;
    }
    byIndex.set(p.index, { row: c.row, period: p.period, value: v.value });
  }
  const indices = [...byIndex.keys()].sort((a, b) => a - b);
  // From the first to the last period with a value: a period between them without one is missing (null).
  const periods: string[] = [];
  const values: (number | null)[] = [];
  for (let i = indices[0] ?? 0; indices.length && i <= indices[indices.length - 1]; i++) {
    periods.push(formatPeriod(i, frequency));
    values.push(byIndex.get(i)?.value ?? null);
  }
  return { periods, values };
}

function readWide(rows: string[][], frequency: Frequency, options: HistoryOptions): HistoryRead {
  const problems = new Problems();
  const periodOk = new Map<number, boolean>();
  const isPeriod = (r: number) => {
    let ok = periodOk.get(r);
    if (ok === undefined) periodOk.set(r, (ok = !('error' in readPeriodCell(rows[r]?.[0] ?? '', frequency))));
    return ok;
  };
  // The first data row: a period in column A, followed by another (or the end of the table).
  let firstData = -1;
  const start = options.headerRow ? options.headerRow : 0;
  for (let r = start; r < rows.length; r++) {
    if (isPeriod(r) && (r + 1 >= rows.length || isPeriod(r + 1) || blank(rows[r + 1]))) {
      firstData = r;
      break;
    }
  }
  let headerRow = options.headerRow ?? 0;
  if (!options.headerRow) {
    for (let r = firstData - 1; r >= 0; r--) if (!blank(rows[r])) {
      headerRow = r + 1;
      break;
    }
  }
  const empty: HistoryRead = { layout: 'wide', headerRow, releaseDateRow: null, detected: { layout: true, headerRow: !options.headerRow, releaseDateRow: !options.releaseDateRow }, headers: [], releases: [], problems: problems.list };
  if (headerRow < 1 || headerRow > rows.length) {
    problems.add(null, 'A', firstData < 0 ? `No period found in column A; the first column holds the periods (for example ${frequency === 'Q' ? '2000-Q1' : frequency === 'M' ? '2000-01' : '2000'}).` : `No header row above the first period (row ${firstData + 1}); give headerRow.`);
    return empty;
  }
  const header = rows[headerRow - 1];
  const width = Math.max(header.length, ...rows.slice(headerRow).map((r) => r.length));
  const columns = Array.from({ length: Math.max(0, width - 1) }, (_, k) => k + 1).filter((c) => String(header[c] ?? '').trim() || rows.slice(headerRow).some((r) => String(r[c] ?? '').trim()));
  // The release-date row: given, or the nearest row above the first period whose cells are dates.
  let releaseDateRow: number | null = options.releaseDateRow ?? null;
  if (!options.releaseDateRow) {
    const limit = firstData < 0 ? headerRow - 1 : firstData;
    const candidates = [...Array(limit).keys()].filter((r) => r !== headerRow - 1 && !blank(rows[r])).sort((a, b) => Math.abs(a - (headerRow - 1)) - Math.abs(b - (headerRow - 1)));
    releaseDateRow = (candidates.find((r) => {
      const cells = columns.map((c) => String(rows[r][c] ?? '').trim()).filter(Boolean);
      return cells.length >= Math.max(1, columns.length / 2) && cells.every((t) => readReleaseLabel(t).kind === 'date');
    }) ?? -1) + 1 || null;
  }
  const headers: HeaderReading[] = [];
  const releases: Release[] = [];
  const periodCache = new Map<string, ReturnType<typeof readPeriodCell>>();
  const dataRows = [...Array(rows.length).keys()].filter((r) => r >= headerRow && r + 1 !== releaseDateRow);
  for (const c of columns) {
    const letter = columnLetter(c + 1);
    const text = String(header[c] ?? '').trim();
    let reading: LabelReading = readReleaseLabel(text);
    let readAs = reading.kind === 'none' ? reading.error : reading.readAs;
    if (releaseDateRow) {
      const dated = readReleaseLabel(String(rows[releaseDateRow - 1]?.[c] ?? ''));
      if (dated.kind === 'date') {
        reading = dated;
        readAs = `released ${dated.asOf} (row ${releaseDateRow})`;
      } else if (reading.kind !== 'none') {
        problems.add(releaseDateRow, letter, `No release date for “${text}”; dated by its header: ${reading.readAs}.`, 'warning');
      }
    }
    headers.push({ column: letter, text, readAs, asOf: reading.kind === 'none' ? null : reading.asOf });
    if (reading.kind === 'none') {
      problems.add(headerRow, letter, text ? `The header ${reading.error} Give a release-date row or write the header as a date.` : 'This column has values but no header; write the release date or period above them.');
      continue;
    }
    const cells: { row: number; period: string; value: string }[] = [];
    for (const r of dataRows) {
      const value = String(rows[r][c] ?? '');
      if (!value.trim()) continue;
      if (!isPeriod(r) && !String(rows[r][0] ?? '').trim()) {
        problems.add(r + 1, letter, 'A value on a row without a period in column A.');
        continue;
      }
      cells.push({ row: r + 1, period: String(rows[r][0] ?? ''), value });
    }
    releases.push({ column: letter, label: text || reading.asOf, asOf: reading.asOf, ...collect(cells, frequency, letter, problems, periodCache) });
  }
  return { layout: 'wide', headerRow, releaseDateRow, detected: empty.detected, headers, releases, problems: problems.list };
}

function readLong(rows: string[][], frequency: Frequency, given?: number): HistoryRead {
  const problems = new Problems();
  const headerRow = given ?? longHeader(rows) ?? 0;
  const h = (rows[headerRow - 1] ?? []).map(lower);
  const p = h.indexOf('period');
  const v = h.indexOf('value');
  const k = h.findIndex((c) => LONG_RELEASE.includes(c));
  const base: HistoryRead = { layout: 'long', headerRow, releaseDateRow: null, detected: { layout: true, headerRow: !given, releaseDateRow: false }, headers: [], releases: [], problems: problems.list };
  if (p < 0 || v < 0 || k < 0) {
    problems.add(headerRow || 1, null, 'A long history needs the columns period, value and one of vintage, as_of or release_date.');
    return base;
  }
  const groups = new Map<string, { row: number; cells: { row: number; period: string; value: string }[] }>();
  for (let r = headerRow; r < rows.length; r++) {
    if (blank(rows[r])) continue;
    const label = String(rows[r][k] ?? '').trim();
    if (!label) {
      problems.add(r + 1, rows[headerRow - 1][k], 'The release (vintage) is empty.');
      continue;
    }
    let g = groups.get(label);
    if (!g) groups.set(label, (g = { row: r + 1, cells: [] }));
    g.cells.push({ row: r + 1, period: String(rows[r][p] ?? ''), value: String(rows[r][v] ?? '') });
  }
  const column = rows[headerRow - 1][k];
  const periodCache = new Map<string, ReturnType<typeof readPeriodCell>>();
  for (const [label, g] of groups) {
    const reading = readReleaseLabel(label);
    base.headers.push({ column: `row ${g.row}`, text: label, readAs: reading.kind === 'none' ? reading.error : reading.readAs, asOf: reading.kind === 'none' ? null : reading.asOf });
    if (reading.kind === 'none') {
      problems.add(g.row, column, `The release ${reading.error}`);
      continue;
    }
    base.releases.push({ column: `row ${g.row}`, label, asOf: reading.asOf, ...collect(g.cells, frequency, rows[headerRow - 1][v], problems, periodCache) });
  }
  return base;
}
