/**
 * Snapshots: what an exhibit freezes when it is submitted (data, vintage numbers and checksums,
 * method, parameters, software version), and a draft's live content computed the same way. From
 * submission on, an exhibit renders from its latest snapshot, whatever happens to the series.
 */
import type { Db } from '../../db.js';
import { conflict, HttpError } from '../../lib/errors.js';
import { sha256 } from '../../lib/secrets.js';
import { version } from '../../lib/version.js';
import type { PublicUser } from '../../schemas/people.js';
import { CAUTION_LINE, RANGE_CAUTION, REVISION_BAND_CAUTION } from '../../schemas/cautions.js';
import { studyRevisionBand } from '../studies/revision-band.js';
import type { RangeResult } from '../../schemas/analyses.js';
import type { Snapshot } from '../../schemas/exhibits.js';
import type { StudyResult } from '../../schemas/studies.js';
import type { PanelData } from '../../schemas/boards.js';
import { sourceLine } from '../../schemas/charts/figure.js';
import { panelById, panelData } from '../boards.js';
import { chronologyStamp } from '../chronology.js';
import { getSettings } from '../settings.js';
import { computeSpec, rangeStudyResult } from '../studies/results.js';
import type { AnalysisPool } from '../../workers/pool.js';
import { getStudy } from '../studies/studies.js';
import type { Study } from '../../schemas/studies.js';
async function vintageChecksum(db: Db, seriesId: number, number: number) {
  return (await db('vintages').where({ series_id: seriesId, number }).first('checksum'))?.checksum ?? '';
}

/** The exhibit's content computed from the current data (a draft's live view, or the next snapshot). */
export async function buildSnapshot(db: Db, user: PublicUser, row: Record<string, any>, frozen: boolean, pool?: AnalysisPool): Promise<Snapshot> {
  const settings = await getSettings(db);
  const common = {
    // What the printed figure carries beyond the data, frozen with it (issue 14).
    chronology: await chronologyStamp(db, row.chronology_id),
    publication: { number: row.number_label ?? null, institution: settings.institutionName, sourceLine: sourceLine(settings.sourceLineWording, row.source_line) },
    schema: 1 as const,
    text: { title: row.title, subtitle: row.subtitle, units: row.units, sourceLine: row.source_line, notes: row.notes },
    caution: CAUTION_LINE,
    software: { name: 'Tidegauge', version },
    frozenAt: frozen ? new Date().toISOString() : null,
  };
  // One study's decomposition: the series, its trend and its cycle.
  const single = (kind: Snapshot['kind'], r: StudyResult, studies: Snapshot['studies'], series: Snapshot['series']): Snapshot => ({
    ...common,
    kind,
    chartKind: row.chart_kind === 'trend' ? 'trend' : 'cycle',
    series,
    lines: (['input', 'trend', 'cycle'] as const).map((role) => ({ label: role, role, periods: r.periods, values: r[role] })),
    studies,
    turningPoints: r.turningPoints.map((t) => ({ period: t.period, type: t.type })),
    transform: r.transform,
    endOfSamplePeriods: r.endOfSamplePeriods,
    methodLine: r.methodLine,
    vintageStamp: r.vintageStamp,
  });
  // A range study: each method's cycle as a line named by the method, the band and the median, both cautions.
  const ranged = async (kind: Snapshot['kind'], s: Study, r: RangeResult): Promise<Snapshot> => ({
    ...common,
    caution: `${CAUTION_LINE} ${RANGE_CAUTION}`,
    kind,
    chartKind: 'range',
    series: [{ id: r.series.id, code: r.series.code, title: r.series.title, unit: r.series.unit, source: r.series.source }],
    lines: r.items.map((it) => ({ label: it.name, role: 'cycle' as const, periods: r.periods, values: it.cycle })),
    range: { periods: r.periods, median: r.median, min: r.min, max: r.max },
    studies: [{ id: s.id, title: s.title, method: 'range', params: { methods: r.items.map((it) => ({ method: it.method, params: it.params })) }, transform: r.transform, vintage: r.vintage, asOf: r.asOf, vintageChecksum: await vintageChecksum(db, r.series.id, r.vintage), methodLine: r.items.map((it) => it.methodLine).join(' · ') }],
    transform: r.transform,
    endOfSamplePeriods: 0,
    methodLine: `range across ${r.items.length} methods: ${r.items.map((it) => it.methodLine).join(' · ')}`,
    vintageStamp: `data as of ${r.asOf}, vintage ${r.vintage}`,
  });
  if (row.study_id) {
    const s = await getStudy(db, row.study_id);
    if (s.kind === 'range') return ranged('study', s, await rangeStudyResult(db, pool, row.vintage_pin ? { ...s, vintage: row.vintage_pin, asOf: null } : s));
    // An update of an exhibit whose study pins an older vintage draws on the newer one it was prepared for.
    const r = await computeSpec(db, row.vintage_pin ? { ...s, vintage: row.vintage_pin, asOf: null } : s, { pool });
    const studies = [{ id: s.id, title: s.title, method: r.method, params: r.params, transform: r.transform, vintage: r.vintage, asOf: r.asOf, vintageChecksum: await vintageChecksum(db, r.series.id, r.vintage), methodLine: r.methodLine }];
    const snap = single('study', r, studies, [{ id: r.series.id, code: r.series.code, title: r.series.title, unit: r.series.unit, source: r.series.source }]);
    // The exhibit option: the band of past revisions around the end of this estimate, with its note.
    if (row.revision_band && snap.chartKind === 'cycle') return { ...snap, revisionBand: await studyRevisionBand(db, pool, s, r.vintage), caution: `${CAUTION_LINE} ${REVISION_BAND_CAUTION}` };
    return snap;
  }
  if (!row.panel_id) throw conflict('exhibit_source_gone', 'The study or panel this exhibit was drafted from no longer exists.');
  const panel = await panelById(db, user, row.panel_id).catch((e) => {
    if (e instanceof HttpError && e.status === 404) throw conflict('exhibit_source_gone', 'The panel this exhibit was drafted from no longer exists.');
    throw e;
  });
  const data: PanelData = await panelData(db, panel, pool);
  if (data.range) return ranged('panel', data.studies[0], data.range);
  const studies: Snapshot['studies'] = [];
  for (const l of data.lines) {
    const s = data.studies.find((x) => x.id === l.studyId)!;
    studies.push({ id: s.id, title: s.title, method: s.method, params: s.params, transform: s.transform, vintage: l.vintage, asOf: '', vintageChecksum: await vintageChecksum(db, s.seriesId, l.vintage), methodLine: l.methodLine });
  }
  if (data.kind === 'study' && data.result) {
    studies[0].asOf = data.result.asOf;
    return single('panel', data.result, studies, data.series);
  }
  return {
    ...common,
    kind: 'panel',
    chartKind: 'compare',
    series: data.series,
    lines: data.lines.map((l) => ({ label: l.label, role: 'cycle' as const, periods: l.periods, values: l.values })),
    studies,
    endOfSamplePeriods: data.endOfSamplePeriods,
    methodLine: data.methodLines.join(' · '),
    vintageStamp: data.vintageStamps.join(' · '),
  };
}

export const snapshotChecksum = (s: Snapshot) => sha256(JSON.stringify(s));
