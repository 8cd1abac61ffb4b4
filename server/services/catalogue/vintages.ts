/** Vintages (immutable releases of a series) and their observations as stored. */
import type { Knex } from 'knex';
import { fastQuery, type Db } from '../../db.js';
import { badRequest, notFound } from '../../lib/errors.js';
import { sha256 } from '../../lib/secrets.js';
import type { ObservationsAsOf, Vintage } from '../../schemas/catalogue.js';
import { dateOnly, toVintage } from './rows.js';
import { getSeries, resolveSeriesRef } from './series.js';

/** A vintage with its database id, for the queries that follow. */
export type StoredVintage = Vintage & { id: number };

export async function listVintages(db: Db, seriesId: number): Promise<Vintage[]> {
  await getSeries(db, seriesId);
  const rows = await db('vintages as v').leftJoin('users as u', 'u.id', 'v.created_by').where('v.series_id', seriesId).orderBy('v.number', 'desc').select('v.*', 'u.name as creator_name');
  return rows.map(toVintage);
}

/** A vintage by its number or "latest"; 404 when the series or the vintage does not exist. */
export async function resolveVintage(db: Db | Knex.Transaction, seriesId: number, which: number | 'latest' | string): Promise<StoredVintage> {
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
    throw notFound(vintageWhat(which));
  }
  return { ...toVintage(row), id: row.id };
}

/**
 * The vintage in force on `date` (YYYY-MM-DD): the latest released on or before it. Vintages are
 * numbered in release order, so their release dates never decrease with the number; ties on a
 * date go to the higher number. 404 (error shape) when none was released by then.
 */
export async function vintageInForce(db: Db | Knex.Transaction, seriesId: number, date: string): Promise<StoredVintage> {
  const row = await db('vintages as v')
    .leftJoin('users as u', 'u.id', 'v.created_by')
    .where('v.series_id', seriesId)
    .andWhere('v.as_of', '<=', date)
    .orderBy([{ column: 'v.as_of', order: 'desc' }, { column: 'v.number', order: 'desc' }])
    .first('v.*', 'u.name as creator_name');
  if (!row) {
    await getSeries(db, seriesId);
    throw notFound(`A vintage of this series released on or before ${date} (none was released by then)`);
  }
  return { ...toVintage(row), id: row.id };
}

/** The words of the 404 for a missing vintage (shared with the stored-values read path). */
export const vintageWhat = (which: number | 'latest' | string) => (which === 'latest' ? 'A vintage of this series (none is loaded yet)' : `Vintage ${which} of this series`);

/** The stored rows of a vintage, sorted by period (missing values are null). */
export async function observationsOf(db: Db | Knex.Transaction, vintageId: number): Promise<{ periods: string[]; values: (number | null)[] }> {
  const rows = await db('observations').where('vintage_id', vintageId).orderBy('period').select('period', 'value');
  return { periods: rows.map((r) => r.period), values: rows.map((r) => (r.value === null ? null : Number(r.value))) };
}

type VintageRows = { number: number; as_of: Date | string; period: string | null; value: number | null }[];

/** A series' id without a query when the reference is one (resolveSeriesRef reads it otherwise). */
async function seriesIdOf(db: Db, ref: string): Promise<number> {
  const text = ref.trim();
  const n = Number(text);
  return /^\d{1,10}$/.test(text) && n > 0 && n <= 2 ** 31 ? n : (await resolveSeriesRef(db, ref)).id;
}

/** A vintage's rows (the vintage chosen by `which`, SQL over `v2` with `?` for the series) in one round trip. */
async function vintageRows(db: Db, seriesId: number, which: string, bindings: unknown[]) {
  const chosen = `SELECT v2.id FROM vintages v2 WHERE v2.series_id = ? ${which} LIMIT 1`;
  // An inner join reads the rows in the primary key's order: no sort. The date comes as text:
  // no Date built for each of the rows.
  let rows = await fastQuery<VintageRows[number]>(
    db,
    `SELECT v.number, DATE_FORMAT(v.as_of, '%Y-%m-%d') AS as_of, o.period, o.value FROM vintages v JOIN observations o ON o.vintage_id = v.id WHERE v.id = (${chosen}) ORDER BY o.period`,
    [seriesId, ...bindings],
  );
  // No rows: no such vintage, or (were one ever stored) a vintage without observations.
  if (rows.length === 0) rows = await fastQuery(db, `SELECT v.number, v.as_of, NULL AS period, NULL AS value FROM vintages v WHERE v.id = (${chosen})`, [seriesId, ...bindings]);
  if (rows.length === 0) return null;
  const stored = rows[0].period === null ? [] : rows;
  return { number: rows[0].number, asOf: dateOnly(rows[0].as_of), periods: stored.map((r) => r.period!), values: stored.map((r) => (r.value === null ? null : Number(r.value))) };
}

