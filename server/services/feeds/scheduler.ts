/**
 * The feeds' scheduler, started with the server (croner, once a minute, in UTC). Each tick reads
 * the enabled feeds from the database, finds each one's latest scheduled time up to now, and runs
 * the feed when no run has started for that time yet. Every instance may tick: the lease
 * (lease.ts) lets one of them run a given time, once. A time missed while every instance was down
 * runs once at the next tick (not once per missed time). The scheduler keeps nothing in memory.
 */
import { Cron } from 'croner';
import { SCHEDULE_ZONE, latestSlot } from '../../schemas/feeds.js';
import { toStoredFeed } from './registry.js';
import { runFeed, type FeedDeps } from './run.js';

/** Runs every feed whose scheduled time has come; returns the ids of the feeds this tick ran. */
export async function tickFeeds(deps: FeedDeps, now = new Date()): Promise<number[]> {
  const rows = await deps.db('feeds as f').join('feed_leases as l', 'l.feed_id', 'f.id').where('f.enabled', true).whereNotNull('f.schedule').select('f.*', 'l.last_slot');
  const ran: number[] = [];
  for (const row of rows) {
    const feed = toStoredFeed(row);
    const slot = latestSlot(feed.schedule!, now);
    // A time before the feed was registered, or one already run, is not due.
    if (!slot || slot < feed.createdAt || (row.last_slot && new Date(row.last_slot) >= slot)) continue;
    try {
      const result = await runFeed(deps, feed.id, { trigger: 'schedule', slot });
      if (result) ran.push(feed.id);
    } catch (error) {
      deps.logger?.error({ err: error, feedId: feed.id }, 'scheduled feed run failed');
    }
  }
  return ran;
}

const isPoolTimeout = (error: unknown) => (error as Error | undefined)?.name === 'KnexTimeoutError';

/** Starts the once-a-minute tick; `stop()` ends it (a tick in progress finishes). */
export function startFeedScheduler(deps: FeedDeps): { stop(): Promise<void> } {
  let running: Promise<void> = Promise.resolve();
  const job = new Cron('* * * * *', { timezone: SCHEDULE_ZONE, protect: true }, () => {
    running = tickFeeds(deps).then(
      () => {},
      (error) =>
        // A busy pool (every connection held by loads) only delays the tick: what is due runs at the next one.
        isPoolTimeout(error)
          ? deps.logger?.warn('feed scheduler tick skipped: no database connection was free; what is due runs at the next tick')
          : deps.logger?.error({ err: error }, 'feed scheduler tick failed'),
    );
    return running;
  });
  return {
    async stop() {
      job.stop();
      await running;
    },
  };
}
