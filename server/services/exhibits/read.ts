/**
 * Exhibits as people see them: who may see which (readers: published and withdrawn ones; authors:
 * their own; editors: all but others' drafts), one exhibit with its snapshot and events (readers:
 * its publication record, not its review — views.ts), the list, and the public copy of a
 * published exhibit.
 */
import type { Knex } from 'knex';
import type { Config } from '../../config.js';
import type { AnalysisPool } from '../../workers/pool.js';
import type { Db } from '../../db.js';
import { HttpError, notFound } from '../../lib/errors.js';
import type { Mailer } from '../../mail/mailer.js';
import type { PublicUser } from '../../schemas/people.js';
import type { Exhibit, ExhibitEvent, ExhibitState, ExhibitSummary, PublicExhibit, Snapshot } from '../../schemas/exhibits.js';
import { getSettings } from '../settings.js';
import { allowedMoves } from './moves.js';
import { buildSnapshot } from './snapshots.js';
import { publicCopy, readerView, seesReview } from './views.js';

export interface ExhibitDeps {
  db: Db;
  config: Config;
  mailer: Mailer;
  /** Worker threads for decompositions too slow for the request thread. */
  pool?: AnalysisPool;
}

const iso = (d: Date | string | null) => (d ? new Date(d).toISOString() : null);

/**
 * Exhibit rows with their author and their supersession: a published exhibit whose update was
 * published reads as `superseded` (its own row is never changed; the link is a row of its own).
 */
const rows = (db: Db | Knex.Transaction) =>
  db('exhibits as e')
    .join('users as u', 'u.id', 'e.author_id')
    .leftJoin('exhibit_supersessions as sup', 'sup.exhibit_id', 'e.id')
    .select('e.*', 'u.name as author_name', 'u.email as author_email', 'sup.successor_id');

const withSupersession = <T extends Record<string, any>>(row: T): T => (row.successor_id && row.status === 'published' ? { ...row, status: 'superseded' } : row);

export async function exhibitRow(db: Db | Knex.Transaction, id: number, lock = false) {
  const q = rows(db).where('e.id', id);
  if (lock) q.forUpdate();
  const row = await q.first();
  if (!row) throw notFound('The exhibit');
  return withSupersession(row);
}

/** Who may see which exhibits. Readers: published, superseded and withdrawn ones; authors: their own; editors: all but others' drafts. */
export function canSee(user: PublicUser, row: Record<string, any>) {
  if (row.status === 'published' || row.status === 'withdrawn' || row.status === 'superseded') return true;
  if (row.author_id === user.id || user.roles.includes('admin')) return true;
  if (user.roles.includes('editor') && row.status !== 'draft') return true;
  return false;
}

export async function latestRevision(db: Db | Knex.Transaction, exhibitId: number, number?: number) {
  const q = db('exhibit_revisions').where('exhibit_id', exhibitId);
  if (number) q.where('number', number);
  else q.orderBy('number', 'desc');
  const r = await q.first();
  return r ? { number: r.number as number, snapshot: JSON.parse(r.snapshot) as Snapshot, checksum: r.checksum as string, createdAt: iso(r.created_at) } : null;
}

async function events(db: Db, exhibitId: number): Promise<ExhibitEvent[]> {
  const rows = await db('exhibit_events as ev').leftJoin('users as u', 'u.id', 'ev.actor_id').where('ev.exhibit_id', exhibitId).orderBy('ev.id').select('ev.*', 'u.name as actor_name');
  return rows.map((r) => ({ id: r.id, at: iso(r.at)!, actor: r.actor_id ? { id: r.actor_id, name: r.actor_name } : null, from: r.from_status, to: r.to_status, comment: r.comment, revision: r.revision }));
}

export function summary(row: Record<string, any>): ExhibitSummary {
  return {
    id: row.id,
    title: row.title,
    subtitle: row.subtitle,
    units: row.units,
    sourceLine: row.source_line,
    notes: row.notes,
    chartKind: row.chart_kind,
    number: row.number_label ?? null,
    chronologyId: row.chronology_id ?? null,
    revisionBand: !!row.revision_band,
    status: row.status as ExhibitState,
    revision: row.revision,
    studyId: row.study_id,
    panelId: row.panel_id,
    updateOf: row.update_of ?? null,
    author: { id: row.author_id, name: row.author_name },
    submittedAt: iso(row.submitted_at),
    publishedAt: iso(row.published_at),
    createdAt: iso(row.created_at)!,
    updatedAt: iso(row.updated_at)!,
  };
}

