/**
 * Feeds as stored: registering, changing and removing one (checked against the Catalogue and the
 * People), listing them with their last run, and rows turned into the answers of server/schemas/feeds.ts. A feed's
 * header values (API keys) are kept for its fetches and never answered again.
 */
import type { Knex } from 'knex';
import type { Db } from '../../db.js';
import { badRequest, conflict, notFound } from '../../lib/errors.js';
import { transaction } from '../../lib/retry.js';
import { latestSlot, nextRuns, scheduleInWords, type CreateFeedBody, type Feed, type FeedRun, type UpdateFeedBody } from '../../schemas/feeds.js';
import { audit } from '../audit.js';
import { iso } from '../catalogue/rows.js';

/** A feed as the run needs it, with its header values. */
export interface StoredFeed {
  id: number;
  name: string;
  url: string;
  mappings: { key: string; series: string }[];
  headers: { name: string; value: string }[];
  schedule: string | null;
  enabled: boolean;
  stewardId: number;
  createdAt: Date;
}

const parse = <T>(text: string | null, fallback: T): T => {
  if (!text) return fallback;
  try {
    return JSON.parse(text) as T;
  } catch {
    return fallback;
  }
};

export function toStoredFeed(r: Record<string, any>): StoredFeed {
  return {
    id: r.id,
    name: r.name,
    url: r.url,
    mappings: parse(r.mappings, []),
    headers: parse(r.headers, []),
    schedule: r.schedule,
    enabled: !!r.enabled,
    stewardId: r.steward_id,
    createdAt: new Date(r.created_at),
  };
}

export function toRun(r: Record<string, any>): FeedRun {
  return {
    id: r.id,
    feedId: r.feed_id,
    trigger: r.trigger,
    outcome: r.outcome,
    startedAt: iso(r.started_at)!,
    finishedAt: iso(r.finished_at),
    durationMs: r.duration_ms,
    message: r.message,
    loadId: r.load_id,
    vintages: parse(r.vintages, []),
    problems: parse(r.problems, []),
    startedBy: r.starter_name ?? null,
  };
}

export async function getStoredFeed(db: Db | Knex.Transaction, id: number): Promise<StoredFeed> {
  const row = await db('feeds').where({ id }).first();
  if (!row) throw notFound(`Feed ${id}`);
  return toStoredFeed(row);
}

async function answerFeeds(db: Db, rows: Record<string, any>[]): Promise<Feed[]> {
  if (!rows.length) return [];
  const ids = rows.map((r) => r.id);
  const last = await db('feed_runs as r')
    .leftJoin('users as u', 'u.id', 'r.started_by')
    .whereIn('r.id', db('feed_runs').whereIn('feed_id', ids).groupBy('feed_id').max('id'))
    .select('r.*', 'u.name as starter_name');
  const lastBy = new Map(last.map((r) => [r.feed_id, toRun(r)]));
  return rows.map((r) => {
    const f = toStoredFeed(r);
    const next = f.enabled && f.schedule ? nextRuns(f.schedule, 1)[0] : undefined;
    return {
      id: f.id,
      name: f.name,
      url: f.url,
      mappings: f.mappings,
      headers: f.headers.map((h) => ({ name: h.name })),
      schedule: f.schedule,
      scheduleWords: scheduleInWords(f.schedule),
      nextRunAt: next ? next.toISOString() : null,
      enabled: f.enabled,
      steward: { id: r.steward_id, name: r.steward_name, email: r.steward_email },
      createdAt: iso(r.created_at)!,
      lastRun: lastBy.get(f.id) ?? null,
    };
  });
}

const feedRows = (db: Db) => db('feeds as f').join('users as s', 's.id', 'f.steward_id').select('f.*', 's.name as steward_name', 's.email as steward_email');

export async function listFeeds(db: Db): Promise<Feed[]> {
  return answerFeeds(db, await feedRows(db).orderBy('f.name'));
}

export async function getFeed(db: Db, id: number): Promise<Feed> {
  const rows = await feedRows(db).where('f.id', id);
  if (!rows.length) throw notFound(`Feed ${id}`);
  return (await answerFeeds(db, rows))[0];
}

/** The mappings with each series code as the Catalogue spells it; 400 naming the codes it lacks. */
async function catalogueMappings(db: Db, mappings: { key: string; series: string }[]) {
  const codes = mappings.map((m) => m.series.toUpperCase());
  const found: { code: string }[] = await db('series').whereIn(db.raw('UPPER(code)') as never, codes).select('code');
  const known = new Map(found.map((s) => [s.code.toUpperCase(), s.code]));
  const missing = mappings.map((m, i) => ({ m, i })).filter(({ m }) => !known.has(m.series.toUpperCase()));
  if (missing.length) {
    throw badRequest(
      'unknown_series',
      `No series in the Catalogue has the code ${missing.map(({ m }) => m.series).join(', ')}; define ${missing.length === 1 ? 'it' : 'them'} first, or choose another.`,
      missing.map(({ m, i }) => ({ path: `mappings.${i}.series`, message: `no series ${m.series}` })),
    );
  }
  return mappings.map((m) => ({ key: m.key, series: known.get(m.series.toUpperCase())! }));
}

