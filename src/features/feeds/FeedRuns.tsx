import { Link } from 'react-router-dom';
import { DataTable } from '@/components/DataTable';
import { ErrorNote, Spinner, formatDate } from '@/components/ui';
import { FEED_OUTCOME_WORDS, type FeedOutcome } from '@schemas/feeds';
import { ProblemsTable } from '@/features/catalogue/LoadPanel';
import { useFeedRuns, type FeedRun } from './api';

export function OutcomeTag({ outcome }: { outcome: FeedOutcome }) {
  const tone = outcome === 'stored' ? 'border-ok text-ok' : outcome === 'failed' || outcome === 'abandoned' ? 'border-alert text-alert' : 'border-hairline text-ink-soft';
  return <span className={`tag ${tone}`}>{FEED_OUTCOME_WORDS[outcome]}</span>;
}

const seconds = (ms: number | null) => (ms === null ? '—' : `${(ms / 1000).toFixed(ms < 10_000 ? 1 : 0)} s`);

/** A feed's run records: when, how long, the outcome, the vintages stored, and the problems by series of the latest run that had any. */
export function FeedRuns({ feedId, name }: { feedId: number; name: string }) {
  const runs = useFeedRuns(feedId);
  if (runs.isLoading) return <Spinner />;
  if (runs.error) return <ErrorNote error={runs.error} />;
  const items = runs.data ?? [];
  const withProblems = items.find((r) => r.problems.length > 0);
  return (
    <section aria-label={`Runs of ${name}`} className="space-y-3">
      <h3 className="font-heading text-base font-bold">Runs</h3>
      <DataTable
        dense
        label={`Runs of ${name}`}
        testId="feed-runs"
        data={items}
        empty="No runs yet: press Run now, or wait for the schedule."
        columns={[
          { accessorKey: 'startedAt', header: 'Started', cell: (c) => formatDate(c.getValue() as string, true) },
          { accessorKey: 'trigger', header: 'Trigger', cell: (c) => (c.getValue() === 'schedule' ? 'schedule' : `run now${c.row.original.startedBy ? ` (${c.row.original.startedBy})` : ''}`) },
          { accessorKey: 'durationMs', header: 'Took', meta: { numeric: true }, cell: (c) => seconds(c.getValue() as number | null) },
          { accessorKey: 'outcome', header: 'Outcome', cell: (c) => <OutcomeTag outcome={(c.row.original as FeedRun).outcome} /> },
          {
            id: 'vintages',
            header: 'Vintages stored',
            cell: (c) => {
              const v = (c.row.original as FeedRun).vintages;
              if (!v.length) return '—';
              return (
                <span className="flex flex-wrap gap-x-2">
                  {v.map((x) => (
                    <Link key={x.seriesId} className="text-trend underline" to={`/catalogue/${x.seriesId}`}>
                      {x.code} {x.number}
                    </Link>
                  ))}
                </span>
              );
            },
          },
          { accessorKey: 'message', header: 'Said', cell: (c) => <span className="text-ink-soft">{(c.getValue() as string | null) ?? ''}</span> },
        ]}
      />
      {withProblems && (
        <div className="space-y-2">
          <h4 className="text-sm font-semibold">
            Problems by series, run of {formatDate(withProblems.startedAt, true)}
          </h4>
          {withProblems.problems.map((p) => (
            <div key={`${p.key}-${p.series}`}>
              <p className="text-sm">
                <span className="font-semibold">{p.series ?? '(no series)'}</span> <span className="font-mono text-xs text-ink-soft">key {p.key}</span>
              </p>
              <ProblemsTable problems={p.problems} />
            </div>
          ))}
        </div>
      )}
    </section>
  );
}
