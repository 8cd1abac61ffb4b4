/**
 * The one export builder: the downloads of a vintage, a study and an exhibit, each a table
 * (importers/export.ts writes it as CSV, XLSX or SDMX-CSV) stamped with vintage and method and,
 * for decompositions, the caution line. Routes send the file (lib/http.ts sendFile).
 */
import type { Db } from '../db.js';
import type { AnalysisPool } from '../workers/pool.js';
import { buildExport, type ExportFile, type ExportTable } from '../importers/export.js';
import { conflict } from '../lib/errors.js';
import { CAUTION_LINE, RANGE_CAUTION } from '../schemas/cautions.js';
import type { PublicUser } from '../schemas/people.js';
import { alignByPeriod } from '../schemas/align.js';
import { COMPUTED_DIGITS } from '../schemas/numbers.js';
import { getSeries } from './catalogue/series.js';
import { observationsOf, resolveVintage, vintageMetadata } from './catalogue/vintages.js';
import { getExhibit, publicExhibit, type ExhibitDeps } from './exhibits/read.js';
import { rangeStudyResult, studyResult } from './studies/results.js';
import { getStudy } from './studies/studies.js';

/** A vintage's observations, described by the metadata it was loaded under (not the series' metadata of today). */
export async function vintageExport(db: Db, seriesId: number, which: number | 'latest', format: 'csv' | 'xlsx' | 'sdmx-csv'): Promise<ExportFile> {
  await getSeries(db, seriesId);
  const v = await resolveVintage(db, seriesId, which);
  const series = await vintageMetadata(db, v.id);
  const obs = await observationsOf(db, v.id);
  const base = `${series.code}_v${v.number}`;
  if (format === 'sdmx-csv') {
    // SDMX-CSV: structure columns, the dimensions (FREQ and our series code), TIME_PERIOD,
    // OBS_VALUE, then attributes.
    const table: ExportTable = {
      columns: [
        ...['STRUCTURE', 'STRUCTURE_ID', 'ACTION', 'FREQ', 'SERIES_CODE', 'TIME_PERIOD'].map((header) => ({ header, kind: 'text' as const })),
        { header: 'OBS_VALUE', kind: 'number' },
        { header: 'UNIT_MEASURE', kind: 'text' },
        { header: 'VINTAGE', kind: 'number' },
        { header: 'AS_OF', kind: 'text' },
      ],
      rows: obs.periods.map((p, i) => ['dataflow', 'TIDEGAUGE:SERIES(1.0)', 'I', series.frequency, series.code, p, obs.values[i], series.unit, v.number, v.asOf]),
    };
    return buildExport(table, base, 'csv', 'sdmx.csv');
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
  return buildExport(table, base, format);
}

/**
 * Column headers that carry unit and transform: "input, index (100 × log)", "cycle, % of trend
 * (100 × log)". Computed numbers are written to COMPUTED_DIGITS significant digits.
 */
const HOW: Record<string, string> = { none: 'levels', log: 'log', log100: '100 × log' };
export function decompositionHeaders(transform: string, seriesUnit: string, cycleUnit: string) {
  const how = HOW[transform] ?? transform;
  return {
    input: `input, ${seriesUnit} (${how})`,
    trend: `trend, ${seriesUnit} (${how})`,
    cycle: `cycle, ${cycleUnit} (${how})`,
  };
}
const computed = (header: string) => ({ header, kind: 'number' as const, digits: COMPUTED_DIGITS });
const PRECISION_NOTE = `computed values to ${COMPUTED_DIGITS} significant digits; loaded values as stored`;

/** A study's numbers with the method line and the vintage stamp on every row; a range study's, each method's cycle and the range across them. */
export async function studyExport(db: Db, studyId: number, format: 'csv' | 'xlsx', pool?: AnalysisPool): Promise<ExportFile> {
  const study = await getStudy(db, studyId);
  if (study.kind === 'range') return rangeStudyExport(await rangeStudyResult(db, pool, study), format);
  const r = await studyResult(db, studyId, pool);
  const h = decompositionHeaders(r.transform, r.series.unit, r.unitOfCycle);
  const table: ExportTable = {
    csvAbout: true,
    columns: [
      { header: 'period', kind: 'text' },
      computed(h.input),
      computed(h.trend),
      computed(h.cycle),
      { header: 'method', kind: 'text' },
      { header: 'vintage', kind: 'text' },
    ],
    rows: r.periods.map((p, i) => [p, r.input[i], r.trend[i], r.cycle[i], r.methodLine, r.vintageStamp]),
    about: studyAbout(r, ['Method', r.methodLine], r.vintageStamp, CAUTION_LINE),
  };
  return buildExport(table, `study-${r.study.id}-${r.series.code}`, format);
}

/** The header block of a study's download: what, from which data, how, and the caution. */
function studyAbout(
  r: { study: { title: string }; series: { code: string; title: string; unit: string; source: string }; transform: string; unitOfCycle: string },
  method: [string, string],
  vintageStamp: string,
  caution: string,
): [string, string][] {
  return [
    ['Study', r.study.title],
    ['Series', `${r.series.code}: ${r.series.title}`],
    ['Unit', r.series.unit],
    ['Source', r.series.source],
    ['Transform', HOW[r.transform] ?? r.transform],
    ['Cycle unit', r.unitOfCycle],
    method,
    ['Vintage', vintageStamp],
    ['Numbers', PRECISION_NOTE],
    ['Caution', caution],
  ];
}

const RANGE_COLUMNS = { median: 'median across methods', min: 'lowest across methods', max: 'highest across methods' };

/** A range study's download: per period each method's cycle (named by the method), then the median, lowest and highest across them. */
function rangeStudyExport(r: Awaited<ReturnType<typeof rangeStudyResult>>, format: 'csv' | 'xlsx'): Promise<ExportFile> {
  const vintageStamp = `data as of ${r.asOf}, vintage ${r.vintage}`;
  const methodLine = `range across ${r.items.length} methods: ${r.items.map((it) => it.methodLine).join(' · ')}`;
  const cycles = [...r.items.map((it) => ({ label: it.name, values: it.cycle })), ...(['median', 'min', 'max'] as const).map((k) => ({ label: RANGE_COLUMNS[k], values: r[k] }))];
  const table: ExportTable = {
    csvAbout: true,
    columns: [{ header: 'period', kind: 'text' }, ...cycles.map((c) => computed(`cycle, ${c.label}, ${r.unitOfCycle}`)), { header: 'vintage', kind: 'text' }],
    rows: r.periods.map((p, i) => [p, ...cycles.map((c) => c.values[i]), vintageStamp]),
    about: studyAbout(r, ['Methods', methodLine], vintageStamp, `${CAUTION_LINE} ${RANGE_CAUTION}`),
  };
  return buildExport(table, `study-${r.study.id}-${r.series.code}-range`, format);
}

/** The data behind an exhibit (its snapshot, or a draft's live content); by id, or by public link. */
export async function exhibitExport(deps: ExhibitDeps, who: { user: PublicUser; id: number } | { slug: string }, format: 'csv' | 'xlsx'): Promise<ExportFile> {
  const ex = 'slug' in who ? await publicExhibit(deps, who.slug) : await getExhibit(deps, who.user, who.id);
  const snap = ex.snapshot ?? ('live' in ex ? ex.live : null);
  const name = 'slug' in ex ? `exhibit-${ex.slug}` : `exhibit-${ex.id}-r${ex.revision}`;
  if (!snap) throw conflict('no_content', 'This exhibit has no data to download yet.');
  // A range exhibit: each method's cycle, then the median, lowest and highest across the methods.
  const r = snap.range;
  const ranged = r ? [...snap.lines, ...(['median', 'min', 'max'] as const).map((k) => ({ label: RANGE_COLUMNS[k], role: 'cycle' as const, periods: r.periods, values: r[k] }))] : snap.lines;
  // The band of past revisions (the exhibit option): its lower and upper edge at the last periods.
  const band = snap.revisionBand ?? [];
  const lines = band.length ? [...ranged, ...(['lower', 'upper'] as const).map((k) => ({ label: `band of past revisions: ${k} edge`, role: 'cycle' as const, periods: band.map((b) => b.period), values: band.map((b) => b[k]) }))] : ranged;
  const named = snap.chartKind === 'compare' || snap.chartKind === 'range';
  const aligned = alignByPeriod(lines);
  const transform = snap.transform ?? snap.studies[0]?.transform ?? 'none';
  const h = decompositionHeaders(transform, snap.series[0]?.unit ?? '', snap.text.units ?? '');
  const table: ExportTable = {
    sheetName: 'Data',
    csvAbout: true,
    columns: [
      { header: 'period', kind: 'text' as const },
      ...lines.map((l) => computed(named || l.label.startsWith('band of past revisions') ? `${l.label}, ${snap.text.units ?? ''}`.replace(/, $/, '') : h[l.role])),
      { header: 'vintage', kind: 'text' as const },
      { header: 'method', kind: 'text' as const },
    ],
    rows: aligned.periods.map((p, i) => [p, ...aligned.values.map((v) => v[i]), snap.vintageStamp, snap.methodLine]),
    about: [
      ...(snap.publication?.number ? ([['Number', snap.publication.number]] as [string, string][]) : []),
      ['Exhibit', snap.text.title],
      ['Subtitle', snap.text.subtitle ?? ''],
      ['Units', snap.text.units ?? ''],
      ['Transform', HOW[transform] ?? transform],
      ['Source', snap.publication?.sourceLine ?? snap.text.sourceLine ?? ''],
      ['Vintage', snap.vintageStamp],
      ['Method', snap.methodLine],
      ...(snap.chronology ? ([['Chronology', `contractions shaded from the ${snap.chronology.name} (${snap.chronology.area})`]] as [string, string][]) : []),
      ['Numbers', PRECISION_NOTE],
      ['Status', `${ex.status}${snap.frozenAt ? `, frozen ${snap.frozenAt}` : ' (draft: live data)'}`],
      ['Software', `${snap.software.name} ${snap.software.version}`],
      ['Caution', snap.caution],
      ...(snap.publication?.institution ? ([['Institution', snap.publication.institution]] as [string, string][]) : []),
    ],
  };
  return buildExport(table, name, format);
}