/**
 * A vintage's number, as-of date and stored rows (its number or "latest") of the series `ref` (id
 * or code) in one query: GET …/vintages/:number/observations, read on every chart of a stored
 * series. The same answers and errors as resolveSeriesRef, resolveVintage and observationsOf.
 */
export async function vintageObservations(db: Db, ref: string, which: number | 'latest' | string): Promise<{ vintage: number; asOf: string; periods: string[]; values: (number | null)[] }> {
  const latest = which === 'latest';
  const n = Number(which);
  if (!latest && (!Number.isInteger(n) || n < 1)) {
    await resolveSeriesRef(db, ref);
    throw badRequest('invalid_vintage', 'A vintage is a number (1, 2, …) or "latest".');
  }
  const found = await vintageRows(db, await seriesIdOf(db, ref), latest ? 'ORDER BY v2.number DESC' : 'AND v2.number = ?', latest ? [] : [n]);
  if (!found) {
    await resolveSeriesRef(db, ref);
    throw notFound(vintageWhat(which));
  }
  const { number, ...rest } = found;
  return { vintage: number, ...rest };
}

/** The vintage in force on `date` with its stored rows, in one query (GET /series/:series/observations?asOf=); as vintageInForce. */
export async function observationsAsOf(db: Db, ref: string, date: string): Promise<ObservationsAsOf> {
  const found = await vintageRows(db, await seriesIdOf(db, ref), 'AND v2.as_of <= ? ORDER BY v2.as_of DESC, v2.number DESC', [date]);
  if (!found) {
    await resolveSeriesRef(db, ref);
    throw notFound(`A vintage of this series released on or before ${date} (none was released by then)`);
  }
  return { vintage: { number: found.number, asOf: found.asOf }, periods: found.periods, values: found.values };
}

const INSERT_ROWS = 10_000;

/**
 * Inserts the observations of new vintages (one or many: a history load stores hundreds) in
 * statements of up to 10 000 rows across vintages, calling `onRows` after each. Periods are
 * canonical SDMX strings (digits, "-" and "Q", checked here) and values finite numbers or null,
 * so the VALUES list is built directly: much faster than binding every row.
 */
export async function insertObservations(trx: Knex.Transaction, parts: { vintageId: number; periods: string[]; values: (number | null)[] }[], onRows?: (rows: number) => void) {
  let sql = '';
  let rows = 0;
  const flush = async () => {
    if (!rows) return;
    await trx.raw('INSERT INTO observations (vintage_id, period, value) VALUES ' + sql);
    onRows?.(rows);
    sql = '';
    rows = 0;
  };
  for (const { vintageId, periods, values } of parts) {
    const id = Number(vintageId);
    for (let j = 0; j < periods.length; j++) {
      const p = periods[j];
      if (!/^[0-9Q-]{4,7}$/.test(p)) throw new Error(`unexpected period ${p}`);
      const v = values[j];
      sql += `${rows ? ',' : ''}(${id},'${p}',${v === null || !Number.isFinite(v) ? 'NULL' : String(v)})`;
      if (++rows === INSERT_ROWS) await flush();
    }
  }
  await flush();
}

/** sha256 of the canonical observations ("period,value" lines): a vintage's checksum. */
export function checksumOf(periods: string[], values: (number | null)[]): string {
  let text = '';
  for (let i = 0; i < periods.length; i++) text += `${periods[i]},${values[i] === null ? '' : String(values[i])}\n`;
  return sha256(text);
}

/** The metadata a vintage was loaded under (code, title, frequency, unit, seasonal adjustment, source). */
export interface VintageMetadata {
  code: string;
  title: string;
  frequency: string;
  unit: string;
  seasonalAdjustment: string;
  source: string;
}

/**
 * Records, in the load's transaction, the series' metadata under which each vintage of the load
 * was stored: later corrections of the series change what new exports say, never old ones.
 */
export async function keepVintageMetadata(trx: Knex.Transaction, loadId: number) {
  await trx.raw(
    `INSERT INTO vintage_metadata (vintage_id, code, title, frequency, unit, seasonal_adjustment, source)
     SELECT v.id, s.code, s.title, s.frequency, s.unit, s.seasonal_adjustment, s.source FROM vintages v JOIN series s ON s.id = v.series_id WHERE v.load_id = ?`,
    [loadId],
  );
}

/** The metadata `vintageId` was loaded under (its series' current metadata if none was recorded). */
export async function vintageMetadata(db: Db | Knex.Transaction, vintageId: number): Promise<VintageMetadata> {
  const row =
    (await db('vintage_metadata').where('vintage_id', vintageId).first()) ??
    (await db('vintages as v').join('series as s', 's.id', 'v.series_id').where('v.id', vintageId).first('s.code', 's.title', 's.frequency', 's.unit', 's.seasonal_adjustment', 's.source'));
  if (!row) throw notFound('The vintage');
  return { code: row.code, title: row.title, frequency: row.frequency, unit: row.unit, seasonalAdjustment: row.seasonal_adjustment, source: row.source };
}