export async function getExhibit(deps: ExhibitDeps, user: PublicUser, id: number): Promise<Exhibit> {
  const { db } = deps;
  const row = await exhibitRow(db, id);
  if (!canSee(user, row)) throw notFound('The exhibit');
  const revision = await latestRevision(db, id);
  const settings = await getSettings(db);
  const editable = (row.status === 'draft' || row.status === 'returned') && row.author_id === user.id;
  // A draft (or a returned exhibit being reworked) shows its live content; otherwise the frozen snapshot.
  const live = editable || (!revision && row.author_id === user.id) ? await buildSnapshot(db, user, row, false, deps.pool).catch((e) => (e instanceof HttpError ? null : Promise.reject(e))) : null;
  const exhibit: Exhibit = {
    ...summary(row),
    snapshot: revision?.snapshot ?? null,
    snapshotChecksum: revision?.checksum ?? null,
    live,
    events: await events(db, id),
    moves: allowedMoves(user, row),
    editable,
    publicUrl: (row.status === 'published' || row.status === 'superseded') && settings.publicExhibitLinks && row.public_slug ? `${deps.config.publicOrigin}/p/${row.public_slug}` : null,
    ...(await lineage(db, user, row)),
  };
  if (seesReview(user, row)) return exhibit;
  // A reader of the published exhibit who is preparing its update sees their own update, nothing else of the review.
  return { ...readerView(exhibit), updatesInProgress: exhibit.updatesInProgress.filter((u) => u.author.id === user.id) };
}

/** An update's predecessor (when the person may see it) and a superseded exhibit's successor. */
async function lineage(db: Db, user: PublicUser, row: Record<string, any>): Promise<Pick<Exhibit, 'predecessor' | 'successor' | 'vintagePin' | 'updatesInProgress'>> {
  let predecessor: Exhibit['predecessor'] = null;
  if (row.update_of) {
    const p = await exhibitRow(db, row.update_of);
    if (canSee(user, p)) predecessor = { id: p.id, title: p.title, status: p.status, publishedAt: iso(p.published_at) };
  }
  let successor: Exhibit['successor'] = null;
  if (row.successor_id) {
    const n = await exhibitRow(db, row.successor_id);
    successor = { id: n.id, title: n.title, publishedAt: iso(n.published_at) };
  }
  // Updates being prepared are work in progress: shown only to those who may see each of them.
  const open = row.status === 'published' ? await rows(db).where('e.update_of', row.id).whereIn('e.status', ['draft', 'in_review', 'returned', 'approved']).orderBy('e.id') : [];
  const updatesInProgress = open.filter((u) => canSee(user, u)).map((u) => ({ id: u.id as number, status: u.status as ExhibitState, author: { id: u.author_id as number, name: u.author_name as string } }));
  return { predecessor, successor, vintagePin: row.vintage_pin ?? null, updatesInProgress };
}

export async function listExhibits(db: Db, user: PublicUser, filter: { status?: string; mine?: boolean }): Promise<ExhibitSummary[]> {
  const q = rows(db).orderBy('e.updated_at', 'desc').limit(500);
  if (filter.status === 'superseded') q.where('e.status', 'published').whereNotNull('sup.successor_id');
  else if (filter.status === 'published') q.where('e.status', 'published').whereNull('sup.successor_id');
  else if (filter.status) q.where('e.status', filter.status);
  if (filter.mine) q.where('e.author_id', user.id);
  const found = (await q).map(withSupersession).filter((r) => canSee(user, r));
  return found.map(summary);
}
export async function publicExhibit(deps: ExhibitDeps, slug: string): Promise<PublicExhibit> {
  const settings = await getSettings(deps.db);
  const found = await rows(deps.db).where('e.public_slug', slug).first();
  const row = found && withSupersession(found);
  if (!settings.publicExhibitLinks || !row || (row.status !== 'published' && row.status !== 'superseded')) throw notFound('The published exhibit');
  const revision = await latestRevision(deps.db, row.id);
  const successor = row.successor_id ? await deps.db('exhibits').where('id', row.successor_id).first('public_slug') : null;
  return publicCopy(row, revision!.snapshot, successor?.public_slug ?? null);
}
