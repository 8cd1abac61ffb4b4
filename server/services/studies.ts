/**
 * Studies: saved decompositions of a Catalogue series (a vintage pin or "latest"), their results
 * with statistics, comparisons, and the real-time revision analysis across vintages.
 */
import {
  crossCorrelations,
  cycleStatistics,
  decompose,
  gainCurve,
  methodLine,
  reliability,
  turningPoints,
  TWO_SIDED,
  PERIODS_PER_YEAR,
  PERIOD_WORD,
  nullable,
} from '../analysis/index.js';
import type { Db } from '../db.js';
import { conflict, forbidden, HttpError, notFound } from '../lib/errors.js';
import type { PublicUser } from '../schemas/people.js';
import type { CompareBody, CompareResult, CreateStudyBody, RealtimeResult, Study, StudyResult, StudySpec } from '../schemas/studies.js';
export type { Study, StudyResult };
import type { AnalysisPool } from '../workers/pool.js';
import { audit } from './audit.js';
import { readSeriesValues, type SeriesValues } from './catalogue/stored-values.js';
import { listVintages } from './catalogue/vintages.js';
import { runBatch } from './decompose.js';
import type { BatchItem } from '../workers/batch-types.js';
import { CAUTIONS } from '../schemas/cautions.js';
import { alignByPeriod } from '../schemas/align.js';


function toStudy(r: Record<string, any>): Study {
  return {
    id: r.id,
    title: r.title,
    notes: r.notes,
    seriesId: r.series_id,
    series: { code: r.code, title: r.series_title, frequency: r.frequency, unit: r.unit },
    vintage: r.vintage_number ?? 'latest',
    transform: r.transform,
    method: r.method,
    params: JSON.parse(r.params),
    owner: { id: r.owner_id, name: r.owner_name },
    createdAt: new Date(r.created_at).toISOString(),
    updatedAt: new Date(r.updated_at).toISOString(),
  };
}

const base = (db: Db) =>
  db('studies as st')
    .join('series as s', 's.id', 'st.series_id')
    .join('users as u', 'u.id', 'st.owner_id')
    .select('st.*', 's.code', 's.title as series_title', 's.frequency', 's.unit', 'u.name as owner_name');

export async function listStudies(db: Db, filter: { owner?: number; seriesId?: number; method?: string; q?: string }) {
  const q = base(db).orderBy('st.updated_at', 'desc');
  if (filter.owner) q.where('st.owner_id', filter.owner);
  if (filter.seriesId) q.where('st.series_id', filter.seriesId);
  if (filter.method) q.where('st.method', filter.method);
  if (filter.q) q.where((w) => w.whereILike('st.title', `%${filter.q}%`).orWhereILike('s.code', `%${filter.q}%`));
  return (await q.limit(500)).map(toStudy);
}

export async function getStudy(db: Db, id: number): Promise<Study> {
  const row = await base(db).where('st.id', id).first();
  if (!row) throw notFound('The study');
  return toStudy(row);
}

/** Checks a study's specification by computing it once; returns the parameters with defaults filled. */
export async function checkSpec(db: Db, spec: StudySpec) {
  const data = await readSeriesValues(db, spec.seriesId, spec.vintage);
  const r = decompose({ frequency: data.series.frequency, start: data.start ?? undefined, values: data.values, transform: spec.transform, method: spec.method, params: spec.params });
  return { params: r.params, data, result: r };
}

export async function createStudy(db: Db, owner: PublicUser, body: CreateStudyBody, ip?: string) {
  const { params } = await checkSpec(db, body);
  const [id] = await db('studies').insert({
    owner_id: owner.id,
    series_id: body.seriesId,
    vintage_number: body.vintage === 'latest' ? null : body.vintage,
    transform: body.transform,
    method: body.method,
    params: JSON.stringify(params),
    title: body.title,
    notes: body.notes ?? null,
  });
  await audit(db, { actorId: owner.id, action: 'study.create', targetType: 'study', targetId: id, ip });
  return getStudy(db, id);
}

