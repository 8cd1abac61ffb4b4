/**
 * The Catalogue: series metadata, vintages (immutable), loads and their previews, revisions and
 * exports. A load is all or nothing: one transaction writes every vintage it makes.
 */
import type { Knex } from 'knex';
import type { Db } from '../db.js';
import { badRequest, conflict, notFound, unprocessable, type FileProblem } from '../lib/errors.js';
import { sha256 } from '../lib/secrets.js';
import { checkObservations, splitSeries, type SeriesRows } from '../importers/observations.js';
import { readTable, type FileFormat } from '../importers/table.js';
import type { CreateSeriesBody, Series, SeriesPreviewBase, Vintage } from '../schemas/catalogue.js';
import { audit } from './audit.js';
import { alignVintages, compareVintages, type RevisionRow, type RevisionSummary } from './frames.js';

/** A series and a vintage as the API answers them (shared with the client). */
export type SeriesRow = Series;
export type VintageInfo = Vintage;

import { contiguous, dateOnly, iso, manySeriesValues, toSeries, toVintage, type SeriesValues } from './values.js';
export { manySeriesValues, type SeriesValues };

// ------------------------------------------------------------------ series

export async function listSeries(db: Db, filter: { q?: string; frequency?: string; unit?: string } = {}) {
  // The latest vintage through the (series_id, number) unique index: no scan of all vintages.
  const q = db('series as s')
    .leftJoin('vintages as v', function () {
      this.on('v.series_id', '=', 's.id').andOn('v.number', '=', db.raw('(SELECT MAX(v2.number) FROM vintages v2 WHERE v2.series_id = s.id)'));
    })
    .select('s.*', 'v.number as v_number', 'v.as_of as v_as_of', 'v.created_at as v_created_at', 'v.last_period as v_last_period', 'v.row_count as v_rows')
    .orderBy('s.code');
  if (filter.q) q.where((w) => w.whereILike('s.code', `%${filter.q}%`).orWhereILike('s.title', `%${filter.q}%`));
  if (filter.frequency) q.where('s.frequency', filter.frequency);
  if (filter.unit) q.where('s.unit', filter.unit);
  const rows = await q;
  return rows.map((r) => ({
    ...toSeries(r),
    latestVintage: r.v_number ? { number: r.v_number, asOf: dateOnly(r.v_as_of), loadedAt: iso(r.v_created_at), lastPeriod: r.v_last_period, rowCount: r.v_rows } : null,
  }));
}

export async function getSeries(db: Db | Knex.Transaction, id: number): Promise<SeriesRow> {
  const row = await db('series').where('id', id).first();
  if (!row) throw notFound('The series');
  return toSeries(row);
}

export async function createSeries(db: Db, actorId: number, body: CreateSeriesBody, ip?: string) {
  try {
    const id = await db.transaction(async (trx) => {
      const [newId] = await trx('series').insert({
        code: body.code,
        title: body.title,
        frequency: body.frequency,
        unit: body.unit,
        seasonal_adjustment: body.seasonalAdjustment,
        source: body.source ?? '',
        notes: body.notes ?? null,
        sdmx_key: body.sdmxKey || null,
        created_by: actorId,
      });
      await audit(trx, { actorId, action: 'series.create', targetType: 'series', targetId: newId, details: { code: body.code }, ip });
      return newId;
    });
    return getSeries(db, id);
  } catch (error) {
    if ((error as { code?: string }).code === 'ER_DUP_ENTRY') {
      const what = String((error as Error).message).includes('sdmx_key') ? `the SDMX key ${body.sdmxKey}` : `the code ${body.code}`;
      throw conflict('duplicate_code', `A series with ${what} already exists; choose another.`);
    }
    throw error;
  }
}

