/**
 * The Catalogue search's index (migration 0070, `series_grams`): the three-character pieces of a
 * search text that every matching series must contain, and the series that hold them: the only
 * ones the LIKE itself then checks.
 */
import type { Knex } from 'knex';
import { fastQuery } from '../../db.js';

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

/** Beyond this many candidates the LIKE over every series costs no more than a list of ids. */
const MAX_CANDIDATES = 2000;

/**
 * The ids of the series whose code or title hold every piece of `q` (a superset of those matching
 * `%q%`), from the index alone; null when `q` has no piece or too many series hold them (check
 * every series). A query of its own: joined into the listing, MariaDB would sort the series rows,
 * notes (TEXT) and all, through a temporary table on disk.
 */
export async function seriesHoldingPieces(db: Knex, q: string): Promise<number[] | null> {
  const pieces = searchPieces(q);
  if (pieces.length === 0) return null;
  const joins = pieces.slice(1).map((_, k) => `JOIN series_grams g${k + 1} ON g${k + 1}.series_id = g0.series_id AND g${k + 1}.gram = ?`);
  const rows = await fastQuery<{ id: number }>(db, `SELECT g0.series_id AS id FROM series_grams g0 ${joins.join(' ')} WHERE g0.gram = ? LIMIT ${MAX_CANDIDATES + 1}`, [...pieces.slice(1), pieces[0]]);
  return rows.length > MAX_CANDIDATES ? null : rows.map((r) => r.id);
}