function assertOwner(study: Study, user: PublicUser) {
  if (study.owner.id !== user.id) throw forbidden('not_owner', `Only ${study.owner.name}, who owns this study, can change it; duplicate it to make your own.`);
}

export async function updateStudy(db: Db, user: PublicUser, id: number, body: Partial<CreateStudyBody>) {
  const study = await getStudy(db, id);
  assertOwner(study, user);
  const spec: StudySpec = {
    seriesId: body.seriesId ?? study.seriesId,
    vintage: body.vintage ?? study.vintage,
    transform: body.transform ?? study.transform,
    method: body.method ?? study.method,
    params: body.params ?? (body.method && body.method !== study.method ? {} : study.params),
  };
  const { params } = await checkSpec(db, spec);
  await db('studies')
    .where('id', id)
    .update({
      series_id: spec.seriesId,
      vintage_number: spec.vintage === 'latest' ? null : spec.vintage,
      transform: spec.transform,
      method: spec.method,
      params: JSON.stringify(params),
      title: body.title ?? study.title,
      notes: body.notes === undefined ? study.notes : body.notes,
      updated_at: new Date(),
    });
  return getStudy(db, id);
}

export async function duplicateStudy(db: Db, user: PublicUser, id: number) {
  const s = await getStudy(db, id);
  return createStudy(db, user, { title: `${s.title} (copy)`.slice(0, 200), notes: s.notes ?? undefined, seriesId: s.seriesId, vintage: s.vintage, transform: s.transform, method: s.method, params: s.params });
}

export async function deleteStudy(db: Db, user: PublicUser, id: number, ip?: string) {
  const study = await getStudy(db, id);
  assertOwner(study, user);
  const [{ n }] = await db('exhibits').where('study_id', id).whereIn('status', ['draft', 'in_review', 'returned']).count({ n: '*' });
  if (Number(n) > 0) throw conflict('study_in_use', 'An exhibit that is not yet published is built on this study; withdraw or finish it first.');
  const panels = await db('board_panels').whereRaw('JSON_CONTAINS(study_ids, ?)', [String(id)]).count({ n: '*' });
  if (Number(panels[0].n) > 0) throw conflict('study_in_use', 'A board panel shows this study; remove it from the board first.');
  await db('studies').where('id', id).delete();
  await audit(db, { actorId: user.id, action: 'study.delete', targetType: 'study', targetId: id, ip });
}

// ------------------------------------------------------------------ results

const finiteOrNull = (v: number | null | undefined) => (v === null || v === undefined || !Number.isFinite(v) ? null : v);

export function cycleUnit(transform: string, unit: string) {
  return transform === 'log100' ? '% of trend' : transform === 'log' ? 'log points' : unit;
}

export async function computeSpec(db: Db, spec: StudySpec): Promise<StudyResult> {
  const { data, result: r } = await checkSpec(db, spec);
  const stats = cycleStatistics(r.cycle, r.frequency);
  const tps = turningPoints(r.cycle, r.frequency);
  const ppy = PERIODS_PER_YEAR[r.frequency];
  return {
    method: r.method,
    params: r.params,
    transform: r.transform,
    frequency: r.frequency,
    periods: data.periods,
    input: nullable(r.input),
    trend: nullable(r.trend),
    cycle: nullable(r.cycle),
    warnings: r.warnings,
    diagnostics: { ...r.diagnostics },
    vintage: data.vintage.number,
    asOf: data.vintage.asOf,
    vintagePin: spec.vintage,
    series: { id: data.series.id, code: data.series.code, title: data.series.title, unit: data.series.unit, frequency: data.series.frequency, source: data.series.source },
    statistics: Object.fromEntries(Object.entries(stats).map(([k, v]) => [k, finiteOrNull(v as number)])),
    turningPoints: tps.map((t) => ({ ...t, period: data.periods[t.index] })),
    gain: gainCurve({ method: r.method, params: r.params, n: data.values.length, coefficients: r.diagnostics.coefficients, iterationsUsed: r.diagnostics.iterationsUsed }),
    methodLine: methodLine(r.method, { ...r.params, iterationsUsed: r.diagnostics.iterationsUsed }, r.transform),
    vintageStamp: `data as of ${data.vintage.asOf}, vintage ${data.vintage.number}`,
    twoSided: TWO_SIDED[r.method],
    endOfSamplePeriods: TWO_SIDED[r.method] ? 2 * ppy : 0,
    cautions: [...CAUTIONS],
    unitOfCycle: cycleUnit(r.transform, data.series.unit),
  };
}

