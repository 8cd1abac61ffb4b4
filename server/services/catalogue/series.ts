/** Series of the Catalogue: their metadata, listed, read, defined, corrected and deleted. */
import type { Knex } from 'knex';
import { fastQuery, type Db } from '../../db.js';
import { conflict, notFound } from '../../lib/errors.js';
import type { CatalogueUnits, CreateSeriesBody, Series, SeriesListAnswer, SeriesListQuery } from '../../schemas/catalogue.js';
import { audit } from '../audit.js';
import { dateOnly, iso, toSeries } from './rows.js';
import { seriesHoldingPieces } from './search.js';
import { transaction } from '../../lib/retry.js';

/** Text for a LIKE pattern that matches itself only: backslash, % and _ escaped (MariaDB escapes with a backslash). */
export const likeText = (text: string) => text.replace(/[\\%_]/g, (c) => `\\${c}`);

/**
 * The Catalogue's list: the series matching `q` (code or title), `frequency` and `unit`, in code
 * order, each with its latest vintage, and how many match in all (`total`). With `limit` (and
 * `offset`) one page of them: the page and the count are two queries, neither of which reads the
 * series outside the page's rows beyond the index of codes.
 */
export async function listSeries(db: Db, filter: SeriesListQuery = {}): Promise<SeriesListAnswer> {
  const where: string[] = [];
  const bindings: unknown[] = [];
  if (filter.q) {
    // The index of three-character pieces finds the candidates; the LIKE decides. The text is found
    // as typed: % and _ are letters here, not wildcards (likeText).
    const candidates = await seriesHoldingPieces(db, filter.q);
    if (candidates?.length === 0) return { items: [], total: 0 };
    if (candidates) {
      where.push(`s.id IN (${candidates.map(() => '?').join(',')})`);
      bindings.push(...candidates);
    }
    where.push('(s.code LIKE ? OR s.title LIKE ?)');
    bindings.push(`%${likeText(filter.q)}%`, `%${likeText(filter.q)}%`);
  }
  if (filter.frequency) {
    where.push('s.frequency = ?');
    bindings.push(filter.frequency);
  }
  if (filter.unit) {
    where.push('s.unit = ?');
    bindings.push(filter.unit);
  }
  const whereSql = where.length ? `WHERE ${where.join(' AND ')}` : '';
  const paged = filter.limit !== undefined || filter.offset !== undefined;
  // Codes are unique, so code order is the same on every page. MariaDB takes OFFSET only after a
  // LIMIT: without one, the largest it accepts.
  const page = paged ? ` LIMIT ${filter.limit ?? '18446744073709551615'} OFFSET ${filter.offset ?? 0}` : '';
  // The order: a column from the schema's list (never the request's text), then the code.
  const dir = filter.order === 'desc' ? 'DESC' : 'ASC';
  const orderBy = filter.sort && filter.sort !== 'code' ? `s.${filter.sort} ${dir}, s.code ${dir}` : `s.code ${dir}`;
  // The latest vintage through the (series_id, number) unique index: no scan of all vintages. Raw
  // SQL, as on the other hot read paths (building the query with Knex cost more than running it).
  // A page: the ids of its series through the index of codes first, then their rows (a derived
  // table of whole rows, notes and all, would be sorted through a temporary table).
  const from = paged ? `(SELECT s.id FROM series s ${whereSql} ORDER BY ${orderBy}${page}) p JOIN series s ON s.id = p.id` : `series s`;
  const [rows, counted] = await Promise.all([
    fastQuery(
      db,
      `SELECT s.*, v.number AS v_number, v.as_of AS v_as_of, v.created_at AS v_created_at, v.last_period AS v_last_period, v.row_count AS v_rows
         FROM ${from} LEFT JOIN vintages v ON v.series_id = s.id AND v.number = (SELECT MAX(v2.number) FROM vintages v2 WHERE v2.series_id = s.id)
        ${paged ? '' : whereSql} ORDER BY ${orderBy}`,
      bindings,
    ),
    paged ? fastQuery<{ n: number }>(db, `SELECT COUNT(*) AS n FROM series s ${whereSql}`, bindings) : null,
  ]);
  const items = rows.map((r) => ({
    ...toSeries(r),
    latestVintage: r.v_number ? { number: r.v_number, asOf: dateOnly(r.v_as_of), loadedAt: iso(r.v_created_at)!, lastPeriod: r.v_last_period, rowCount: r.v_rows } : null,
  }));
  return { items, total: counted ? Number(counted[0].n) : items.length };
}

/** The units the Catalogue's series are kept in, with how many series each (the Catalogue page's unit filter). */
export async function catalogueUnits(db: Db): Promise<CatalogueUnits> {
  const rows = await fastQuery<{ unit: string; n: number }>(db, 'SELECT unit, COUNT(*) AS n FROM series GROUP BY unit ORDER BY unit', []);
  return { items: rows.map((r) => ({ unit: r.unit, series: Number(r.n) })) };
}

export async function getSeries(db: Db | Knex.Transaction, id: number): Promise<Series> {
  const row = await db('series').where('id', id).first();
  if (!row) throw notFound('The series');
  return toSeries(row);
}

/**
 * The series a route names by its numeric id or by its code (`EST_GDP_REAL`): every
 * `/api/v1/series/:id…` route takes both. Codes start with a capital letter, so a string of
 * digits is always an id. 404 (error shape) when neither names a series.
 */
export async function resolveSeriesRef(db: Db | Knex.Transaction, idOrCode: string | number | undefined): Promise<Series> {
  const ref = String(idOrCode ?? '').trim();
  if (/^\d{1,10}$/.test(ref)) {
    const id = Number(ref);
    if (id > 0 && id <= 2 ** 31) return getSeries(db, id);
  } else if (/^[A-Za-z][A-Za-z0-9_.]{1,63}$/.test(ref)) {
    const row = await db('series').where('code', ref.toUpperCase()).first();
    if (row) return toSeries(row);
  }
  throw notFound(`The series ${ref.slice(0, 64)}`);
}

export async function createSeries(db: Db, actorId: number, body: CreateSeriesBody, ip?: string) {
  try {
    const id = await transaction(db, async (trx) => {
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
  // Every change is audited with what it was and what it became. Vintages keep the metadata they
  // were loaded under (vintage_metadata), so old exports keep saying what they said.
  const changes: Record<string, { from: unknown; to: unknown }> = {};
  for (const [key, to] of Object.entries(body)) {
    const from = (before as unknown as Record<string, unknown>)[key] ?? null;
    const next = key === 'sdmxKey' ? to || null : (to ?? null);
    if (to !== undefined && from !== next) changes[key] = { from, to: next };
  }
  try {
    await transaction(db, async (trx) => {
      await trx('series').where('id', id).update({ ...change, updated_at: new Date() });
      await audit(trx, { actorId, action: 'series.update', targetType: 'series', targetId: id, details: { code: before.code, changes }, ip });
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
  await transaction(db, async (trx) => {
    await trx('series').where('id', id).delete();
    await audit(trx, { actorId, action: 'series.delete', targetType: 'series', targetId: id, ip });
  });
}
