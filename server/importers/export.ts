/**
 * Files out: CSV, XLSX (exceljs) and SDMX-CSV. Text cells that a spreadsheet would run as a
 * formula (starting with =, +, −, @, or a tab or carriage return) are prefixed with an apostrophe,
 * the common practice against formula injection (OWASP, "CSV Injection"). Numbers stay numbers.
 */
import ExcelJS from 'exceljs';
import Papa from 'papaparse';

export function safeText(value: string | null | undefined): string {
  const s = value ?? '';
  return /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
}

export interface ExportColumn {
  header: string;
  /** 'text' cells are made safe; 'number' cells are written as numbers (empty when missing). */
  kind: 'text' | 'number';
}

export interface ExportTable {
  columns: ExportColumn[];
  rows: (string | number | null)[][];
  /** Lines of context (title, source, vintage stamp, method, caution) for the XLSX "About" sheet. */
  about?: [string, string][];
  sheetName?: string;
}

function cell(kind: ExportColumn['kind'], v: string | number | null) {
  if (v === null || v === undefined) return '';
  if (kind === 'number') return typeof v === 'number' && Number.isFinite(v) ? v : '';
  return safeText(String(v));
}

export function toCsv(table: ExportTable): string {
  const data = [table.columns.map((c) => safeText(c.header)), ...table.rows.map((r) => r.map((v, i) => cell(table.columns[i].kind, v)))];
  return Papa.unparse(data, { newline: '\n' }) + '\n';
}

export async function toXlsx(table: ExportTable): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  wb.creator = 'Tidegauge';
  wb.created = new Date();
  const ws = wb.addWorksheet(table.sheetName ?? 'Observations');
  ws.addRow(table.columns.map((c) => safeText(c.header))).font = { bold: true };
  for (const r of table.rows) ws.addRow(r.map((v, i) => (cell(table.columns[i].kind, v) === '' ? null : cell(table.columns[i].kind, v))));
  table.columns.forEach((c, i) => {
    const col = ws.getColumn(i + 1);
    col.width = c.kind === 'number' ? 16 : 14;
    if (c.kind === 'number') col.numFmt = '0.000000';
  });
  ws.views = [{ state: 'frozen', ySplit: 1 }];
  if (table.about?.length) {
    const about = wb.addWorksheet('About');
    for (const [k, v] of table.about) about.addRow([safeText(k), safeText(v)]);
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
