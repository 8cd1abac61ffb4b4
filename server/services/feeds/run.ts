/**
 * One run of a feed: take the lease, fetch the source, read the answer, check each mapped series
 * exactly as a load is checked (loads/preview.ts), and store a vintage of each series that
 * changed through the load's own store path (loads/store.ts: one transaction, vintage metadata
 * kept), so a run stores all of its vintages or none. Every run leaves a record: when, how long,
 * the outcome, the vintages stored and the problems by series. A failed run mails the feed's
 * steward; a run that stored vintages queues the release alerts with them (alerts/outbox.ts).
 */
import type { Config } from '../../config.js';
import type { Db } from '../../db.js';
import type { Background } from '../../lib/background.js';
import { conflict, HttpError } from '../../lib/errors.js';
import type { Logger } from '../../lib/logger.js';
import type { Progress } from '../../lib/stream.js';
import { composeMail, type Mailer } from '../../mail/mailer.js';
import type { FileProblem, StoredLoadVintage } from '../../schemas/catalogue.js';
import type { FeedOutcome, FeedRun, FeedSeriesProblems } from '../../schemas/feeds.js';
import type { AlertDeps } from '../alerts/landed.js';
import { checkAssigned, type AssignedGroup } from '../catalogue/loads/preview.js';
import { storeLoad } from '../catalogue/loads/store.js';
import { acquireLease, keepLease, leaseHolder, releaseLease } from './lease.js';
import { getStoredFeed, toRun, type StoredFeed } from './registry.js';
import { fetchAnswer, FeedFailure, findGroup } from './source.js';

/** What a run needs: the app's dependencies, the worker pool among them for the release alerts' decompositions. */
export interface FeedDeps extends AlertDeps {
  db: Db;
  config: Config;
  mailer: Mailer;
  background: Background;
  logger?: Logger;
}

export interface RunOptions {
  trigger: 'manual' | 'schedule';
  /** Who pressed "Run now" (none for a scheduled run). */
  actorId?: number;
  /** The scheduled time this run is for (scheduled runs only). */
  slot?: Date;
  onProgress?: Progress;
}

export interface RunResult {
  run: FeedRun;
  /** The vintages the run stored (committed), for whoever acts on new vintages. */
  landed: StoredLoadVintage[];
}

class RunFailed extends Error {
  constructor(
    message: string,
    readonly problems: FeedSeriesProblems[] = [],
  ) {
    super(message);
  }
}

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

/** Fetches, checks and stores; throws RunFailed (nothing stored) or returns what was stored. */
async function work(deps: FeedDeps, feed: StoredFeed, lease: { lost(): boolean }, onProgress?: Progress) {
  const { db, config } = deps;
  onProgress?.('fetching', 0, 1);
  let answer;
  try {
    answer = await fetchAnswer(feed, { timeoutMs: config.feeds.fetchTimeoutMs, maxBytes: config.maxUploadBytes });
  } catch (error) {
    if (error instanceof FeedFailure) throw new RunFailed(error.message);
    throw error;
  }
  onProgress?.('fetching', 1, 1);
  const series: { id: number; code: string }[] = await db('series').whereIn('code', feed.mappings.map((m) => m.series)).select('id', 'code');
  const idOf = new Map(series.map((s) => [s.code.toUpperCase(), s.id]));
  const assigned: AssignedGroup[] = [];
  const missing: FeedSeriesProblems[] = [];
  for (const m of feed.mappings) {
    const group = findGroup(answer.groups, m.key);
    const seriesId = idOf.get(m.series.toUpperCase());
    const problem = (message: string): FileProblem => ({ row: null, column: null, message, severity: 'error' });
    if (!seriesId) missing.push({ key: m.key, series: m.series, problems: [problem(`The series ${m.series} is no longer in the Catalogue.`)] });
    else if (!group) missing.push({ key: m.key, series: m.series, problems: [problem(`The answer has no series with the key ${m.key} (it has ${answer.groups.slice(0, 5).map((g) => g.key ?? g.code).join(', ') || 'none'}).`)] });
    else assigned.push({ group, seriesId });
  }
  if (missing.length) throw new RunFailed(`${plural(missing.length, 'series')} of the feed ${missing.length === 1 ? 'was' : 'were'} not in the answer; nothing was stored.`, missing);
  const checked = await checkAssigned(db, { format: answer.format, filename: `feed “${feed.name}”`, assigned, problems: [], onProgress });
  const problems: FeedSeriesProblems[] = checked.series.filter((s) => s.problems.length).map((s) => ({ key: s.key ?? '', series: s.series?.code ?? null, problems: s.problems.slice(0, 50) }));
  if (checked.errors > 0) throw new RunFailed(`The answer has ${plural(checked.errors, 'problem')} to fix at the source; nothing was stored.`, problems);
  if (lease.lost()) throw new RunFailed('The run took longer than its lease and another run may have started; nothing was stored.', problems);
  try {
    // The release alerts are queued with the vintages and delivered after the commit (alerts/outbox.ts).
    const stored = await storeLoad(db, feed.stewardId, checked, { note: `Feed “${feed.name}”` }, undefined, onProgress, deps, { source: 'feed', label: `the feed “${feed.name}”` });
    return { outcome: 'stored' as const, stored, problems, message: `${plural(stored.vintages.length, 'new vintage')} stored (${stored.vintages.map((v) => `${v.code} ${v.number}`).join(', ')}).` };
  } catch (error) {
    if (error instanceof HttpError && error.code === 'no_change') return { outcome: 'unchanged' as const, stored: null, problems, message: 'Nothing new: every series matches its latest vintage.' };
    throw error;
  }
}

