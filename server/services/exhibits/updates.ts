/**
 * Exhibit updates (issue 15). From a published exhibit an economist prepares an update: a new
 * draft linked to it (`update_of`), with the same text, study or panel, chart and chronology, on
 * the newest vintage (an exhibit whose study pins an older vintage gets `vintage_pin`). It goes
 * through review like any exhibit; the Review desk compares it with the published one (diff.ts).
 * Publishing it supersedes the old exhibit: one link row written once, in the same transaction
 * as the publication, and an event on the old exhibit's publication record. The old exhibit's
 * row and snapshot never change; it stays readable at its address and points to its successor.
 */
import type { Knex } from 'knex';
import { conflict, notFound } from '../../lib/errors.js';
import { transaction } from '../../lib/retry.js';
import type { PublicUser } from '../../schemas/people.js';
import type { ExhibitState } from '../../schemas/exhibits.js';
import { audit } from '../audit.js';
import { getStudy } from '../studies/studies.js';
import { STATE_WORDS } from './moves.js';
import { canSee, exhibitRow, getExhibit, type ExhibitDeps } from './read.js';

const OPEN: ExhibitState[] = ['draft', 'in_review', 'returned', 'approved'];

/** The vintage an update draws on: none of its own when its study follows "latest"; otherwise the newest. */
async function updatePin(deps: ExhibitDeps, old: Record<string, any>): Promise<number | null> {
  if (!old.study_id) return null;
  const study = await getStudy(deps.db, old.study_id);
  const pinned: number | null = old.vintage_pin ?? (study.vintage === 'latest' ? null : study.vintage);
  if (pinned === null) return null;
  const latest = await deps.db('vintages').where('series_id', study.seriesId).max({ n: 'number' }).first();
  return Math.max(pinned, Number(latest?.n ?? 0));
}

export async function prepareUpdate(deps: ExhibitDeps, user: PublicUser, id: number, ip?: string) {
  const { db } = deps;
  const old = await exhibitRow(db, id);
  if (!canSee(user, old)) throw notFound('The exhibit');
  if (old.status === 'superseded') throw conflict('already_superseded', `This exhibit was superseded by exhibit ${old.successor_id}; prepare an update of that one.`, { successorId: old.successor_id });
  if (old.status !== 'published') throw conflict('not_published', `Only a published exhibit is updated; this one is ${STATE_WORDS[old.status as ExhibitState]}.`);
  if (!old.study_id && !old.panel_id) throw conflict('exhibit_source_gone', 'The study or panel this exhibit was drafted from no longer exists, so it cannot be recomputed; draft a new exhibit.');
  const open = await db('exhibits').where('update_of', id).whereIn('status', OPEN).first('id');
  if (open) throw conflict('update_in_progress', `An update of this exhibit is already being prepared (exhibit ${open.id}); continue that one.`, { exhibitId: open.id });
  const vintagePin = await updatePin(deps, old);
  const newId = await transaction(db, async (trx) => {
    const [created] = await trx('exhibits').insert({
      author_id: user.id,
      study_id: old.study_id,
      panel_id: old.panel_id,
      title: old.title,
      subtitle: old.subtitle,
      units: old.units,
      source_line: old.source_line,
      notes: old.notes,
      chart_kind: old.chart_kind,
      number_label: old.number_label,
      chronology_id: old.chronology_id,
      status: 'draft',
      update_of: id,
      vintage_pin: vintagePin,
    });
    await trx('exhibit_events').insert({ exhibit_id: created, actor_id: user.id, from_status: null, to_status: 'draft', comment: null, revision: 0 });
    await audit(trx, { actorId: user.id, action: 'exhibit.prepare_update', targetType: 'exhibit', targetId: created, details: { updateOf: id, vintagePin }, ip });
    return created as number;
  });
  return getExhibit(deps, user, newId);
}

/**
 * Inside the transaction that publishes `cur`: when it is an update, its predecessor is
 * superseded (refused when another update superseded it first; nothing to do when it was
 * withdrawn in the meantime — the update then stands on its own).
 */
export async function supersedePredecessor(trx: Knex.Transaction, user: PublicUser, cur: Record<string, any>, ip?: string) {
  if (!cur.update_of) return;
  const prev = await exhibitRow(trx, cur.update_of, true);
  if (prev.status === 'superseded') throw conflict('already_superseded', `Exhibit ${prev.id} was already superseded by exhibit ${prev.successor_id}; this update can no longer replace it.`, { successorId: prev.successor_id });
  if (prev.status !== 'published') return;
  await trx('exhibit_supersessions').insert({ exhibit_id: prev.id, successor_id: cur.id, created_by: user.id });
  await trx('exhibit_events').insert({ exhibit_id: prev.id, actor_id: user.id, from_status: 'published', to_status: 'superseded', comment: null, revision: prev.revision });
  await audit(trx, { actorId: user.id, action: 'exhibit.superseded', targetType: 'exhibit', targetId: prev.id, details: { successor: cur.id }, ip });
}