/** 400 unless `stewardId` is an active person with the steward role. */
async function checkSteward(db: Db, stewardId: number) {
  const isSteward = await db('user_roles as r').join('users as u', 'u.id', 'r.user_id').where({ 'r.user_id': stewardId, 'r.role': 'steward' }).where('u.status', 'active').first();
  if (!isSteward) throw badRequest('not_a_steward', 'The feed’s steward must be a person with the steward role; failures are mailed to them.', [{ path: 'stewardId', message: 'not a steward' }]);
}

async function checkName(db: Db, name: string, except?: number) {
  const q = db('feeds').where({ name });
  if (except) q.whereNot('id', except);
  if (await q.first()) throw badRequest('duplicate_name', `A feed is already called “${name}”; choose another name.`, [{ path: 'name', message: 'name taken' }]);
}

/** Registers a feed: its series must be in the Catalogue and its steward must hold the steward role. */
export async function createFeed(db: Db, actorId: number, body: CreateFeedBody, ip?: string): Promise<Feed> {
  const mappings = await catalogueMappings(db, body.mappings);
  const stewardId = body.stewardId ?? actorId;
  await checkSteward(db, stewardId);
  await checkName(db, body.name);
  const id = await transaction(db, async (trx) => {
    const [feedId] = await trx('feeds').insert({
      name: body.name,
      url: body.url,
      mappings: JSON.stringify(mappings),
      headers: JSON.stringify(body.headers),
      schedule: body.schedule,
      enabled: body.enabled,
      steward_id: stewardId,
      created_by: actorId,
    });
    await trx('feed_leases').insert({ feed_id: feedId, holder: null, expires_at: null, last_slot: null });
    await audit(trx, { actorId, action: 'feed.create', targetType: 'feed', targetId: feedId, details: { name: body.name, url: body.url, series: mappings.length }, ip });
    return feedId as number;
  });
  return getFeed(db, id);
}

/**
 * Changes a feed (checked as at registration). A feed resumed, or given a new schedule, runs at
 * its next scheduled time, not at once for a time that passed while it was paused.
 */
export async function updateFeed(db: Db, actorId: number, id: number, body: UpdateFeedBody, ip?: string): Promise<Feed> {
  const before = await getStoredFeed(db, id);
  const mappings = body.mappings ? await catalogueMappings(db, body.mappings) : undefined;
  if (body.stewardId !== undefined) await checkSteward(db, body.stewardId);
  if (body.name !== undefined) await checkName(db, body.name, id);
  const change = {
    ...(body.name !== undefined ? { name: body.name } : {}),
    ...(body.url !== undefined ? { url: body.url } : {}),
    ...(mappings ? { mappings: JSON.stringify(mappings) } : {}),
    ...(body.headers ? { headers: JSON.stringify(body.headers) } : {}),
    ...(body.schedule !== undefined ? { schedule: body.schedule } : {}),
    ...(body.stewardId !== undefined ? { steward_id: body.stewardId } : {}),
    ...(body.enabled !== undefined ? { enabled: body.enabled } : {}),
  };
  const schedule = body.schedule !== undefined ? body.schedule : before.schedule;
  // Resumed (it was paused) or given another schedule: its next time counts, not one that passed.
  const restart = schedule && ((body.enabled === true && !before.enabled) || (body.schedule !== undefined && body.schedule !== before.schedule));
  await transaction(db, async (trx) => {
    await trx('feeds').where({ id }).update(change);
    if (restart) await trx('feed_leases').where('feed_id', id).update({ last_slot: latestSlot(schedule, new Date()) });
    // Which fields changed, never the header values.
    await audit(trx, { actorId, action: 'feed.update', targetType: 'feed', targetId: id, details: { fields: Object.keys(body).filter((k) => body[k as keyof UpdateFeedBody] !== undefined) }, ip });
  });
  return getFeed(db, id);
}

/** Removes a feed and its run records (the vintages its runs stored stay); 409 while it runs. */
export async function deleteFeed(db: Db, actorId: number, id: number, ip?: string): Promise<void> {
  const feed = await getStoredFeed(db, id);
  await transaction(db, async (trx) => {
    // The database's clock decides whether a lease has run out, as everywhere else (lease.ts).
    const lease = await trx('feed_leases').where('feed_id', id).whereNotNull('holder').where('expires_at', '>', trx.raw('NOW(3)')).forUpdate().first();
    if (lease) throw conflict('feed_running', `“${feed.name}” is running now; delete it once the run has finished.`);
    await trx('feeds').where({ id }).delete();
    await audit(trx, { actorId, action: 'feed.delete', targetType: 'feed', targetId: id, details: { name: feed.name, url: feed.url }, ip });
  });
}

export async function listRuns(db: Db, feedId: number, limit = 100): Promise<FeedRun[]> {
  await getStoredFeed(db, feedId);
  const rows = await db('feed_runs as r').leftJoin('users as u', 'u.id', 'r.started_by').where('r.feed_id', feedId).orderBy('r.id', 'desc').limit(limit).select('r.*', 'u.name as starter_name');
  return rows.map(toRun);
}