export async function updateSeries(db: Db, actorId: number, id: number, body: Partial<CreateSeriesBody>, ip?: string) {
  const before = await getSeries(db, id);
  if (body.frequency && body.frequency !== before.frequency) {
    const [{ n }] = await db('vintages').where('series_id', id).count({ n: '*' });
    if (Number(n) > 0) throw conflict('frequency_locked', 'The frequency cannot change once a vintage is stored: its periods are written in that frequency. Create a new series instead.');
  }
  const change: Record<string, unknown> = {};
  if (body.code !== undefined) change.code = body.code;
  if (body.title !== undefined) change.title = body.title;
  if (body.frequency !== undefined) change.frequency = body.frequency;
  if (body.unit !== undefined) change.unit = body.unit;
  if (body.seasonalAdjustment !== undefined) change.seasonal_adjustment = body.seasonalAdjustment;
  if (body.source !== undefined) change.source = body.source;
  if (body.notes !== undefined) change.notes = body.notes;
  if (body.sdmxKey !== undefined) change.sdmx_key = body.sdmxKey || null;
  try {
    await db.transaction(async (trx) => {
      await trx('series').where('id', id).update({ ...change, updated_at: new Date() });
      await audit(trx, { actorId, action: 'series.update', targetType: 'series', targetId: id, details: { fields: Object.keys(change) }, ip });
    });
  } catch (error) {
    if ((error as { code?: string }).code === 'ER_DUP_ENTRY') throw conflict('duplicate_code', 'Another series already has this code or SDMX key.');
    throw error;
  }
  return getSeries(db, id);
}

export async function deleteSeries(db: Db, actorId: number, id: number, ip?: string) {
  await getSeries(db, id);
  const [{ n }] = await db('vintages').where('series_id', id).count({ n: '*' });
  if (Number(n) > 0) throw conflict('series_has_vintages', 'A series with stored vintages cannot be deleted: its releases are kept for good.');
  const [{ s }] = await db('studies').where('series_id', id).count({ s: '*' });
  if (Number(s) > 0) throw conflict('series_in_use', 'Studies use this series; it cannot be deleted.');
  await db.transaction(async (trx) => {
    await trx('series').where('id', id).delete();
    await audit(trx, { actorId, action: 'series.delete', targetType: 'series', targetId: id, ip });
  });
}

export async function listUnits(db: Db): Promise<string[]> {
  return (await db('series').distinct('unit').orderBy('unit')).map((r) => r.unit);
}

// ------------------------------------------------------------------ vintages and observations

export async function listVintages(db: Db, seriesId: number): Promise<VintageInfo[]> {
  await getSeries(db, seriesId);
  const rows = await db('vintages as v').leftJoin('users as u', 'u.id', 'v.created_by').where('v.series_id', seriesId).orderBy('v.number', 'desc').select('v.*', 'u.name as creator_name');
  return rows.map(toVintage);
}

export async function resolveVintage(db: Db | Knex.Transaction, seriesId: number, which: number | 'latest' | string): Promise<VintageInfo & { id: number }> {
  const q = db('vintages as v').leftJoin('users as u', 'u.id', 'v.created_by').where('v.series_id', seriesId).select('v.*', 'u.name as creator_name');
  if (which === 'latest') q.orderBy('v.number', 'desc');
  else {
    const n = Number(which);
    if (!Number.isInteger(n) || n < 1) throw badRequest('invalid_vintage', 'A vintage is a number (1, 2, …) or "latest".');
    q.where('v.number', n);
  }
  const row = await q.first();
  if (!row) {
    await getSeries(db, seriesId);
    throw notFound(which === 'latest' ? 'A vintage of this series (none is loaded yet)' : `Vintage ${which} of this series`);
  }
  return { ...toVintage(row), id: row.id };
}

export async function observationsOf(db: Db | Knex.Transaction, vintageId: number): Promise<{ periods: string[]; values: (number | null)[] }> {
  const rows = await db('observations').where('vintage_id', vintageId).orderBy('period').select('period', 'value');
  return { periods: rows.map((r) => r.period), values: rows.map((r) => (r.value === null ? null : Number(r.value))) };
}

/**
 * A vintage as a contiguous array from its first to its last period (missing periods are null),
 * ready for decomposition.
 */
export async function seriesValues(db: Db, seriesId: number, which: number | 'latest') {
  const series = await getSeries(db, seriesId);
  const vintage = await resolveVintage(db, seriesId, which);
  return { series, vintage, ...contiguous(await observationsOf(db, vintage.id), series.frequency) };
}

