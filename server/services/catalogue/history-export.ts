/**
 * History out: a series' whole release table, periods down and one column per vintage across, a
 * title row on top and the release dates in the row above the header, so the file loads back
 * (POST /series/:series/history, detected without options) to identical vintages: an empty cell is
 * a period the vintage does not have, NA a period it has without a value. CSV rows go through
 * `csvLine`, XLSX text cells through `safeText` (importers/export.ts).
 */
import ExcelJS from 'exceljs';
import type { Db } from '../../db.js';
import { periodIndex } from '../../analysis/periods.js';
import { CSV_TYPE, XLSX_TYPE, csvLine, safeText, type ExportFile } from '../../importers/export.js';
import { MISSING_VALUE } from '../../importers/observations.js';
import { dateOnly } from './rows.js';
import { getSeries } from './series.js';

export async function historyExport(db: Db, seriesId: number, format: 'csv' | 'xlsx'): Promise<ExportFile> {
  const series = await getSeries(db, seriesId);
  const vintages = await db('vintages').where('series_id', seriesId).orderBy('number').select('id', 'number', 'as_of');
  const column = new Map<number, number>(vintages.map((v, k) => [v.id, k]));
  const rows = await db('observations as o').join('vintages as v', 'v.id', 'o.vintage_id').where('v.series_id', seriesId).select('o.vintage_id', 'o.period', 'o.value');
  const byPeriod = new Map<string, (number | string | null)[]>();
  for (const r of rows) {
    let line = byPeriod.get(r.period);
    if (!line) byPeriod.set(r.period, (line = new Array(vintages.length).fill(null)));
    line[column.get(r.vintage_id)!] = r.value === null ? MISSING_VALUE : Number(r.value);
  }
  const periods = [...byPeriod.keys()].sort((a, b) => periodIndex(a, series.frequency)! - periodIndex(b, series.frequency)!);
  const title = `${series.code}: ${series.title} (${series.unit}), every vintage: release dates in row 2, one column per vintage`;
  const dates = vintages.map((v) => dateOnly(v.as_of));
  const header = ['period', ...vintages.map((v) => `vintage ${v.number}`)];
  const name = `${series.code.replace(/[^A-Za-z0-9_.-]/g, '_')}-history`;
  if (format === 'csv') {
    const lines = [csvLine([title]), csvLine(['release date', ...dates]), csvLine(header)];
    // Numbers as numbers, NA and the period as text: each cell by its type.
    for (const p of periods) lines.push(csvLine([p, ...byPeriod.get(p)!]));
    return { filename: `${name}.csv`, contentType: CSV_TYPE, body: lines.join('\n') + '\n' };
  }
  const wb = new ExcelJS.Workbook();
  wb.creator = 'Tidegauge';
  const ws = wb.addWorksheet(series.code.slice(0, 31).replace(/[\\/?*[\]:]/g, '_'));
  ws.addRow([safeText(title)]).font = { bold: true };
  const dated = ws.addRow(['release date', ...dates.map((d) => new Date(`${d}T00:00:00Z`))]);
  for (let c = 2; c <= dates.length + 1; c++) dated.getCell(c).numFmt = 'yyyy-mm-dd';
  ws.addRow(header).font = { bold: true };
  for (const p of periods) ws.addRow([p, ...byPeriod.get(p)!]);
  ws.getColumn(1).width = 14;
  ws.views = [{ state: 'frozen', xSplit: 1, ySplit: 3 }];
  return { filename: `${name}.xlsx`, contentType: XLSX_TYPE, body: Buffer.from(await wb.xlsx.writeBuffer()) };
}
