/**
 * The review state machine of exhibits:
 *
 *   draft ──submit──▶ in_review ──approve──▶ approved ──publish──▶ published ──withdraw──▶ withdrawn
 *     ▲                  │
 *     └── returned ◀─return (comment required)
 *   returned ──submit──▶ in_review
 *
 * Only the author submits; only editors return, approve, publish or withdraw, and never their
 * own exhibit. Pure: review.ts makes the moves in the database.
 */
import type { PublicUser } from '../../schemas/people.js';
import type { ExhibitState } from '../../schemas/exhibits.js';

export type Move = { to: ExhibitState; from: ExhibitState[]; by: 'author' | 'editor'; comment: 'required' | 'optional'; verb: string };

export const MOVES: Move[] = [
  { to: 'in_review', from: ['draft', 'returned'], by: 'author', comment: 'optional', verb: 'submitted' },
  { to: 'returned', from: ['in_review'], by: 'editor', comment: 'required', verb: 'returned' },
  { to: 'approved', from: ['in_review'], by: 'editor', comment: 'optional', verb: 'approved' },
  { to: 'published', from: ['approved'], by: 'editor', comment: 'optional', verb: 'published' },
  { to: 'withdrawn', from: ['published'], by: 'editor', comment: 'required', verb: 'withdrew' },
];

/** How each state reads in a sentence ("it can be approved only when it is in review"). */
export const STATE_WORDS: Record<ExhibitState, string> = { draft: 'a draft', in_review: 'in review', returned: 'returned', approved: 'approved', published: 'published', withdrawn: 'withdrawn', superseded: 'superseded by its update' };

/** The moves the user may make now (for the buttons on the exhibit page). */
export function allowedMoves(user: PublicUser, row: Record<string, any>) {
  return MOVES.filter((m) => m.from.includes(row.status) && (m.by === 'author' ? row.author_id === user.id && user.roles.includes('economist') : user.roles.includes('editor') && row.author_id !== user.id)).map((m) => ({ to: m.to, comment: m.comment }));
}