export function checksumOf(periods: string[], values: (number | null)[]): string {
  let text = '';
  for (let i = 0; i < periods.length; i++) text += `${periods[i]},${values[i] === null ? '' : String(values[i])}\n`;
  return sha256(text);
}

// ------------------------------------------------------------------ loads

export interface SeriesPreview extends SeriesPreviewBase {
  /** Sorted observations (kept out of the JSON answer for large loads). */
  periods: string[];
  values: (number | null)[];
}

export interface LoadPreview {
  format: FileFormat;
  filename: string;
  series: SeriesPreview[];
  problems: FileProblem[];
  errors: number;
  warnings: number;
  observations: number;
  canStore: boolean;
}

type Progress = (phase: string, done: number, total: number) => void;

async function latestObservations(db: Db, seriesIds: number[]) {
  const out = new Map<number, { number: number; periods: string[]; values: (number | null)[]; checksum: string }>();
  if (!seriesIds.length) return out;
  for (let i = 0; i < seriesIds.length; i += 500) {
    const ids = seriesIds.slice(i, i + 500);
    const latest = await db('vintages as v')
      .whereIn('v.series_id', ids)
      .whereRaw('v.number = (SELECT MAX(v2.number) FROM vintages v2 WHERE v2.series_id = v.series_id)')
      .select('v.id', 'v.series_id', 'v.number', 'v.checksum');
    if (!latest.length) continue;
    const byVintage = new Map(latest.map((l) => [l.id, l]));
    const obs = await db('observations').whereIn('vintage_id', latest.map((l) => l.id)).orderBy(['vintage_id', 'period']).select('vintage_id', 'period', 'value');
    for (const l of latest) out.set(l.series_id, { number: l.number, periods: [], values: [], checksum: l.checksum });
    for (const o of obs) {
      const target = out.get(byVintage.get(o.vintage_id)!.series_id)!;
      target.periods.push(o.period);
      target.values.push(o.value === null ? null : Number(o.value));
    }
  }
  return out;
}

/** Finds the Catalogue series a group of rows belongs to: by code, SDMX key, or key with "_". */
function matcher(all: { id: number; code: string; sdmx_key: string | null }[]) {
  const byCode = new Map(all.map((s) => [s.code.toUpperCase(), s.id]));
  const byKey = new Map(all.filter((s) => s.sdmx_key).map((s) => [s.sdmx_key!.toUpperCase(), s.id]));
  return (g: SeriesRows): number | undefined => {
    if (g.code && byCode.has(g.code.toUpperCase())) return byCode.get(g.code.toUpperCase());
    if (g.key) {
      const k = g.key.toUpperCase();
      return byKey.get(k) ?? byCode.get(k) ?? byCode.get(k.replace(/\./g, '_'));
    }
    return undefined;
  };
}

/**
 * Reads and checks a file. For a load into one series (`targetSeriesId`), the file's rows are
 * that series' (an SDMX-CSV may carry others: those are skipped with a warning). Otherwise every
 * series in the file is matched to the Catalogue.
 */
