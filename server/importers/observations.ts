/**
 * From a table of cells to the observations of one or more series, with every problem found by
 * row and column. Errors stop a load; warnings are shown in the preview and do not.
 */
import type { Frequency } from '../schemas/frequency.js';
import { formatPeriod, periodIndex, readPeriod } from '../analysis/periods.js';
import { unprocessable, type FileProblem } from '../lib/errors.js';
import { MAX_CELL, type Table } from './table.js';

export interface SeriesRows {
  /** The SDMX series key (dimension values joined by "."), or null for a plain two-column file. */
  key: string | null;
  /** A code named in the file (a SERIES_CODE column), used before the key to match the Catalogue. */
  code: string | null;
  /** Parallel arrays, one entry per data row (compact: large loads hold a million of them). */
  rowNumbers: number[];
  periods: string[];
  values: string[];
  /** Distinct FREQ and unit cells, with the first row that has each and how many rows do. */
  freqs: Map<string, { first: number; count: number }>;
  units: Map<string, { first: number; count: number }>;
  periodColumn: string;
  valueColumn: string;
}

const STRUCTURE_COLUMNS = new Set(['STRUCTURE', 'STRUCTURE_ID', 'STRUCTURE_NAME', 'DATAFLOW', 'ACTION', 'KEY']);
export const MAX_KEY_DIMENSIONS = 20;
export const MAX_KEY_LENGTH = 200;

const find = (header: string[], names: string[]) => header.findIndex((h) => names.includes(h.trim().toLowerCase()));

function newGroup(key: string | null, code: string | null, periodColumn: string, valueColumn: string): SeriesRows {
  return { key, code, rowNumbers: [], periods: [], values: [], freqs: new Map(), units: new Map(), periodColumn, valueColumn };
}

function tally(map: Map<string, { first: number; count: number }>, raw: string | undefined, row: number) {
  const v = (raw ?? '').trim();
  if (!v) return;
  const hit = map.get(v);
  if (hit) hit.count++;
  else if (map.size < 50) map.set(v, { first: row, count: 1 });
}

function push(g: SeriesRows, row: number, period: string | undefined, value: string | undefined) {
  g.rowNumbers.push(row);
  g.periods.push(period ?? '');
  g.values.push(value ?? '');
}

/** Splits a table into the rows of each series it carries. */
export function splitSeries(table: Table): SeriesRows[] {
  const header = table.header;
  if (table.format === 'sdmx-csv') return splitSdmx(table);
  const p = find(header, ['period', 'time_period', 'date', 'time']);
  const v = find(header, ['value', 'obs_value']);
  if (p < 0 || v < 0) {
    throw unprocessable(
      'missing_columns',
      `The first row must name the columns: "period" and "value" (found: ${header.slice(0, 6).map((h) => `"${h.slice(0, 30)}"`).join(', ') || 'nothing'}).`,
      [{ row: 1, column: null, message: 'expected a header row with the columns period and value' }],
    );
  }
  const f = find(header, ['frequency', 'freq']);
  const u = find(header, ['unit', 'unit_measure']);
  const c = find(header, ['series_code', 'code', 'series']);
  const g = newGroup(null, null, header[p], header[v]);
  const codes = new Set<string>();
  table.eachRow((cells, row) => {
    if (cells.every((x) => !String(x ?? '').trim())) return;
    push(g, row, cells[p], cells[v]);
    if (f >= 0) tally(g.freqs, cells[f], row);
    if (u >= 0) tally(g.units, cells[u], row);
    if (c >= 0 && cells[c] && codes.size < 2) codes.add(String(cells[c]).trim());
  });
  g.code = codes.size === 1 ? [...codes][0] : null;
  return [g];
}

