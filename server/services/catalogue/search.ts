/**
 * The Catalogue search's index (migration 0070, `series_grams`): the three-character pieces of a
 * search text that every matching series must contain, and the filter that narrows a query of
 * `series as s` to the series holding them before the LIKE itself is checked.
 */
import type { Knex } from 'knex';

/** At most this many pieces are looked up: each is one primary-key range, the LIKE does the rest. */
const MAX_PIECES = 4;

/**
 * The pieces of `q` that any code or title matching `%q%` contains: three consecutive characters
 * (code points, as MariaDB counts them) of a run between LIKE wildcards (`%`, `_`). Empty when `q`
 * has no run of three characters or holds the LIKE escape character, and then every series is
 * checked as before.
 */
export function searchPieces(q: string): string[] {
  if (q.includes('\\')) return [];
  const pieces = new Set<string>();
  for (const run of q.split(/[%_]/)) {
    const chars = Array.from(run);
    for (let i = 0; i + 3 <= chars.length; i++) pieces.add(chars.slice(i, i + 3).join(''));
  }
  const all = [...pieces];
  if (all.length <= MAX_PIECES) return all;
  // Spread over the text: its first and last pieces and some between.
  return Array.from({ length: MAX_PIECES }, (_, k) => all[Math.round((k * (all.length - 1)) / (MAX_PIECES - 1))]);
}

/** Narrows `query` (over `series as s`) to the series whose code or title hold every piece of `q`. */
export function whereHoldsPieces(db: Knex, query: Knex.QueryBuilder, q: string) {
  const pieces = searchPieces(q);
  if (pieces.length === 0) return;
  const candidates = db('series_grams as g0').where('g0.gram', pieces[0]).select('g0.series_id');
  pieces.slice(1).forEach((piece, k) => candidates.join(`series_grams as g${k + 1}`, (j) => j.on(`g${k + 1}.series_id`, 'g0.series_id').andOnVal(`g${k + 1}.gram`, piece)));
  query.whereIn('s.id', candidates);
}