export async function previewLoad(db: Db, file: { buffer: Buffer; filename: string; format?: string }, targetSeriesId?: number, onProgress?: Progress): Promise<LoadPreview> {
  onProgress?.('reading', 0, 1);
  const table = await readTable(file.buffer, file.filename, file.format);
  const groups = splitSeries(table);
  onProgress?.('reading', 1, 1);
  const problems: FileProblem[] = [];
  let assigned: { group: SeriesRows; seriesId: number | undefined }[];
  if (targetSeriesId !== undefined) {
    const target = await getSeries(db, targetSeriesId);
    if (groups.length === 1 && table.format !== 'sdmx-csv') assigned = [{ group: groups[0], seriesId: target.id }];
    else {
      const all = await db('series').select('id', 'code', 'sdmx_key');
      const match = matcher(all);
      const mine = groups.filter((g) => match(g) === target.id);
      const chosen = mine.length ? mine : groups.length === 1 ? groups : [];
      if (!chosen.length) {
        throw unprocessable('series_not_in_file', `The file carries ${groups.length} series and none is ${target.code} (matched by SERIES_CODE, the series' SDMX key, or its code).`, groups.slice(0, 20).map((g) => ({ row: g.rowNumbers[0] ?? null, column: null, message: `series key ${g.code ?? g.key}` })));
      }
      const skipped = groups.length - chosen.length;
      if (skipped) problems.push({ row: null, column: null, message: `${skipped} other series in the file ${skipped === 1 ? 'was' : 'were'} skipped; load them from the Loads page.`, severity: 'warning' });
      assigned = chosen.map((g) => ({ group: g, seriesId: target.id }));
    }
  } else {
    const all = await db('series').select('id', 'code', 'sdmx_key');
    const match = matcher(all);
    assigned = groups.map((g) => ({ group: g, seriesId: match(g) }));
  }

  const ids = [...new Set(assigned.map((a) => a.seriesId).filter((x): x is number => x !== undefined))];
  const meta = new Map<number, SeriesRow>();
  for (let i = 0; i < ids.length; i += 1000) {
    for (const r of await db('series').whereIn('id', ids.slice(i, i + 1000))) meta.set(r.id, toSeries(r));
  }
  const latest = await latestObservations(db, ids);
  const seen = new Set<number>();
  const previews: SeriesPreview[] = [];
  let k = 0;
  for (const { group, seriesId } of assigned) {
    k++;
    if (k % 100 === 0) onProgress?.('checking', k, assigned.length);
    const s = seriesId !== undefined ? meta.get(seriesId) : undefined;
    if (!s) {
      previews.push(emptyPreview(group, [{ row: group.rowNumbers[0] ?? null, column: null, message: `No series in the Catalogue has the code or SDMX key ${group.code ?? group.key ?? '(none)'}; create it first.`, severity: 'error' }]));
      continue;
    }
    if (seen.has(s.id)) {
      previews.push(emptyPreview(group, [{ row: group.rowNumbers[0] ?? null, column: null, message: `A second block of rows for ${s.code}; put all of a series' rows under one key.`, severity: 'error' }]));
      continue;
    }
    seen.add(s.id);
    const checked = checkObservations(group, { frequency: s.frequency, unit: s.unit });
    const prev = latest.get(s.id);
    const checksum = checked.errorCount === 0 ? checksumOf(checked.periods, checked.values) : null;
    let changes: RevisionSummary | null = null;
    let changedPeriods: RevisionRow[] = [];
    if (checked.errorCount === 0 && prev) {
      const cmp = compareVintages({ label: 'latest', periods: prev.periods, values: prev.values }, { label: 'file', periods: checked.periods, values: checked.values });
      changes = cmp.summary;
      changedPeriods = cmp.rows.filter((r) => r.status !== 'unchanged').slice(0, 500);
    } else if (checked.errorCount === 0) {
      changes = { revised: 0, new: checked.periods.length, removed: 0, unchanged: 0, meanRevision: null, meanAbsoluteRevision: null, maxAbsoluteRevision: null };
    }
    const identical = !!prev && checksum === prev.checksum;
    const ps = [...checked.problems];
    if (identical) ps.push({ row: null, column: null, message: `The file matches vintage ${prev!.number} exactly: there is nothing new to store.`, severity: 'warning' });
    previews.push({
      series: { id: s.id, code: s.code, title: s.title, frequency: s.frequency, unit: s.unit },
      key: group.code ?? group.key,
      rowCount: checked.periods.length,
      firstPeriod: checked.periods[0] ?? null,
      lastPeriod: checked.periods[checked.periods.length - 1] ?? null,
      missingValues: checked.values.filter((v) => v === null).length,
      checksum,
      latestVintage: prev?.number ?? null,
      identicalToLatest: identical,
      changes,
      changedPeriods,
      problems: ps,
      errors: checked.errorCount,
      warnings: ps.filter((p) => p.severity === 'warning').length,
      periods: checked.periods,
      values: checked.values,
    });
  }
  onProgress?.('checking', assigned.length, assigned.length);
  const errors = previews.reduce((n, p) => n + p.errors, 0);
  const warnings = previews.reduce((n, p) => n + p.warnings, 0) + problems.length;
  return {
    format: table.format,
    filename: file.filename,
    series: previews,
    problems,
    errors,
    warnings,
    observations: previews.reduce((n, p) => n + p.rowCount, 0),
    canStore: errors === 0 && previews.some((p) => !p.identicalToLatest),
  };
}

