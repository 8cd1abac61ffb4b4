import { useEffect, useRef, useState } from 'react';
import { useSearchParams } from 'react-router-dom';
import { FEED_OUTCOME_WORDS } from '@schemas/feeds';
import { useAnnounce } from '@/components/Announcer';
import { EmptyState, ErrorNote, PageHeader, Progress, Spinner, formatDate } from '@/components/ui';
import { useDeleteFeed, useFeeds, useRunFeed, useUpdateFeed, type Feed } from './api';
import { FeedForm } from './FeedForm';
import { FeedRuns, OutcomeTag } from './FeedRuns';

const PHASES: Record<string, string> = { fetching: 'Fetching from the source', reading: 'Reading the answer', checking: 'Checking each series', storing: 'Storing the vintages' };

/** Feeds: scheduled pulls from SDMX REST sources, run now, and their run records (stewards). */
export function FeedsPage() {
  const feeds = useFeeds();
  const [params, setParams] = useSearchParams();
  const open = Number(params.get('feed')) || undefined;
  const setOpen = (id: number | undefined) => setParams(id ? { feed: String(id) } : {}, { replace: true });
  return (
    <>
      <PageHeader title="Feeds" kicker="Catalogue">
        Scheduled pulls from SDMX REST sources. Each run is checked exactly as a load, and every series that changed becomes a new vintage, all in one step or not at all. A failed
        run stores nothing and mails the feed’s steward.
      </PageHeader>
      <ErrorNote error={feeds.error} />
      {feeds.isLoading && <Spinner />}
      {feeds.data && feeds.data.length === 0 && <EmptyState title="No feeds yet">Register one below: the address of a source’s SDMX data query and the series it fills.</EmptyState>}
      {feeds.data && feeds.data.length > 0 && (
        <ul className="mb-8 space-y-4" aria-label="Feeds">
          {feeds.data.map((f) => (
            <FeedCard key={f.id} feed={f} open={open === f.id} onToggle={() => setOpen(open === f.id ? undefined : f.id)} />
          ))}
        </ul>
      )}
      <FeedForm onCreated={(f) => setOpen(f.id)} />
    </>
  );
}

function FeedCard({ feed, open, onToggle }: { feed: Feed; open: boolean; onToggle: () => void }) {
  const run = useRunFeed(feed.id);
  const update = useUpdateFeed(feed.id);
  const remove = useDeleteFeed(feed.id);
  const announce = useAnnounce();
  const pause = () =>
    update.mutate({ enabled: !feed.enabled }, { onSuccess: (f) => announce(`Feed ${feed.name}: ${f.enabled ? `schedule resumed; next run ${f.nextRunAt ? formatDate(f.nextRunAt, true) : 'on demand only'}` : 'schedule paused; Run now still works'}.`) });
  const removeFeed = () => {
    if (!confirm(`Delete the feed “${feed.name}” and its run records? The vintages it stored stay in the Catalogue.`)) return;
    remove.mutate(undefined, { onSuccess: () => announce(`Feed ${feed.name} deleted.`) });
  };
  const result = useRef<HTMLParagraphElement>(null);
  const [lastResult, setLastResult] = useState<string | null>(null);
  useEffect(() => {
    if (lastResult) result.current?.focus();
  }, [lastResult]);
  const runNow = () =>
    run.mutate(undefined, {
      onSuccess: (r) => {
        // A stored or unchanged run's message says it all; a failure leads with the outcome.
        const text = r.message && (r.outcome === 'stored' || r.outcome === 'unchanged') ? r.message : `${FEED_OUTCOME_WORDS[r.outcome]}. ${r.message ?? ''}`;
        setLastResult(text);
        announce(`Feed ${feed.name}: ${text}`);
      },
    });
  const last = feed.lastRun;
  const p = run.progress;
  return (
    <li className="card p-4" aria-labelledby={`feed-${feed.id}-name`}>
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div className="min-w-0">
          <h2 id={`feed-${feed.id}-name`} className="font-heading text-lg font-bold">
            {feed.name}
          </h2>
          <p className="break-all font-mono text-xs text-ink-soft">{feed.url}</p>
        </div>
        <div className="flex flex-wrap gap-2">
          <button className="btn" disabled={run.isPending} onClick={runNow}>
            {run.isPending ? 'Running…' : 'Run now'}
          </button>
          <button className="btn-quiet" aria-expanded={open} aria-controls={`feed-${feed.id}-runs`} onClick={onToggle}>
            {open ? 'Hide runs' : 'Runs'}
          </button>
          {feed.schedule && (
            <button className="btn-quiet" aria-disabled={update.isPending} onClick={() => !update.isPending && pause()}>
              {feed.enabled ? 'Pause schedule' : 'Resume schedule'}
            </button>
          )}
          <button className="btn-danger" aria-label={`Delete ${feed.name}`} disabled={remove.isPending || run.isPending} onClick={removeFeed}>
            Delete
          </button>
        </div>
      </div>
      <dl className="mt-3 grid gap-x-6 gap-y-1 text-sm sm:grid-cols-2">
        <div>
          <dt className="inline text-ink-faint">Schedule: </dt>
          <dd className="inline">
            {feed.scheduleWords}
            {feed.schedule && <span className="ml-1 font-mono text-xs text-ink-faint">({feed.schedule})</span>}
            {feed.schedule && !feed.enabled && <strong className="ml-1">— paused</strong>}
          </dd>
        </div>
        <div>
          <dt className="inline text-ink-faint">Next run: </dt>
          <dd className="inline">{feed.nextRunAt ? formatDate(feed.nextRunAt, true) : '—'}</dd>
        </div>
        <div>
          <dt className="inline text-ink-faint">Fills: </dt>
          <dd className="inline">{feed.mappings.map((m) => `${m.key} → ${m.series}`).join(', ')}</dd>
        </div>
        <div>
          <dt className="inline text-ink-faint">Steward: </dt>
          <dd className="inline">{feed.steward.name}</dd>
        </div>
        {feed.headers.length > 0 && (
          <div>
            <dt className="inline text-ink-faint">Headers: </dt>
            <dd className="inline">{feed.headers.map((h) => h.name).join(', ')} (values hidden)</dd>
          </div>
        )}
        <div>
          <dt className="inline text-ink-faint">Last run: </dt>
          <dd className="inline">{last ? <>{formatDate(last.startedAt, true)} <OutcomeTag outcome={last.outcome} /></> : 'never'}</dd>
        </div>
      </dl>
      {run.isPending && (
        <div className="mt-3">
          <Progress value={p && p.total ? p.done / p.total : null} label={p ? (PHASES[p.phase] ?? p.phase) : 'Starting the run'} />
        </div>
      )}
      <div className="mt-3">
        <ErrorNote error={run.error ?? update.error ?? remove.error} />
      </div>
      {lastResult && !run.isPending && (
        <p ref={result} tabIndex={-1} data-testid="feed-run-result" className="mt-3 rounded border border-hairline bg-paper-deep px-3 py-2 text-sm">
          {lastResult}
        </p>
      )}
      {open && (
        <div id={`feed-${feed.id}-runs`} className="mt-4">
          <FeedRuns feedId={feed.id} name={feed.name} />
        </div>
      )}
    </li>
  );
}
