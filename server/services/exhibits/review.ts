/** Moves of the review state machine (moves.ts) made in the database, and the Review desk queue. */
import { badRequest, conflict, forbidden } from '../../lib/errors.js';
import { randomToken } from '../../lib/secrets.js';
import type { PublicUser, Role } from '../../schemas/people.js';
import type { ExhibitState } from '../../schemas/exhibits.js';
import { audit } from '../audit.js';
import { notify } from './mail.js';
import { MOVES, STATE_WORDS } from './moves.js';
import { canSee, exhibitRow, getExhibit, summary, type ExhibitDeps } from './read.js';
import { buildSnapshot, snapshotChecksum } from './snapshots.js';
import { transaction } from '../../lib/retry.js';
import { supersedePredecessor } from './updates.js';

export async function transition(deps: ExhibitDeps, user: PublicUser, id: number, to: ExhibitState, comment: string | undefined, ip?: string) {
  const { db } = deps;
  const move = MOVES.find((m) => m.to === to);
  const first = await exhibitRow(db, id);
  if (to === 'superseded') throw conflict('move_not_allowed', 'An exhibit is superseded when its update is published: prepare an update of it instead.');
  if (!move) throw conflict('move_not_allowed', `No move leads back to ${STATE_WORDS[to]}.`);
  const needs: Role = move.by === 'author' ? 'economist' : 'editor';
  if (!user.roles.includes(needs)) throw forbidden('role_required', `This needs the ${needs} role.`, { roles: [needs] });
  if (!canSee(user, first)) throw forbidden('not_allowed', move.by === 'author' ? 'Only the author submits this exhibit.' : 'This exhibit is not in review.');
  const row = await transaction(db, async (trx) => {
    const cur = await exhibitRow(trx, id, true);
    if (!move.from.includes(cur.status)) {
      throw conflict('move_not_allowed', `The exhibit is ${STATE_WORDS[cur.status as ExhibitState]}; it can be ${move.verb} only when it is ${move.from.map((f) => STATE_WORDS[f]).join(' or ')}.`);
    }
    if (move.by === 'author' && cur.author_id !== user.id) throw forbidden('not_author', `Only ${cur.author_name}, the author, submits this exhibit.`);
    if (move.by === 'editor' && cur.author_id === user.id) throw forbidden('own_exhibit', 'Nobody reviews, approves, publishes or withdraws their own exhibit; another editor must.');
    if (move.comment === 'required' && !comment) throw badRequest('comment_required', to === 'withdrawn' ? 'Give the reason for withdrawing the exhibit.' : 'Say what the author should change: a comment is required.');
    const change: Record<string, unknown> = { status: to, updated_at: new Date() };
    let revision = cur.revision as number;
    if (to === 'in_review') {
      const snap = await buildSnapshot(db, user, cur, true, deps.pool);
      revision += 1;
      await trx('exhibit_revisions').insert({ exhibit_id: id, number: revision, snapshot: JSON.stringify(snap), checksum: snapshotChecksum(snap), created_by: user.id });
      change.revision = revision;
      change.submitted_at = new Date();
    }
    if (to === 'published') {
      change.published_at = new Date();
      change.public_slug = cur.public_slug ?? randomToken(16);
      await supersedePredecessor(trx, user, cur, ip);
    }
    await trx('exhibits').where('id', id).update(change);
    await trx('exhibit_events').insert({ exhibit_id: id, actor_id: user.id, from_status: cur.status, to_status: to, comment: comment ?? null, revision });
    await audit(trx, { actorId: user.id, action: `exhibit.${to}`, targetType: 'exhibit', targetId: id, details: { from: cur.status, revision }, ip });
    return { ...cur, status: to };
  });
  await notify(deps, user, row, to, comment);
  return getExhibit(deps, user, id);
}



/** In-review exhibits, oldest first, with what changed since the last revision an editor saw. */
export async function reviewQueue(deps: ExhibitDeps, user: PublicUser) {
  const rows = await deps.db('exhibits as e').join('users as u', 'u.id', 'e.author_id').where('e.status', 'in_review').orderBy('e.submitted_at', 'asc').select('e.*', 'u.name as author_name');
  return rows.map((r) => ({ ...summary(r), own: r.author_id === user.id }));
}