function emptyPreview(group: SeriesRows, problems: FileProblem[]): SeriesPreview {
  return {
    series: null,
    key: group.code ?? group.key,
    rowCount: group.rowNumbers.length,
    firstPeriod: null,
    lastPeriod: null,
    missingValues: 0,
    checksum: null,
    latestVintage: null,
    identicalToLatest: false,
    changes: null,
    changedPeriods: [],
    problems,
    errors: problems.length,
    warnings: 0,
    periods: [],
    values: [],
  };
}

/** The JSON form of a preview; large loads leave out the observations. */
export function previewJson(p: LoadPreview, { withObservations }: { withObservations: boolean }) {
  return {
    ...p,
    problems: p.problems,
    series: p.series.map(({ periods, values, ...rest }) => ({
      ...rest,
      ...(withObservations ? { observations: { periods, values } } : {}),
    })),
  };
}

export function allProblems(p: LoadPreview): FileProblem[] {
  return [...p.problems, ...p.series.flatMap((s) => s.problems)];
}

const INSERT_ROWS = 10_000;

/**
 * Stores a checked load: one new vintage per changed series, all in one transaction (a failure
 * anywhere stores nothing). Series rows are locked in id order, so concurrent loads of the same
 * series queue up and take the numbers n and n+1, never the same one.
 */
export async function storeLoad(
  db: Db,
  actorId: number,
  preview: LoadPreview,
  fields: { note?: string; asOf?: string; expectChecksum?: string },
  ip?: string,
  onProgress?: Progress,
) {
  if (preview.errors > 0) {
    throw unprocessable('file_has_errors', `The file has ${preview.errors} problem${preview.errors === 1 ? '' : 's'} to fix before it can be stored; nothing was stored.`, allProblems(preview).filter((p) => p.severity === 'error').slice(0, 200));
  }
  const asOf = fields.asOf ?? new Date().toISOString().slice(0, 10);
  if (asOf > new Date().toISOString().slice(0, 10)) throw badRequest('as_of_in_future', `The as-of date ${asOf} is in the future; a release is dated when it was published.`);
  const candidates = preview.series.filter((s) => s.series && !s.identicalToLatest);
  if (candidates.length === 0) {
    const v = preview.series[0]?.latestVintage;
    throw conflict('no_change', `Nothing new: the file matches the latest vintage${preview.series.length === 1 && v ? ` (${v})` : 's'} exactly, so no vintage was stored.`);
  }
  if (fields.expectChecksum && (candidates.length !== 1 || candidates[0].checksum !== fields.expectChecksum)) {
    throw conflict('preview_mismatch', 'The file differs from the one previewed; preview it again before storing.');
  }
  const total = candidates.reduce((n, c) => n + c.rowCount, 0);
  let written = 0;
  const created = await db.transaction(async (trx) => {
    const ids = candidates.map((c) => c.series!.id).sort((a, b) => a - b);
    for (let i = 0; i < ids.length; i += 1000) await trx('series').whereIn('id', ids.slice(i, i + 1000)).forUpdate().select('id');
    const latestNumber = new Map<number, { n: number; checksum: string }>();
    for (let i = 0; i < ids.length; i += 1000) {
      const rows = await trx('vintages as v')
        .whereIn('v.series_id', ids.slice(i, i + 1000))
        .whereRaw('v.number = (SELECT MAX(v2.number) FROM vintages v2 WHERE v2.series_id = v.series_id)')
        .select('v.series_id', 'v.number', 'v.checksum');
      for (const r of rows) latestNumber.set(r.series_id, { n: r.number, checksum: r.checksum });
    }
    // Another load may have stored the same data while this one waited for the lock.
    const todo = candidates.filter((c) => latestNumber.get(c.series!.id)?.checksum !== c.checksum);
    if (todo.length === 0) throw conflict('no_change', 'Nothing new: the same data was stored a moment ago by another load.');
    const [loadId] = await trx('loads').insert({
      created_by: actorId,
      filename: preview.filename.slice(0, 255),
      format: preview.format,
      series_count: todo.length,
      observation_count: todo.reduce((n, c) => n + c.rowCount, 0),
      note: fields.note ?? null,
    });
    const out: { seriesId: number; code: string; number: number; asOf: string; rowCount: number; checksum: string }[] = [];
    for (const c of todo) {
      const number = (latestNumber.get(c.series!.id)?.n ?? 0) + 1;
      const [vintageId] = await trx('vintages').insert({
        series_id: c.series!.id,
        number,
        as_of: asOf,
        note: fields.note ?? null,
        row_count: c.rowCount,
        checksum: c.checksum,
        first_period: c.firstPeriod,
        last_period: c.lastPeriod,
        load_id: loadId,
        created_by: actorId,
      });
      for (let i = 0; i < c.periods.length; i += INSERT_ROWS) {
        // Periods are canonical SDMX strings (digits, "-" and "Q") and values are finite numbers,
        // checked above, so the VALUES list is built directly: much faster than per-row binding.
        let sql = 'INSERT INTO observations (vintage_id, period, value) VALUES ';
        const end = Math.min(c.periods.length, i + INSERT_ROWS);
        for (let j = i; j < end; j++) {
          const p = c.periods[j];
          if (!/^[0-9Q-]{4,7}$/.test(p)) throw new Error(`unexpected period ${p}`);
          const v = c.values[j];
          sql += `${j > i ? ',' : ''}(${vintageId},'${p}',${v === null ? 'NULL' : Number.isFinite(v) ? String(v) : 'NULL'})`;
        }
        await trx.raw(sql);
        written += end - i;
        onProgress?.('storing', written, total);
      }
      out.push({ seriesId: c.series!.id, code: c.series!.code, number, asOf, rowCount: c.rowCount, checksum: c.checksum! });
    }
    await audit(trx, { actorId, action: 'load.store', targetType: 'load', targetId: loadId, details: { filename: preview.filename, vintages: out.map((o) => `${o.code}#${o.number}`).slice(0, 50), count: out.length }, ip });
    return { loadId, vintages: out };
  });
  return created;
}

