/**
 * The reference chronology: the institution's own dated peaks and troughs per economy or area,
 * kept by administrators and editors; a starting point from the Harding–Pagan dates of a series;
 * and the stamp (name and contractions) that exhibits freeze.
 */
import type { Knex } from 'knex';
import { turningPoints } from '../analysis/index.js';
import type { Db } from '../db.js';
import { badRequest, conflict, notFound } from '../lib/errors.js';
import { transaction } from '../lib/retry.js';
import { checkTurns, contractions, type Chronology, type ChronologyBody, type ChronologyStamp, type Turn } from '../schemas/chronology.js';
import type { PublicUser } from '../schemas/people.js';
import { audit } from './audit.js';
import { readSeriesValues } from './catalogue/stored-values.js';

const iso = (d: Date | string) => new Date(d).toISOString();

async function turnsOf(db: Db | Knex.Transaction, ids: number[]) {
  const rows = ids.length ? await db('chronology_turns').whereIn('chronology_id', ids).select('chronology_id', 'period', 'type') : [];
  const by = new Map<number, Turn[]>();
  for (const r of rows) by.set(r.chronology_id, [...(by.get(r.chronology_id) ?? []), { period: r.period, type: r.type }]);
  for (const list of by.values()) list.sort((a, b) => a.period.localeCompare(b.period));
  return by;
}

function toChronology(r: Record<string, any>, turns: Turn[]): Chronology {
  return { id: r.id, name: r.name, area: r.area, notes: r.notes, turns, updatedBy: r.updated_by ? { id: r.updated_by, name: r.updated_by_name } : null, updatedAt: iso(r.updated_at) };
}

const base = (db: Db | Knex.Transaction) => db('chronologies as c').leftJoin('users as u', 'u.id', 'c.updated_by').select('c.*', 'u.name as updated_by_name');

export async function listChronologies(db: Db): Promise<Chronology[]> {
  const rows = await base(db).orderBy('c.area').orderBy('c.name');
  const turns = await turnsOf(db, rows.map((r) => r.id));
  return rows.map((r) => toChronology(r, turns.get(r.id) ?? []));
}

export async function getChronology(db: Db | Knex.Transaction, id: number): Promise<Chronology> {
  const row = await base(db).where('c.id', id).first();
  if (!row) throw notFound('The reference chronology');
  return toChronology(row, (await turnsOf(db, [id])).get(id) ?? []);
}

function checked(turns: Turn[] | undefined) {
  if (!turns) return;
  const problem = checkTurns(turns);
  if (problem) throw badRequest('invalid_turns', problem);
}

async function writeTurns(trx: Knex.Transaction, id: number, turns: Turn[]) {
  await trx('chronology_turns').where('chronology_id', id).delete();
  if (turns.length) await trx('chronology_turns').insert(turns.map((t) => ({ chronology_id: id, period: t.period, type: t.type })));
}

async function uniqueName(db: Db | Knex.Transaction, name: string, except?: number) {
  const q = db('chronologies').where('name', name);
  if (except) q.whereNot('id', except);
  if (await q.first('id')) throw conflict('duplicate_name', `A reference chronology named “${name}” exists already; choose another name.`);
}

export async function createChronology(db: Db, user: PublicUser, body: ChronologyBody, ip?: string) {
  checked(body.turns);
  const id = await transaction(db, async (trx) => {
    await uniqueName(trx, body.name);
    const [newId] = await trx('chronologies').insert({ name: body.name, area: body.area, notes: body.notes || null, updated_by: user.id });
    await writeTurns(trx, newId, body.turns);
    await audit(trx, { actorId: user.id, action: 'chronology.create', targetType: 'chronology', targetId: newId, details: { name: body.name, turns: body.turns.length }, ip });
    return newId;
  });
  return getChronology(db, id);
}

export async function updateChronology(db: Db, user: PublicUser, id: number, body: Partial<ChronologyBody>, ip?: string) {
  checked(body.turns);
  await transaction(db, async (trx) => {
    const row = await trx('chronologies').where('id', id).forUpdate().first();
    if (!row) throw notFound('The reference chronology');
    if (body.name) await uniqueName(trx, body.name, id);
    const change: Record<string, unknown> = { updated_by: user.id, updated_at: new Date() };
    if (body.name !== undefined) change.name = body.name;
    if (body.area !== undefined) change.area = body.area;
    if (body.notes !== undefined) change.notes = body.notes || null;
    await trx('chronologies').where('id', id).update(change);
    if (body.turns) await writeTurns(trx, id, body.turns);
    await audit(trx, { actorId: user.id, action: 'chronology.update', targetType: 'chronology', targetId: id, details: { fields: Object.keys(body) }, ip });
  });
  return getChronology(db, id);
}

export async function deleteChronology(db: Db, user: PublicUser, id: number, ip?: string) {
  await transaction(db, async (trx) => {
    await getChronology(trx, id);
    // Exhibits keep what they froze; drafts simply lose the shading.
    await trx('chronologies').where('id', id).delete();
    await audit(trx, { actorId: user.id, action: 'chronology.delete', targetType: 'chronology', targetId: id, ip });
  });
}

/**
 * A starting point: the Harding–Pagan peaks and troughs of a series' level (in logs when every
 * value is positive), with the rules of its frequency (server/analysis/stats.ts). Nothing is
 * stored: the page shows the dates and the person saves what they keep.
 */
export async function hardingPaganTurns(db: Db, seriesId: number, vintage: number | 'latest') {
  const data = await readSeriesValues(db, seriesId, vintage);
  const positive = data.values.every((v) => v === null || v > 0);
  const level = Float64Array.from(data.values, (v) => (v === null ? NaN : positive ? 100 * Math.log(v) : v));
  const turns: Turn[] = turningPoints(level, data.series.frequency).map((t) => ({ period: data.periods[t.index], type: t.type }));
  return { series: { id: data.series.id, code: data.series.code, frequency: data.series.frequency }, vintage: data.vintage.number, turns, note: 'Harding–Pagan dates of the series’ level: a starting point to review, not the institution’s chronology until saved.' };
}

/** What an exhibit freezes of a chronology. */
export async function chronologyStamp(db: Db, id: number | null | undefined): Promise<ChronologyStamp | null> {
  if (!id) return null;
  const c = await getChronology(db, id).catch(() => null);
  return c ? { id: c.id, name: c.name, area: c.area, contractions: contractions(c.turns) } : null;
}
