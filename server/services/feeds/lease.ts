/**
 * One run of a feed at a time, across every server instance: a lease row per feed in the
 * database (`feed_leases`), never a flag in a process. A run takes the lease when it is free or
 * expired, renews it while it works, and gives it back at the end. A process that dies mid-run
 * stops renewing, so its lease expires and the next run takes over (and records the dead run as
 * abandoned). The database's clock decides expiry, so instances need not agree on the time.
 *
 * On a Galera cluster two instances taking the same lease on different nodes collide at commit;
 * `transaction()` runs the loser again, which then finds the lease held and gives up.
 */
import { randomBytes } from 'node:crypto';
import os from 'node:os';
import type { Db } from '../../db.js';
import { transaction } from '../../lib/retry.js';

/** A name for one run's hold on a lease: host, process and a random part. */
export function leaseHolder(): string {
  return `${os.hostname().slice(0, 30)}:${process.pid}:${randomBytes(6).toString('hex')}`;
}

/**
 * Takes the feed's lease for `seconds` when nobody holds an unexpired one. With `slot` (a
 * scheduled time) the lease is taken only when no run has started for that time yet, and the slot
 * is recorded with it: a scheduled time runs once, whichever instance reaches it first.
 */
export async function acquireLease(db: Db, feedId: number, holder: string, seconds: number, slot?: Date): Promise<boolean> {
  return transaction(db, async (trx) => {
    const q = trx('feed_leases')
      .where('feed_id', feedId)
      .where((b) => b.whereNull('expires_at').orWhere('expires_at', '<', trx.raw('NOW(3)')));
    if (slot) q.where((b) => b.whereNull('last_slot').orWhere('last_slot', '<', slot));
    const changed = await q.update({ holder, expires_at: trx.raw('NOW(3) + INTERVAL ? SECOND', [seconds]), ...(slot ? { last_slot: slot } : {}) });
    return changed === 1;
  });
}

/** Extends a held lease; false when it was lost (expired and taken by another run). */
export async function renewLease(db: Db, feedId: number, holder: string, seconds: number): Promise<boolean> {
  const changed = await db('feed_leases').where({ feed_id: feedId, holder }).update({ expires_at: db.raw('NOW(3) + INTERVAL ? SECOND', [seconds]) });
  return changed === 1;
}

export async function releaseLease(db: Db, feedId: number, holder: string): Promise<void> {
  await db('feed_leases').where({ feed_id: feedId, holder }).update({ holder: null, expires_at: null });
}

/** Who holds the feed's lease now, if anyone (an expired lease is nobody's). */
export async function leaseHeld(db: Db, feedId: number): Promise<{ holder: string; expiresAt: Date } | null> {
  const row = await db('feed_leases').where('feed_id', feedId).where('expires_at', '>=', db.raw('NOW(3)')).first();
  return row?.holder ? { holder: row.holder, expiresAt: new Date(row.expires_at) } : null;
}

/** Renews the lease every third of its length until `stop()`; `lost()` says whether a renewal failed. */
export function keepLease(db: Db, feedId: number, holder: string, seconds: number) {
  let lost = false;
  const timer = setInterval(() => {
    renewLease(db, feedId, holder, seconds).then(
      (ok) => void (lost ||= !ok),
      () => {},
    );
  }, Math.max(1000, (seconds * 1000) / 3));
  timer.unref();
  return { stop: () => clearInterval(timer), lost: () => lost };
}
