/**
 * Files out: CSV, XLSX (exceljs) and SDMX-CSV. Every text cell of every export goes through one
 * guard, `safeText`: a cell that a spreadsheet would run as a formula (its first character, after
 * any spaces, is =, +, -, @, a tab, a carriage return, or the full-width ＝ ＋ － ＠) gets a leading
 * apostrophe, the common practice against formula injection (OWASP, "CSV Injection"). A
 * spreadsheet in a locale that splits on ";" (or a tab) reads a comma-separated line as one field
 * until the next ";", quotes or not: so a formula start right after a ";" or a tab inside a text
 * gets the apostrophe too ("pct;=1+1" → "pct;'=1+1"). In CSV, `csvField` / `csvLine` quote a text
 * field by RFC 4180 (in double quotes, quotes doubled) when it holds a comma, quote or line break,
 * a ";", a tab or edge spaces. Numbers are written bare. Other CSV writers (SDMX-CSV out, the
 * History table) write their rows with `csvLine`.
 */
import ExcelJS from 'exceljs';

const FORMULA_START = /^[\s\u00a0]*[=+\-@\t\r\uff1d\uff0b\uff0d\uff20]/;

/** A formula start right after a ";" or a tab inside a text: a cell of its own where a spreadsheet splits there. */
const FORMULA_INSIDE = /([;\t])(?=[\s\u00a0]*[=+\-@\uff1d\uff0b\uff0d\uff20])/g;

/** The formula guard for one text cell (CSV, XLSX, SDMX-CSV). */
export function safeText(value: string | null | undefined): string {
  const s = (value ?? '').replace(FORMULA_INSIDE, "$1'");
  return FORMULA_START.test(s) ? `'${s}` : s;
}

/** A CSV cell: a number (written bare; empty when missing or not finite) or text. */
export type CsvCell = string | number | null | undefined;

const NEEDS_QUOTES = /[",;\t\r\n]|^\s|\s$/;

/** One CSV field: numbers bare; text through the formula guard, quoted when a spreadsheet could split or trim it. */
export function csvField(value: CsvCell, kind: 'text' | 'number' = typeof value === 'number' ? 'number' : 'text'): string {
  if (value === null || value === undefined) return '';
  if (kind === 'number') return typeof value === 'number' && Number.isFinite(value) ? String(value) : '';
  const s = safeText(String(value));
  return NEEDS_QUOTES.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** One CSV line (without its newline); `kinds` says which cells are numbers (default: by their type). */
export function csvLine(cells: readonly CsvCell[], kinds?: readonly ('text' | 'number')[]): string {
  let line = '';
  for (let i = 0; i < cells.length; i++) line += (i ? ',' : '') + csvField(cells[i], kinds?.[i]);
  return line;
}

export interface ExportColumn {
  header: string;
  /** 'text' cells are made safe; 'number' cells are written as numbers (empty when missing). */
  kind: 'text' | 'number';
  /** Computed numbers: written to this many significant digits (stored values keep their shortest round-trip form). */
  digits?: number;
}

export interface ExportTable {
  columns: ExportColumn[];
  rows: (string | number | null)[][];
  /** Lines of context (title, source, vintage stamp, method, caution) for the XLSX "About" sheet. */
  about?: [string, string][];
  sheetName?: string;
  /**
   * CSV only: write `about` as commented lines ("# Title: …") above the header, which spreadsheet
   * programs show as text and pandas skips with comment='#'. Off for files that load back as vintages.
   */
  csvAbout?: boolean;
}

function cell(col: ExportColumn, v: string | number | null) {
  if (v === null || v === undefined) return '';
  if (col.kind === 'number') return typeof v === 'number' && Number.isFinite(v) ? (col.digits ? Number(v.toPrecision(col.digits)) : v) : '';
  return safeText(String(v));
}

/** A value that already starts with its label ("Caution: …", "Sources: …") is not labelled again. */
const unlabelled = (k: string, v: string) => (new RegExp(`^${k.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}s?:\\s*`, 'i').test(v) ? v.replace(/^[^:]*:\s*/, '') : v);

/** A commented line: no line breaks, and no "#" after the first (pandas cuts a line at its comment character). */
const comment = (k: string, v: string) => `# ${k}: ${unlabelled(k, v)}`.replace(/[\r\n]+/g, ' ').replace(/(?!^)#/g, '№');

export function toCsv(table: ExportTable): string {
  const kinds = table.columns.map((c) => c.kind);
  const head = table.csvAbout && table.about?.length ? table.about.map(([k, v]) => comment(k, safeText(v))).join('\n') + '\n' : '';
  const lines = [csvLine(table.columns.map((c) => c.header))];
  for (const r of table.rows) lines.push(csvLine(r.map((v, i) => (table.columns[i].kind === 'number' ? cell(table.columns[i], v) : v)), kinds));
  return head + lines.join('\n') + '\n';
}

export async function toXlsx(table: ExportTable): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  wb.creator = 'Tidegauge';
  wb.created = new Date();
  const ws = wb.addWorksheet(table.sheetName ?? 'Observations');
  ws.addRow(table.columns.map((c) => safeText(c.header))).font = { bold: true };
  for (const r of table.rows) ws.addRow(r.map((v, i) => (cell(table.columns[i], v) === '' ? null : cell(table.columns[i], v))));
  // Numbers keep the General format: a cell shows the value as stored, not padded or cut to six decimals.
  table.columns.forEach((c, i) => {
    ws.getColumn(i + 1).width = c.kind === 'number' ? 18 : 14;
  });
  ws.views = [{ state: 'frozen', ySplit: 1 }];
  if (table.about?.length) {
    const about = wb.addWorksheet('About');
    for (const [k, v] of table.about) about.addRow([safeText(k), safeText(unlabelled(k, v))]);
    about.getColumn(1).width = 18;
    about.getColumn(2).width = 100;
  }
  return Buffer.from(await wb.xlsx.writeBuffer());
}

export type ExportFormat = 'csv' | 'xlsx';

/** A file ready to send: its name, content type and bytes (lib/http.ts sendFile sends it). */
export interface ExportFile {
  filename: string;
  contentType: string;
  body: Buffer | string;
}

export const CSV_TYPE = 'text/csv; charset=utf-8';
export const XLSX_TYPE = 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet';

/** A table as a CSV or XLSX file named `name` (without the extension; unsafe characters become "_"). */
export async function buildExport(table: ExportTable, name: string, format: ExportFormat, extension: string = format): Promise<ExportFile> {
  const safe = name.replace(/[^A-Za-z0-9_.-]/g, '_');
  if (format === 'xlsx') return { filename: `${safe}.${extension}`, contentType: XLSX_TYPE, body: await toXlsx(table) };
  return { filename: `${safe}.${extension}`, contentType: CSV_TYPE, body: toCsv(table) };
}