export async function studyResult(db: Db, id: number) {
  const s = await getStudy(db, id);
  const result = await computeSpec(db, s);
  return { study: s, ...result };
}

// ------------------------------------------------------------------ comparisons

export async function compare(db: Db, body: CompareBody): Promise<CompareResult> {
  const results: (StudyResult & { label: string })[] = [];
  for (const item of body.items) {
    const r = await computeSpec(db, item);
    results.push({ label: item.label ?? `${r.series.code} · ${r.methodLine}`, ...r });
  }
  const { periods: all, values: cycles } = alignByPeriod(results.map((r) => ({ periods: r.periods, values: r.cycle })));
  const ref = Math.min(body.reference, results.length - 1);
  const toNaN = (a: (number | null)[]) => Float64Array.from(a, (v) => (v === null ? NaN : v));
  const refCycle = toNaN(cycles[ref]);
  const frequencies = new Set(results.map((r) => r.frequency));
  return {
    periods: all,
    reference: ref,
    mixedFrequencies: frequencies.size > 1,
    items: results.map((r, k) => {
      const c = toNaN(cycles[k]);
      const stats = cycleStatistics(c, r.frequency as 'Q', k === ref ? undefined : refCycle);
      return {
        label: r.label,
        seriesId: r.series.id,
        code: r.series.code,
        method: r.method,
        params: r.params,
        transform: r.transform,
        vintage: r.vintage,
        methodLine: r.methodLine,
        vintageStamp: r.vintageStamp,
        unitOfCycle: r.unitOfCycle,
        cycle: cycles[k],
        statistics: Object.fromEntries(Object.entries(stats).map(([key, v]) => [key, finiteOrNull(v as number)])),
        crossCorrelations: frequencies.size > 1 ? [] : crossCorrelations(c, refCycle, body.maxLag).map((x) => ({ ...x, r: finiteOrNull(x.r) })),
      };
    }),
  };
}

// ------------------------------------------------------------------ real-time revision analysis

/**
 * Applies the study's method to every vintage of its series and compares the real-time
 * estimates (each vintage's end point) with the final one (the latest vintage, full sample), as
 * Orphanides and van Norden (2002) do; and the quasi-real-time estimates (the latest data cut at
 * each period) to separate revisions of the data from revisions that come from the filter's end
 * point. total revision = (real-time − quasi-real-time) + (quasi-real-time − final).
 */
