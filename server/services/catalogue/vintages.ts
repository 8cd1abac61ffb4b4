/** Vintages (immutable releases of a series) and their observations as stored. */
import type { Knex } from 'knex';
import type { Db } from '../../db.js';
import { badRequest, notFound } from '../../lib/errors.js';
import { sha256 } from '../../lib/secrets.js';
import type { Vintage } from '../../schemas/catalogue.js';
import { toVintage } from './rows.js';
import { getSeries } from './series.js';

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