export async function listLoads(db: Db, limit = 100) {
  const rows = await db('loads as l').leftJoin('users as u', 'u.id', 'l.created_by').orderBy('l.id', 'desc').limit(limit).select('l.*', 'u.name as creator_name');
  return rows.map((r) => ({
    id: r.id,
    filename: r.filename,
    format: r.format,
    seriesCount: r.series_count,
    observationCount: r.observation_count,
    note: r.note,
    createdAt: iso(r.created_at),
    createdBy: r.creator_name,
  }));
}

// ------------------------------------------------------------------ revisions

export async function revisions(db: Db, seriesId: number, from: number | 'latest', to: number | 'latest') {
  const series = await getSeries(db, seriesId);
  const a = await resolveVintage(db, seriesId, from);
  const b = await resolveVintage(db, seriesId, to);
  const [oa, ob] = await Promise.all([observationsOf(db, a.id), observationsOf(db, b.id)]);
  const { rows, summary } = compareVintages({ label: 'from', ...oa }, { label: 'to', ...ob });
  return { series: { id: series.id, code: series.code, unit: series.unit, frequency: series.frequency }, from: a, to: b, items: rows, summary };
}

/** The revision triangle: periods down, vintages across. */
export async function revisionTriangle(db: Db, seriesId: number) {
  const series = await getSeries(db, seriesId);
  const vintages = (await listVintages(db, seriesId)).sort((x, y) => x.number - y.number);
  const ids = await db('vintages').where('series_id', seriesId).select('id', 'number');
  const idOf = new Map(ids.map((r) => [r.number, r.id]));
  const data = await Promise.all(vintages.map(async (v) => ({ label: String(v.number), ...(await observationsOf(db, idOf.get(v.number)!)) })));
  const aligned = alignVintages(data);
  return {
    series: { id: series.id, code: series.code, unit: series.unit, frequency: series.frequency },
    vintages: vintages.map((v) => ({ number: v.number, asOf: v.asOf })),
    periods: aligned.periods,
    values: aligned.periods.map((_, i) => vintages.map((v) => (aligned.present[String(v.number)][i] ? aligned.columns[String(v.number)][i] : null))),
  };
}
