/**
 * From a table of cells to the observations of one or more series, with every problem found by
 * row and column. Errors stop a load; warnings are shown in the preview and do not.
 */
import type { Frequency } from '../analysis/frequency.js';
import { formatPeriod, periodIndex, readPeriod } from '../analysis/periods.js';
import { unprocessable, type FileProblem } from '../lib/errors.js';
import { MAX_CELL, type Table } from './table.js';

export interface SeriesRows {
  /** The SDMX series key (dimension values joined by "."), or null for a plain two-column file. */
  key: string | null;
  /** A code named in the file (a SERIES_CODE column), used before the key to match the Catalogue. */
  code: string | null;
  rows: { row: number; period: string; value: string; freq?: string; unit?: string }[];
  periodColumn: string;
  valueColumn: string;
}

const STRUCTURE_COLUMNS = new Set(['STRUCTURE', 'STRUCTURE_ID', 'STRUCTURE_NAME', 'DATAFLOW', 'ACTION', 'KEY']);
export const MAX_KEY_DIMENSIONS = 20;
export const MAX_KEY_LENGTH = 200;

const find = (header: string[], names: string[]) => header.findIndex((h) => names.includes(h.trim().toLowerCase()));

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
  const rows: SeriesRows['rows'] = [];
  const codes = new Set<string>();
  table.rows.forEach((cells, i) => {
    if (cells.every((x) => !String(x ?? '').trim())) return;
    rows.push({ row: i + 2, period: cells[p] ?? '', value: cells[v] ?? '', freq: f >= 0 ? cells[f] : undefined, unit: u >= 0 ? cells[u] : undefined });
    if (c >= 0 && cells[c]) codes.add(String(cells[c]).trim());
  });
  return [{ key: null, code: codes.size === 1 ? [...codes][0] : null, rows, periodColumn: header[p], valueColumn: header[v] }];
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
  const rows = table.rows;
  for (let i = 0; i < rows.length; i++) {
    const cells = rows[i];
    if (cells.length === 1 && !cells[0]) continue;
    let key = '';
    for (let d = 0; d < dims.length; d++) key += (d ? '.' : '') + (cells[dims[d]] ?? '').trim();
    if (key.length > MAX_KEY_LENGTH) {
      throw unprocessable('key_too_long', `Row ${i + 2}: the series key is ${key.length} characters long; at most ${MAX_KEY_LENGTH} are accepted.`, [{ row: i + 2, column: null, message: 'series key too long' }]);
    }
    const code = c >= 0 ? (cells[c] ?? '').trim() : '';
    const gk = code || key;
    let g = groups.get(gk);
    if (!g) {
      g = { key, code: code || null, rows: [], periodColumn: 'TIME_PERIOD', valueColumn: 'OBS_VALUE' };
      groups.set(gk, g);
    }
    g.rows.push({ row: i + 2, period: cells[t] ?? '', value: cells[v] ?? '', freq: f >= 0 ? cells[f] : undefined, unit: u >= 0 ? cells[u] : undefined });
  }
  return [...groups.values()];
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** A cell as a number: null when empty, or an error message saying what is wrong with it. */
export function readValue(raw: string): { value: number | null } | { error: string } {
  const text = String(raw ?? '').trim();
  if (text === '') return { value: null };
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
  let freqMismatch = 0;
  let unitMismatch = 0;
  const push = (p: FileProblem) => {
    if (problems.length < 1000) problems.push(p);
  };
  let errors = 0;
  for (const r of series.rows) {
    if (r.period.length > MAX_CELL || r.value.length > MAX_CELL) {
      push({ row: r.row, column: null, message: 'A cell is far too long to be a period or a value.', severity: 'error' });
      errors++;
      continue;
    }
    if (r.freq !== undefined && r.freq.trim() && r.freq.trim().toUpperCase() !== expect.frequency) {
      if (freqMismatch++ < 20) push({ row: r.row, column: 'FREQ', message: `The frequency is ${r.freq.trim().slice(0, 5)}, but the series is ${expect.frequency}.`, severity: 'error' });
      errors++;
    }
    if (expect.unit && r.unit !== undefined && r.unit.trim() && r.unit.trim().toLowerCase() !== expect.unit.trim().toLowerCase()) {
      if (unitMismatch++ < 5) push({ row: r.row, column: 'unit', message: `The unit is "${r.unit.trim().slice(0, 40)}", but the series is in "${expect.unit}".`, severity: 'warning' });
    }
    const p = readPeriod(r.period, expect.frequency);
    if ('error' in p) {
      push({ row: r.row, column: series.periodColumn, message: p.error, severity: 'error' });
      errors++;
      continue;
    }
    if (p.rewritten) rewritten++;
    const index = periodIndex(p.period, expect.frequency)!;
    const v = readValue(r.value);
    if ('error' in v) {
      push({ row: r.row, column: series.valueColumn, message: v.error, severity: 'error' });
      errors++;
      continue;
    }
    const first = seen.get(index);
    if (first !== undefined) {
      push({ row: r.row, column: series.periodColumn, message: `${p.period} appears again (first on row ${first}).`, severity: 'error' });
      errors++;
      continue;
    }
    seen.set(index, r.row);
    obs.push({ index, value: v.value });
  }
  if (series.rows.length === 0) {
    push({ row: null, column: null, message: 'The file has no observations.', severity: 'error' });
    errors++;
  }
  obs.sort((a, b) => a.index - b.index);
  for (let i = 1; i < obs.length; i++) {
    const gap = obs[i].index - obs[i - 1].index;
    if (gap > 1) {
      const from = formatPeriod(obs[i - 1].index + 1, expect.frequency);
      const to = formatPeriod(obs[i].index - 1, expect.frequency);
      push({ row: seen.get(obs[i].index) ?? null, column: series.periodColumn, message: gap === 2 ? `No row for ${from}: the sequence has a gap.` : `No rows from ${from} to ${to}: the sequence has a gap.`, severity: 'warning' });
    }
  }
  if (rewritten) push({ row: null, column: series.periodColumn, message: `${rewritten} period${rewritten === 1 ? ' was' : 's were'} written in another form and read as SDMX periods (for example 2024Q1 as 2024-Q1).`, severity: 'warning' });
  if (freqMismatch > 20) push({ row: null, column: 'FREQ', message: `…and ${freqMismatch - 20} more rows with another frequency.`, severity: 'error' });
  return { periods: obs.map((o) => formatPeriod(o.index, expect.frequency)), values: obs.map((o) => o.value), problems, errorCount: errors };
}
