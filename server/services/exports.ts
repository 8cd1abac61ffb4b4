/** Downloads of stored vintages. */
import type { Db } from '../db.js';
import { toCsv, toXlsx, type ExportTable } from '../importers/export.js';
import { getSeries, observationsOf, resolveVintage } from './catalogue.js';

export type ExportFormat = 'csv' | 'xlsx' | 'sdmx-csv';

export async function exportVintage(db: Db, seriesId: number, which: number | 'latest', format: ExportFormat) {
  const series = await getSeries(db, seriesId);
  const v = await resolveVintage(db, seriesId, which);
  const obs = await observationsOf(db, v.id);
  const base = `${series.code}_v${v.number}`.replace(/[^A-Za-z0-9_.-]/g, '_');
  if (format === 'sdmx-csv') {
    // SDMX-CSV: structure columns, the dimensions (FREQ and our series code), TIME_PERIOD,
    // OBS_VALUE, then attributes.
    const table: ExportTable = {
      columns: [
        { header: 'STRUCTURE', kind: 'text' },
        { header: 'STRUCTURE_ID', kind: 'text' },
        { header: 'ACTION', kind: 'text' },
        { header: 'FREQ', kind: 'text' },
        { header: 'SERIES_CODE', kind: 'text' },
        { header: 'TIME_PERIOD', kind: 'text' },
        { header: 'OBS_VALUE', kind: 'number' },
        { header: 'UNIT_MEASURE', kind: 'text' },
        { header: 'VINTAGE', kind: 'number' },
        { header: 'AS_OF', kind: 'text' },
      ],
      rows: obs.periods.map((p, i) => ['dataflow', 'TIDEGAUGE:SERIES(1.0)', 'I', series.frequency, series.code, p, obs.values[i], series.unit, v.number, v.asOf]),
    };
    return { filename: `${base}.sdmx.csv`, contentType: 'text/csv; charset=utf-8', body: toCsv(table) };
  }
  const table: ExportTable = {
    columns: [
      { header: 'series_code', kind: 'text' },
      { header: 'period', kind: 'text' },
      { header: 'value', kind: 'number' },
      { header: 'unit', kind: 'text' },
      { header: 'vintage', kind: 'number' },
      { header: 'as_of', kind: 'text' },
    ],
    rows: obs.periods.map((p, i) => [series.code, p, obs.values[i], series.unit, v.number, v.asOf]),
    about: [
      ['Series', `${series.code}: ${series.title}`],
      ['Unit', series.unit],
      ['Frequency', series.frequency],
      ['Seasonal adjustment', series.seasonalAdjustment],
      ['Source', series.source],
      ['Vintage', `data as of ${v.asOf}, vintage ${v.number}`],
      ['Checksum (sha256)', v.checksum],
      ['Exported', new Date().toISOString()],
    ],
  };
  if (format === 'xlsx') return { filename: `${base}.xlsx`, contentType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', body: await toXlsx(table) };
  return { filename: `${base}.csv`, contentType: 'text/csv; charset=utf-8', body: toCsv(table) };
}
