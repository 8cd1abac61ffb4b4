/**
 * A file as a grid of text cells, every row kept (title and note rows included) with its
 * spreadsheet row number = index + 1: what history loads read (importers/history.ts), where the
 * header is not necessarily the first row. CSV through papaparse, XLSX through exceljs after the
 * zip check and the repair of dangling references (importers/workbook.ts). Merged cells hold their
 * value in the first cell only; a formula cell is read as its saved result; dates as YYYY-MM-DD.
 */
import Papa from 'papaparse';
import ExcelJS from 'exceljs';
import { badRequest, unprocessable } from '../lib/errors.js';
import { cellText, decodeText, detectFormat, MAX_ROWS } from './table.js';
import { openWorkbook } from './workbook.js';

export interface Grid {
  format: 'csv' | 'xlsx';
  /** The workbook's sheets in order (empty for CSV) and the one read. */
  sheets: string[];
  sheet: string | null;
  rows: string[][];
  /** Internal references to parts the workbook does not contain, dropped before reading. */
  droppedReferences: number;
}

/** Release tables are wide: one column per release. */
export const GRID_MAX_COLUMNS = 2000;

/**
 * Options: `sheet` names the sheet to read; without it, `preferSheet` (by name), else the first
 * sheet whose first column `looksLikeData` (its first 200 cells as text), else the first with cells.
 */
export async function readGrid(buf: Buffer, filename: string, options: { sheet?: string; format?: string; preferSheet?: string; looksLikeData?: (firstColumn: string[]) => boolean } = {}): Promise<Grid> {
  const format = detectFormat(buf, filename, options.format);
  if (format === 'xlsx') return readWorkbookGrid(buf, options.sheet, options.preferSheet, options.looksLikeData);
  const text = decodeText(buf);
  const parsed = Papa.parse<string[]>(text, { delimiter: '', delimitersToGuess: [',', ';', '\t'], skipEmptyLines: false });
  const bad = parsed.errors.find((e) => e.type === 'Quotes');
  if (bad) throw unprocessable('unreadable_file', `The file could not be read as CSV near row ${(bad.row ?? 0) + 1}: ${bad.message}. A quote is probably not closed.`, [{ row: (bad.row ?? 0) + 1, column: null, message: bad.message }]);
  const rows = parsed.data.map((r) => r.map((c) => String(c ?? '')));
  while (rows.length && rows[rows.length - 1].every((c) => !c.trim())) rows.pop();
  checkSize(rows.length, Math.max(0, ...rows.slice(0, 1000).map((r) => r.length)));
  return { format: 'csv', sheets: [], sheet: null, rows, droppedReferences: 0 };
}

function checkSize(rows: number, columns: number) {
  if (rows === 0) throw unprocessable('empty_file', 'The file has no rows.');
  if (rows > MAX_ROWS) throw unprocessable('too_many_rows', `The file has more than ${MAX_ROWS} rows; split it into several loads.`);
  if (columns > GRID_MAX_COLUMNS) throw unprocessable('too_many_columns', `The table has ${columns} columns; at most ${GRID_MAX_COLUMNS} are accepted.`);
}

async function readWorkbookGrid(buf: Buffer, sheet: string | undefined, preferSheet: string | undefined, looksLikeData?: (firstColumn: string[]) => boolean): Promise<Grid> {
  const { workbook, droppedReferences } = await openWorkbook(buf);
  const sheets = workbook.worksheets.map((w) => w.name);
  if (!sheets.length) throw unprocessable('empty_file', 'The workbook has no worksheet.');
  const named = (name: string) => workbook.worksheets.find((w) => w.name.trim().toLowerCase() === name.trim().toLowerCase());
  let ws: ExcelJS.Worksheet | undefined;
  if (sheet) {
    ws = named(sheet);
    if (!ws) throw badRequest('sheet_not_found', `The workbook has no sheet named "${sheet.slice(0, 60)}"; its sheets are ${sheets.map((s) => `"${s}"`).join(', ')}.`);
  } else {
    const firstColumn = (w: ExcelJS.Worksheet) => Array.from({ length: Math.min(w.rowCount, 200) }, (_, r) => cellText(w.getRow(r + 1).getCell(1).value));
    ws =
      (preferSheet && named(preferSheet)) ||
      (looksLikeData && workbook.worksheets.find((w) => w.actualRowCount > 0 && looksLikeData(firstColumn(w)))) ||
      workbook.worksheets.find((w) => w.actualRowCount > 0) ||
      workbook.worksheets[0];
  }
  checkSize(Math.max(1, ws.rowCount), ws.columnCount);
  const rows: string[][] = [];
  ws.eachRow({ includeEmpty: true }, (row, rowNumber) => {
    while (rows.length < rowNumber - 1) rows.push([]);
    const cells: string[] = [];
    const count = Math.min(row.cellCount, GRID_MAX_COLUMNS);
    for (let c = 1; c <= count; c++) {
      const cell = row.getCell(c);
      if (cell.type === ExcelJS.ValueType.Merge && cell.master !== cell) {
        cells.push('');
        continue;
      }
      const v = cell.value;
      cells.push(v && typeof v === 'object' && 'formula' in v ? cellText((v as ExcelJS.CellFormulaValue).result as ExcelJS.CellValue) : v && typeof v === 'object' && 'sharedFormula' in v ? cellText((v as ExcelJS.CellSharedFormulaValue).result as ExcelJS.CellValue) : cellText(v));
    }
    rows.push(cells);
  });
  while (rows.length && rows[rows.length - 1].every((c) => !c.trim())) rows.pop();
  if (!rows.length) throw unprocessable('empty_file', `The sheet "${ws.name}" is empty.`);
  return { format: 'xlsx', sheets, sheet: ws.name, rows, droppedReferences };
}

/** A spreadsheet column's letters (1 → A, 27 → AA). */
export function columnLetter(n: number): string {
  let s = '';
  for (let k = n; k > 0; k = Math.floor((k - 1) / 26)) s = String.fromCharCode(65 + ((k - 1) % 26)) + s;
  return s;
}