export async function realtimeAnalysis(db: Db, pool: AnalysisPool | undefined, id: number, onProgress?: (phase: string, done: number, total: number) => void): Promise<RealtimeResult> {
  const s = await getStudy(db, id);
  const vintages = (await listVintages(db, s.seriesId)).sort((a, b) => a.number - b.number);
  if (vintages.length < 2) throw conflict('too_few_vintages', 'The real-time analysis needs at least two vintages of the series.');
  const datas: SeriesValues[] = [];
  for (const v of vintages) datas.push(await readSeriesValues(db, s.seriesId, v.number));
  const latest = datas[datas.length - 1];
  const freq = latest.series.frequency;
  const item = (d: (typeof datas)[number], values: (number | null)[], id: string): BatchItem => ({ id, frequency: freq, start: d.start ?? undefined, values, transform: s.transform, method: s.method, params: s.params });

  // (a, b) Every vintage's whole gap: the fan, and its end point.
  onProgress?.('vintages', 0, vintages.length);
  const fanStrings = await runBatch(datas.map((d, k) => item(d, d.values, String(vintages[k].number))), 'full', pool);
  onProgress?.('vintages', vintages.length, vintages.length);
  const fan = fanStrings.map((j) => JSON.parse(j));
  const failed = fan.find((f) => f.error);
  if (failed) throw new HttpError(400, failed.error.code, `Vintage ${failed.id}: ${failed.error.message}`);
  const final = fan[fan.length - 1];
  const finalAt = new Map<string, number | null>(latest.periods.map((p, i) => [p, final.cycle[i]]));
  const realTime = fan.map((f, k) => {
    const periods = datas[k].periods;
    let last = f.cycle.length - 1;
    while (last >= 0 && f.cycle[last] === null) last--;
    return { vintage: vintages[k].number, asOf: vintages[k].asOf, period: last >= 0 ? periods[last] : null, value: last >= 0 ? (f.cycle[last] as number) : null, final: last >= 0 ? (finalAt.get(periods[last]) ?? null) : null };
  });

  // Quasi-real-time: the latest vintage truncated at each period from a minimum sample on.
  const n = latest.values.length;
  const ppy = PERIODS_PER_YEAR[freq];
  const minimum = Math.min(n - 1, Math.max(5 * ppy, 24));
  const cuts: BatchItem[] = [];
  for (let t = minimum; t <= n; t++) cuts.push(item(latest, latest.values.slice(0, t), String(t)));
  const quasi: { period: string; value: number | null; final: number | null }[] = [];
  const CHUNK = 100;
  for (let i = 0; i < cuts.length; i += CHUNK) {
    const part = await runBatch(cuts.slice(i, i + CHUNK), 'summary', pool);
    for (const j of part) {
      const r = JSON.parse(j);
      const t = Number(r.id);
      const period = latest.periods[t - 1];
      // The end point of the cut sample; null when the method has no value there (Baxter–King).
      const at = r.last && r.last.index === t - 1 ? r.last.cycle : null;
      quasi.push({ period, value: r.error ? null : at, final: finalAt.get(period) ?? null });
    }
    onProgress?.('quasi-real-time', Math.min(cuts.length, i + CHUNK), cuts.length);
  }

  const arr = (xs: (number | null)[]) => Float64Array.from(xs, (v) => (v === null ? NaN : v));
  const rel = (a: (number | null)[], b: (number | null)[]) => {
    const r = reliability(arr(a), arr(b));
    return Object.fromEntries(Object.entries(r).map(([k, v]) => [k, finiteOrNull(v)]));
  };
  const quasiAt = new Map(quasi.map((q) => [q.period, q.value]));
  const rtPoints = realTime.filter((p) => p.period !== null);
  return {
    study: { id: s.id, title: s.title, method: s.method, params: s.params, transform: s.transform },
    series: { id: s.seriesId, code: s.series.code, unit: s.series.unit, frequency: freq },
    unitOfCycle: cycleUnit(s.transform, s.series.unit),
    methodLine: methodLine(s.method, s.params, s.transform),
    finalVintage: vintages[vintages.length - 1].number,
    fan: fan.map((f, k) => ({ vintage: vintages[k].number, asOf: vintages[k].asOf, periods: datas[k].periods, cycle: f.cycle })),
    final: { vintage: vintages[vintages.length - 1].number, periods: latest.periods, cycle: final.cycle },
    realTime,
    quasiRealTime: quasi,
    statistics: {
      realTime: rel(rtPoints.map((p) => p.value), rtPoints.map((p) => p.final)),
      quasiRealTime: rel(quasi.map((q) => q.value), quasi.map((q) => q.final)),
      /** Real-time against quasi-real-time at the vintages' end points: the part due to data revisions. */
      dataRevisions: rel(rtPoints.map((p) => p.value), rtPoints.map((p) => quasiAt.get(p.period!) ?? null)),
    },
    note:
      rtPoints.length < 8
        ? `Only ${rtPoints.length} vintages give a real-time end point, so the real-time statistics rest on few periods; the quasi-real-time statistics use ${quasi.length}.`
        : null,
    word: PERIOD_WORD[freq as 'Q'][1],
  };
}
