/**
 * Release alerts that survive a crash. A load queues the job of its alerts in the transaction that
 * stores its vintages (`queueReleaseAlerts`), and after the commit the same process delivers it
 * (`deliverSoon`). A job is claimed for a while before its mails go and marked done after; a
 * server that stops in between leaves it unfinished, and the sweep (`startAlertSweeper`, at start
 * and every minute, on every instance) delivers it once its claim has run out. A mail the mail
 * server does not take is tried again by a later sweep; the addresses already served are kept
 * with the job and not mailed twice. A server that dies between a mail and that record may send
 * that one mail again: delivery is at least once.
 *
 * Example: inside a load's transaction `const job = await queueReleaseAlerts(trx, landed)`; after
 * the commit `deliverSoon(deps, job)`.
 */
import os from 'node:os';
import type { Knex } from 'knex';
import type { Db } from '../../db.js';
import { isDeadlock } from '../../lib/retry.js';
import { sendReleaseAlerts, type AlertDeps, type VintagesLanded } from './landed.js';

/** How long a claim keeps other instances off a job: far longer than computing and sending its mails takes. */
const CLAIM_SECONDS = 600;
/** After a failed attempt, how long before a sweep tries again. */
const RETRY_SECONDS = 120;
/** A job that failed this often is given up (and says so in the log). */
const MAX_ATTEMPTS = 5;
/** Delivered jobs are kept this long (what was sent, for a person reading the table), then removed. */
const KEEP_DAYS = 30;

const holder = `${os.hostname().slice(0, 40)}:${process.pid}`;

/** A job as stored: the release, and the addresses already mailed by an earlier attempt. */
type Payload = VintagesLanded & { served?: string[] };

/** Writes the job of a release's alerts in the caller's transaction; returns its id. */
export async function queueReleaseAlerts(trx: Knex.Transaction, landed: VintagesLanded): Promise<number> {
  const [id] = await trx('alert_jobs').insert({ payload: JSON.stringify(landed) });
  return id as number;
}

/** Takes the job when nobody holds an unexpired claim on it and it is not done; false otherwise (another instance took it). */
async function claim(db: Db, id: number): Promise<boolean> {
  try {
    const changed = await db('alert_jobs')
      .where({ id })
      .whereNull('done_at')
      .where('attempts', '<', MAX_ATTEMPTS)
      .where((q) => q.whereNull('claimed_until').orWhere('claimed_until', '<', db.raw('NOW(3)')))
      .update({ claimed_by: holder, claimed_until: db.raw('NOW(3) + INTERVAL ? SECOND', [CLAIM_SECONDS]), attempts: db.raw('attempts + 1') });
    return changed === 1;
  } catch (error) {
    // Two instances claiming the same job on different nodes of a cluster: one loses, as if it came second.
    if (isDeadlock(error)) return false;
    throw error;
  }
}

/** Delivers one job if it can be claimed: computes and sends its mails, then marks it done. */
export async function deliverJob(deps: AlertDeps, id: number): Promise<boolean> {
  const { db } = deps;
  if (!(await claim(db, id))) return false;
  const row = await db('alert_jobs').where({ id }).first('payload', 'attempts');
  const payload = JSON.parse(row.payload) as Payload;
  const mine = () => db('alert_jobs').where({ id, claimed_by: holder });
  try {
    const { sent, failed } = await sendReleaseAlerts(deps, payload, new Set(payload.served ?? []));
    const served = [...(payload.served ?? []), ...sent.map((s) => s.to)];
    if (failed.length && deps.mailer.enabled) {
      await mine().update({ payload: JSON.stringify({ ...payload, served }), claimed_until: db.raw('NOW(3) + INTERVAL ? SECOND', [RETRY_SECONDS]), last_error: `the mail server did not take ${failed.length} of ${failed.length + sent.length} messages` });
      if (row.attempts >= MAX_ATTEMPTS) deps.logger?.error({ job: id, failed: failed.length }, 'release alerts given up after five attempts');
      return false;
    }
    await mine().update({ payload: JSON.stringify({ ...payload, served }), done_at: db.raw('NOW(3)'), claimed_until: null, last_error: null });
    return true;
  } catch (error) {
    const message = String((error as Error)?.message ?? error).slice(0, 500);
    await mine().update({ claimed_until: db.raw('NOW(3) + INTERVAL ? SECOND', [RETRY_SECONDS]), last_error: message });
    if (row.attempts >= MAX_ATTEMPTS) deps.logger?.error({ job: id, err: error }, 'release alerts given up after five attempts');
    throw error;
  }
}

/** After the commit: delivers the job now, after the answer (lib/background.ts). */
export function deliverSoon(deps: AlertDeps, id: number): void {
  deps.background.run('release alerts', () => deliverJob(deps, id));
}

/** Delivers every job that is due (unfinished, unclaimed or its claim run out) and removes old delivered ones; returns how many it delivered. */
export async function sweepReleaseAlerts(deps: AlertDeps): Promise<number> {
  await deps.db('alert_jobs').whereNotNull('done_at').where('done_at', '<', deps.db.raw('NOW(3) - INTERVAL ? DAY', [KEEP_DAYS])).delete();
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

/**
 * Sweeps at start and every minute until `stop()`. Each sweep is work after the answer
 * (lib/background.ts), so a shutdown's drain waits for it before the database pool closes.
 */
export function startAlertSweeper(deps: AlertDeps, everyMs = 60_000): { stop(): Promise<void> } {
  const sweep = () =>
    deps.background.run('release alert sweep', () => sweepReleaseAlerts(deps).catch((error) => deps.logger?.warn({ err: error }, 'release alert sweep skipped; the next one tries again')));
  sweep();
  const timer = setInterval(sweep, everyMs);
  timer.unref();
  return {
    async stop() {
      clearInterval(timer);
    },
  };
}