/**
 * Runs a feed now. A manual run of a feed that is running already is refused (409); a scheduled
 * run that finds the lease taken, or its time already run, returns null.
 */
export async function runFeed(deps: FeedDeps, feedId: number, options: RunOptions): Promise<RunResult | null> {
  const { db, config } = deps;
  const feed = await getStoredFeed(db, feedId);
  const holder = leaseHolder();
  if (!(await acquireLease(db, feed.id, holder, config.feeds.leaseSeconds, options.slot))) {
    if (options.trigger === 'schedule') return null;
    throw conflict('feed_running', `The feed “${feed.name}” is running already; its run record shows when it ends.`);
  }
  const lease = keepLease(db, feed.id, holder, config.feeds.leaseSeconds);
  let runId = 0;
  let outcome: FeedOutcome = 'failed';
  let message = '';
  let problems: FeedSeriesProblems[] = [];
  let landed: StoredLoadVintage[] = [];
  let loadId: number | null = null;
  const t0 = Date.now();
  try {
    // A run still "running" while this one holds the lease died: its lease expired.
    await db('feed_runs').where({ feed_id: feed.id, outcome: 'running' }).update({ outcome: 'abandoned', finished_at: db.raw('NOW(3)'), message: 'The run stopped before it finished (its server stopped); nothing of it was stored, and its lease expired.' });
    [runId] = await db('feed_runs').insert({ feed_id: feed.id, trigger: options.trigger, outcome: 'running', holder, started_at: db.raw('NOW(3)'), started_by: options.actorId ?? null });
    try {
      const done = await work(deps, feed, lease, options.onProgress);
      outcome = done.outcome;
      message = done.message;
      problems = done.problems;
      landed = done.stored?.vintages ?? [];
      loadId = done.stored?.loadId ?? null;
    } catch (error) {
      if (error instanceof RunFailed) {
        message = error.message;
        problems = error.problems;
      } else {
        deps.logger?.error({ err: error, feedId: feed.id }, 'feed run failed');
        message = `The run failed: ${error instanceof HttpError ? error.message : 'an unexpected error (see the server log)'}. Nothing was stored.`;
      }
    }
    await db('feed_runs')
      .where('id', runId)
      .update({ outcome, finished_at: db.raw('NOW(3)'), duration_ms: Date.now() - t0, message, load_id: loadId, vintages: JSON.stringify(landed.map((v) => ({ seriesId: v.seriesId, code: v.code, number: v.number, asOf: v.asOf }))), problems: JSON.stringify(problems) });
  } finally {
    lease.stop();
    await releaseLease(db, feed.id, holder).catch(() => {});
  }
  if (outcome === 'failed') deps.background.run('feed failure mail', () => mailFailure(deps, feed, message, problems));
  const row = await db('feed_runs as r').leftJoin('users as u', 'u.id', 'r.started_by').where('r.id', runId).first('r.*', 'u.name as starter_name');
  return { run: toRun(row), landed };
}

/** The feed's steward hears of a failed run: why, and the problems by series. */
async function mailFailure(deps: FeedDeps, feed: StoredFeed, message: string, problems: FeedSeriesProblems[]) {
  const steward = await deps.db('users').where({ id: feed.stewardId, status: 'active' }).first('email', 'name');
  if (!steward) return;
  const lines = problems.slice(0, 10).map((p) => `${p.series ?? p.key} (key ${p.key}): ${p.problems.filter((x) => x.severity === 'error').slice(0, 3).map((x) => (x.row ? `row ${x.row}: ` : '') + x.message).join(' ') || 'see the run record'}`);
  const { text, html } = composeMail({
    greeting: `Hello ${steward.name},`,
    paragraphs: [`The feed “${feed.name}” ran and failed: ${message}`, ...lines, `Source: ${feed.url.replace(/[?#].*$/, '')}`],
    action: { label: 'See its runs', url: `${deps.config.publicOrigin}/catalogue/feeds?feed=${feed.id}` },
  });
  await deps.mailer.send({ to: steward.email, subject: `Feed “${feed.name}” failed; nothing was stored`, text, html });
}