function splitSdmx(table: Table): SeriesRows[] {
  const H = table.header.map((h) => h.trim().toUpperCase());
  const t = H.indexOf('TIME_PERIOD');
  const v = H.indexOf('OBS_VALUE');
  if (t < 0 || v < 0) throw unprocessable('missing_columns', 'An SDMX-CSV file needs the columns TIME_PERIOD and OBS_VALUE.');
  const dims: number[] = [];
  for (let i = 0; i < v; i++) {
    if (i === t || STRUCTURE_COLUMNS.has(H[i]) || H[i] === 'SERIES_CODE') continue;
    dims.push(i);
  }
  if (dims.length > MAX_KEY_DIMENSIONS) {
    throw unprocessable('key_too_deep', `The series key has ${dims.length} dimensions; at most ${MAX_KEY_DIMENSIONS} are accepted.`, [{ row: 1, column: null, message: 'too many dimension columns before OBS_VALUE' }]);
  }
  const f = H.indexOf('FREQ');
  const u = H.indexOf('UNIT_MEASURE') >= 0 ? H.indexOf('UNIT_MEASURE') : H.indexOf('UNIT');
  const c = H.indexOf('SERIES_CODE');
  const groups = new Map<string, SeriesRows>();
  let last: SeriesRows | undefined;
  let lastKey = '';
  table.eachRow((cells, row) => {
    if (cells.length === 1 && !cells[0]) return;
    let key = '';
    for (let d = 0; d < dims.length; d++) key += (d ? '.' : '') + (cells[dims[d]] ?? '').trim();
    if (key.length > MAX_KEY_LENGTH) {
      throw unprocessable('key_too_long', `Row ${row}: the series key is ${key.length} characters long; at most ${MAX_KEY_LENGTH} are accepted.`, [{ row, column: null, message: 'series key too long' }]);
    }
    const code = c >= 0 ? (cells[c] ?? '').trim() : '';
    const gk = code || key;
    let g = gk === lastKey ? last : groups.get(gk);
    if (!g) {
      if (groups.size >= 100_000) throw unprocessable('too_many_series', 'The file carries more than 100 000 series; split it.');
      g = newGroup(key, code || null, 'TIME_PERIOD', 'OBS_VALUE');
      groups.set(gk, g);
    }
    last = g;
    lastKey = gk;
    push(g, row, cells[t], cells[v]);
    if (f >= 0) tally(g.freqs, cells[f], row);
    if (u >= 0) tally(g.units, cells[u], row);
  });
  return [...groups.values()];
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** A cell written for a value that is missing, as R writes it (our history download writes it too). */
export const MISSING_VALUE = 'NA';

/** A cell as a number: null when empty or NA (missing), or an error message saying what is wrong with it. */
export function readValue(raw: string): { value: number | null } | { error: string } {
  const text = String(raw ?? '').trim();
  if (text === '' || text === MISSING_VALUE) return { value: null };
  if (text.length > 40) return { error: `"${text.slice(0, 20)}…" is not a number.` };
  if (NUMBER.test(text)) {
    const v = Number(text);
    if (!Number.isFinite(v)) return { error: `${text.slice(0, 20)} is too large to store as a number.` };
    return { value: v };
  }
  if (/^[+-]?(nan|inf|infinity)$/i.test(text)) return { error: `"${text}" is not a value; leave the cell empty where the value is missing.` };
  if (/^[+-]?\d{1,3}(,\d{3})+(\.\d+)?$/.test(text)) return { error: `"${text}" has thousands separators; write ${text.replace(/,/g, '')}.` };
  if (/^[+-]?\d+,\d+$/.test(text)) return { error: `"${text}" uses a comma as the decimal mark; write ${text.replace(',', '.')}.` };
  return { error: `"${text.slice(0, 20)}" is not a number.` };
}

export interface CheckedObservations {
  periods: string[];
  values: (number | null)[];
  problems: FileProblem[];
  errorCount: number;
}

/** Checks the rows of one series against its frequency (and unit), and sorts them by period. */
export function checkObservations(series: SeriesRows, expect: { frequency: Frequency; unit?: string }): CheckedObservations {
  const problems: FileProblem[] = [];
  const seen = new Map<number, number>();
  const obs: { index: number; value: number | null }[] = [];
  let rewritten = 0;
  let errors = 0;
  const add = (p: FileProblem) => {
    if (problems.length < 1000) problems.push(p);
  };
  for (const [freq, { first, count }] of series.freqs) {
    if (freq.toUpperCase() !== expect.frequency) {
      add({ row: first, column: 'FREQ', message: `The frequency is ${freq.slice(0, 5)}, but the series is ${expect.frequency}${count > 1 ? ` (on ${count} rows)` : ''}.`, severity: 'error' });
      errors += count;
    }
  }
  if (expect.unit) {
    for (const [unit, { first, count }] of series.units) {
      if (unit.toLowerCase() !== expect.unit.trim().toLowerCase()) {
        add({ row: first, column: 'unit', message: `The unit is "${unit.slice(0, 40)}", but the series is in "${expect.unit}"${count > 1 ? ` (on ${count} rows)` : ''}.`, severity: 'warning' });
      }
    }
  }
  const n = series.rowNumbers.length;
  for (let k = 0; k < n; k++) {
    const row = series.rowNumbers[k];
    const rawPeriod = series.periods[k];
    const rawValue = series.values[k];
    if (rawPeriod.length > MAX_CELL || rawValue.length > MAX_CELL) {
      add({ row, column: null, message: 'A cell is far too long to be a period or a value.', severity: 'error' });
      errors++;
      continue;
    }
    const p = readPeriod(rawPeriod, expect.frequency);
    if ('error' in p) {
      add({ row, column: series.periodColumn, message: p.error, severity: 'error' });
      errors++;
      continue;
    }
    if (p.rewritten) rewritten++;
    const index = periodIndex(p.period, expect.frequency)!;
    const v = readValue(rawValue);
    if ('error' in v) {
      add({ row, column: series.valueColumn, message: v.error, severity: 'error' });
      errors++;
      continue;
    }
    const first = seen.get(index);
    if (first !== undefined) {
      add({ row, column: series.periodColumn, message: `${p.period} appears again (first on row ${first}).`, severity: 'error' });
      errors++;
      continue;
    }
    seen.set(index, row);
    obs.push({ index, value: v.value });
  }
  if (n === 0) {
    add({ row: null, column: null, message: 'The file has no observations.', severity: 'error' });
    errors++;
  }
  obs.sort((a, b) => a.index - b.index);
  for (let i = 1; i < obs.length; i++) {
    const gap = obs[i].index - obs[i - 1].index;
    if (gap > 1) {
      const from = formatPeriod(obs[i - 1].index + 1, expect.frequency);
      const to = formatPeriod(obs[i].index - 1, expect.frequency);
      add({ row: seen.get(obs[i].index) ?? null, column: series.periodColumn, message: gap === 2 ? `No row for ${from}: the sequence has a gap.` : `No rows from ${from} to ${to}: the sequence has a gap.`, severity: 'warning' });
    }
  }
  if (rewritten) add({ row: null, column: series.periodColumn, message: `${rewritten} period${rewritten === 1 ? ' was' : 's were'} written in another form and read as SDMX periods (for example 2024Q1 as 2024-Q1).`, severity: 'warning' });
  return { periods: obs.map((o) => formatPeriod(o.index, expect.frequency)), values: obs.map((o) => o.value), problems, errorCount: errors };
}
