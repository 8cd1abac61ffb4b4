/**
 * Release alerts that survive a crash. A load queues the job of its alerts in the transaction that
 * stores its vintages (`queueReleaseAlerts`), and after the commit the same process delivers it
 * (`deliverSoon`). A job is claimed for a while before its mails go and marked done after; a
 * server that stops in between leaves it unfinished, and the sweep (`startAlertSweeper`, at start
 * and every minute, on every instance) delivers it once its claim has run out. Delivery is at
 * least once: mails already sent by a server that died before marking the job done go again.
 *
 * Example: inside a load's transaction `const job = await queueReleaseAlerts(trx, landed)`; after
 * the commit `deliverSoon(deps, job)`.
 */
import os from 'node:os';
import type { Knex } from 'knex';
import type { Db } from '../../db.js';
import { sendReleaseAlerts, type AlertDeps, type VintagesLanded } from './landed.js';

/** How long a claim keeps other instances off a job: far longer than computing and sending its mails takes. */
const CLAIM_SECONDS = 600;
/** After a failed attempt, how long before a sweep tries again. */
const RETRY_SECONDS = 120;
/** A job that failed this often is left for a person to read in the log. */
const MAX_ATTEMPTS = 5;

const holder = `${os.hostname().slice(0, 40)}:${process.pid}`;

/** Writes the job of a release's alerts in the caller's transaction; returns its id. */
export async function queueReleaseAlerts(trx: Knex.Transaction, landed: VintagesLanded): Promise<number> {
  const [id] = await trx('alert_jobs').insert({ payload: JSON.stringify(landed) });
  return id as number;
}

/** Takes the job when nobody holds an unexpired claim on it and it is not done; false otherwise. */
async function claim(db: Db, id: number): Promise<boolean> {
  const changed = await db('alert_jobs')
    .where({ id })
    .whereNull('done_at')
    .where('attempts', '<', MAX_ATTEMPTS)
    .where((q) => q.whereNull('claimed_until').orWhere('claimed_until', '<', db.raw('NOW(3)')))
    .update({ claimed_by: holder, claimed_until: db.raw('NOW(3) + INTERVAL ? SECOND', [CLAIM_SECONDS]), attempts: db.raw('attempts + 1') });
  return changed === 1;
}

/** Delivers one job if it can be claimed: computes and sends its mails, then marks it done. */
export async function deliverJob(deps: AlertDeps, id: number): Promise<boolean> {
  const { db } = deps;
  if (!(await claim(db, id))) return false;
  const row = await db('alert_jobs').where({ id }).first('payload');
  try {
    await sendReleaseAlerts(deps, JSON.parse(row.payload) as VintagesLanded);
    await db('alert_jobs').where({ id }).update({ done_at: db.raw('NOW(3)'), claimed_until: null, last_error: null });
    return true;
  } catch (error) {
    const message = String((error as Error)?.message ?? error).slice(0, 500);
    await db('alert_jobs').where({ id }).update({ claimed_until: db.raw('NOW(3) + INTERVAL ? SECOND', [RETRY_SECONDS]), last_error: message });
    throw error;
  }
}

/** After the commit: delivers the job now, after the answer (lib/background.ts). */
export function deliverSoon(deps: AlertDeps, id: number): void {
  deps.background.run('release alerts', () => deliverJob(deps, id));
}

/** Delivers every job that is due (unfinished, unclaimed or its claim run out); returns how many it delivered. */
export async function sweepReleaseAlerts(deps: AlertDeps): Promise<number> {
  const due: { id: number }[] = await deps.db('alert_jobs')
    .whereNull('done_at')
    .where('attempts', '<', MAX_ATTEMPTS)
    .where((q) => q.whereNull('claimed_until').orWhere('claimed_until', '<', deps.db.raw('NOW(3)')))
    .orderBy('id')
    .limit(50)
    .select('id');
  let delivered = 0;
  for (const { id } of due) {
    try {
      if (await deliverJob(deps, id)) delivered++;
    } catch (error) {
      deps.logger?.error({ err: error, job: id }, 'release alerts failed; a later sweep tries again');
    }
  }
  return delivered;
}

/** Sweeps at start and every minute until `stop()` (a sweep in progress finishes). */
export function startAlertSweeper(deps: AlertDeps, everyMs = 60_000): { stop(): Promise<void> } {
  let running: Promise<unknown> = Promise.resolve();
  const sweep = () => {
    running = sweepReleaseAlerts(deps).catch((error) => deps.logger?.warn({ err: error }, 'release alert sweep skipped; the next one tries again'));
  };
  sweep();
  const timer = setInterval(sweep, everyMs);
  timer.unref();
  return {
    async stop() {
      clearInterval(timer);
      await running;
    },
  };
}
