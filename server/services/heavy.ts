/**
 * Heavy requests and the per-account budget (README, "Guarantees"). A decomposition request is
 * heavy when it carries more than HEAVY_VALUES values (one unit per started 100 000 values, a
 * stored series counting as STORED_ITEM_VALUES, charged when it is admitted) or when its
 * computation takes a second or more (one unit per started second, charged when it is done, less
 * what its size already cost). Each account may spend `heavyUnitsPerMinute` units in any minute;
 * beyond that, every decomposition request of that account gets 429 with Retry-After. A single
 * request larger than the whole budget is admitted when the account has spent nothing in the
 * minute, so every request the API accepts can run. The spending lives in the database, so the
 * budget holds across server instances (requests arriving at the same instant may all pass).
 */
import type { Db } from '../db.js';
import { HttpError } from '../lib/errors.js';

/** Above this many values a decomposition request is heavy. */
export const HEAVY_VALUES = 100_000;
/** Values counted for one stored series in a batch (it is read from the database, size unknown here). */
export const STORED_ITEM_VALUES = 500;
const UNIT_VALUES = 100_000;
const WINDOW_MS = 60_000;

/** The units a request of `values` values costs (0: not heavy). */
export function heavyUnits(values: number): number {
  return values > HEAVY_VALUES ? Math.ceil(values / UNIT_VALUES) : 0;
}

/** Admits a decomposition request costing `units` by its size (0 if small) for `userId`, or answers 429 with Retry-After. */
export async function admitHeavy(db: Db, budget: number, userId: number, units: number): Promise<void> {
  const since = new Date(Date.now() - WINDOW_MS);
  const spent = await db('heavy_requests').where('user_id', userId).andWhere('at', '>', since).orderBy('at', 'asc').select('units', 'at');
  let used = spent.reduce((n, r) => n + Number(r.units), 0);
  if (used > 0 && used + units > budget) {
    // Wait until enough of the spending leaves the window.
    let free = Date.now();
    for (const r of spent) {
      used -= Number(r.units);
      free = new Date(r.at).getTime() + WINDOW_MS;
      if (used === 0 || used + units <= budget) break;
    }
    const retry = Math.max(1, Math.ceil((free - Date.now()) / 1000));
    throw new HttpError(
      429,
      'too_many_heavy_requests',
      `This account has used its budget of large decompositions for the minute (${budget} units of 100 000 values). Try again in ${retry} s, or send smaller requests.`,
      { retryAfterSeconds: retry, budgetUnits: budget, requestUnits: units },
      { 'Retry-After': String(retry) },
    );
  }
  if (units > 0) await charge(db, userId, units);
}

/** Charges a finished computation of `ms` milliseconds: a unit per started second, less `paid` (its size's units). */
export async function chargeCompute(db: Db, userId: number, ms: number, paid: number): Promise<void> {
  const units = ms >= 1000 ? Math.ceil(ms / 1000) - paid : 0;
  if (units > 0) await charge(db, userId, units);
}

async function charge(db: Db, userId: number, units: number) {
  await db('heavy_requests').insert({ user_id: userId, units });
  await db('heavy_requests').where('user_id', userId).andWhere('at', '<', new Date(Date.now() - 60 * WINDOW_MS)).delete();
}
