/**
 * Files in: CSV (papaparse), SDMX-CSV (papaparse, with its own column rules) and XLSX (exceljs,
 * after the zip check). Each becomes a table of text cells with spreadsheet row numbers (the
 * header is row 1), which importers/observations.ts then checks against a series.
 */
import ExcelJS from 'exceljs';
import Papa from 'papaparse';
import { unprocessable } from '../lib/errors.js';
import { openWorkbook } from './workbook.js';

export type FileFormat = 'csv' | 'sdmx-csv' | 'xlsx';

export interface Table {
  format: FileFormat;
  header: string[];
  /** Calls `visit` with the cells of every row after the header and its spreadsheet row number. */
  eachRow(visit: (cells: string[], row: number) => void): void;
}

export const MAX_ROWS = 2_500_000;
export const MAX_COLUMNS = 200;
export const MAX_CELL = 2000;

export function detectFormat(buf: Buffer, filename = '', declared?: string): FileFormat {
  if (declared === 'csv' || declared === 'sdmx-csv' || declared === 'xlsx') return declared;
  if (buf.length >= 4 && buf.readUInt32LE(0) === 0x04034b50) return 'xlsx';
  if (/\.xlsx$/i.test(filename)) return 'xlsx';
  const head = buf.subarray(0, 4096).toString('utf8').replace(/^\uFEFF/, '');
  const firstLine = head.split(/\r?\n/, 1)[0].toUpperCase();
  if (/(^|[,;\t])"?TIME_PERIOD"?([,;\t]|$)/.test(firstLine) && /(^|[,;\t])"?OBS_VALUE"?([,;\t]|$)/.test(firstLine)) return 'sdmx-csv';
  return 'csv';
}

/** Decodes a text upload: UTF-8 with or without a BOM; anything else is refused with a reason. */
export function decodeText(buf: Buffer): string {
  if (buf.length === 0) throw unprocessable('empty_file', 'The file is empty.');
  if ((buf[0] === 0xff && buf[1] === 0xfe) || (buf[0] === 0xfe && buf[1] === 0xff)) {
    throw unprocessable('wrong_encoding', 'The file is in UTF-16; save it as "CSV UTF-8" and upload it again.');
  }
  const sample = buf.subarray(0, Math.min(buf.length, 65_536));
  if (sample.includes(0)) throw unprocessable('binary_file', 'The file holds binary data, not text; upload a CSV, an SDMX-CSV or an XLSX workbook.');
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(buf);
  } catch {
    throw unprocessable('wrong_encoding', 'The file is not valid UTF-8 (perhaps Latin-1 or Windows-1252); save it as "CSV UTF-8" and upload it again.');
  }
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  const firstBreak = text.search(/\r?\n/);
  if ((firstBreak < 0 && text.length > 100_000) || firstBreak > 100_000) {
    throw unprocessable('line_too_long', 'The first line of the file is longer than 100 000 characters: this is not a table of observations.');
  }
  return text;
}

export function parseDelimited(buf: Buffer, format: 'csv' | 'sdmx-csv'): Table {
  const text = decodeText(buf);
  const headerLine = Papa.parse<string[]>(text.slice(0, Math.min(text.length, 200_000)), { preview: 1, delimiter: '', delimitersToGuess: [',', ';', '\t'] });
  const delimiter = headerLine.meta.delimiter || ',';
  const header = (headerLine.data[0] ?? []).map((h) => String(h).trim());
  if (!header.length || header.every((h) => !h)) throw unprocessable('empty_file', 'The file has no rows.');
  if (header.length > MAX_COLUMNS) throw unprocessable('too_many_columns', `The file has ${header.length} columns; at most ${MAX_COLUMNS} are accepted.`);
  return {
    format,
    header,
    // Rows are parsed as they are visited (papaparse's step mode): the file is never held as a
    // table of cells, which keeps large loads well inside their memory budget.
    eachRow(visit) {
      let row = 0;
      let quoteError: Papa.ParseError | undefined;
      Papa.parse<string[]>(text, {
        delimiter,
        skipEmptyLines: 'greedy',
        step: (result, parser) => {
          row++;
          const bad = result.errors.find((e) => e.type === 'Quotes');
          if (bad) {
            quoteError = { ...bad, row };
            parser.abort();
            return;
          }
          if (row === 1) return; // the header
          if (row - 1 > MAX_ROWS) {
            parser.abort();
            quoteError = { type: 'Delimiter', code: 'UndetectableDelimiter', message: 'too many rows', row };
            return;
          }
          visit(result.data, row);
        },
      });
      if (quoteError?.message === 'too many rows') throw unprocessable('too_many_rows', `The file has more than ${MAX_ROWS} rows; split it into several loads.`);
      if (quoteError) {
        throw unprocessable('unreadable_file', `The file could not be read as CSV near row ${quoteError.row}: ${quoteError.message}. A quote is probably not closed.`, [
          { row: quoteError.row ?? null, column: null, message: quoteError.message },
        ]);
      }
    },
  };
}

export async function parseXlsx(buf: Buffer): Promise<Table> {
  const { workbook: wb } = await openWorkbook(buf);
  const ws = wb.worksheets[0];
  if (!ws) throw unprocessable('empty_file', 'The workbook has no worksheet.');
  const rows: string[][] = [];
  let header: string[] = [];
  const formulas: { row: number; column: string }[] = [];
  ws.eachRow({ includeEmpty: true }, (row, rowNumber) => {
    const cells: string[] = [];
    const count = Math.min(row.cellCount, MAX_COLUMNS);
    for (let c = 1; c <= count; c++) {
      const v = row.getCell(c).value;
      if (v && typeof v === 'object' && ('formula' in v || 'sharedFormula' in v)) {
        formulas.push({ row: rowNumber, column: header[c - 1] || `column ${c}` });
        cells.push('');
        continue;
      }
      cells.push(cellText(v));
    }
    if (rowNumber === 1) header = cells.map((s) => s.trim());
    else {
      while (rows.length < rowNumber - 2) rows.push([]);
      rows.push(cells);
    }
  });
  if (formulas.length) {
    throw unprocessable(
      'formula_in_cells',
      `The workbook has ${formulas.length} cell${formulas.length === 1 ? '' : 's'} with a formula; Tidegauge loads values only. Paste the cells as values and upload again.`,
      formulas.slice(0, 50).map((f) => ({ row: f.row, column: f.column, message: 'the cell holds a formula' })),
    );
  }
  if (header.length === 0) throw unprocessable('empty_file', 'The first worksheet is empty.');
  return { format: 'xlsx', header, eachRow: (visit) => rows.forEach((cells, i) => visit(cells, i + 2)) };
}

/** A cell's value as text: dates as YYYY-MM-DD, rich text joined, errors as their code. */
export function cellText(v: ExcelJS.CellValue): string {
  if (v === null || v === undefined) return '';
  if (v instanceof Date) return v.toISOString().slice(0, 10);
  if (typeof v === 'number') return String(v);
  if (typeof v === 'string') return v;
  if (typeof v === 'boolean') return v ? 'TRUE' : 'FALSE';
  if (typeof v === 'object' && 'richText' in v) return v.richText.map((r) => r.text).join('');
  if (typeof v === 'object' && 'text' in v) return String((v as { text: unknown }).text);
  if (typeof v === 'object' && 'error' in v) return String((v as { error: unknown }).error);
  return String(v);
}

export async function readTable(buf: Buffer, filename?: string, declared?: string): Promise<Table> {
  const format = detectFormat(buf, filename, declared);
  return format === 'xlsx' ? parseXlsx(buf) : parseDelimited(buf, format);
}
