import { fmt } from '@/components/charts/echarts';
import { ErrorNote, Spinner } from '@/components/ui';
import type { ExhibitDiff } from '@schemas/exhibits';
import { useDiff, type Exhibit } from './api';
import { ExhibitFigure } from './ExhibitFigure';

/** The changes of a diff as a list (text, study settings, data). */
function Changes({ d }: { d: ExhibitDiff }) {
  return (
    <ul className="list-disc space-y-1 pl-5 text-sm">
      {d.text.map((x) => (
        <li key={x.field}>
          <strong>{x.field}</strong>: “{x.before ?? '—'}” → “{x.after ?? '—'}”
        </li>
      ))}
      {d.studies.map((x, i) => (
        <li key={i}>
          <strong>{x.what}</strong> of study {x.id}: {JSON.stringify(x.before)} → {JSON.stringify(x.after)}
        </li>
      ))}
      {d.data.map((x) => (
        <li key={x.line}>
          data, {x.line}: {x.changedPeriods} period{x.changedPeriods === 1 ? '' : 's'} changed{x.newPeriods ? `, ${x.newPeriods} new` : ''}
          {x.maxAbsChange !== null && <> (largest change {fmt(x.maxAbsChange, 3)})</>}
        </li>
      ))}
      {!d.text.length && !d.studies.length && d.data.every((x) => !x.changedPeriods && !x.newPeriods) && <li>Nothing changed.</li>}
    </ul>
  );
}

/** The Review desk's view of an exhibit in review: what changed since the last revision and, for an update, against the published exhibit. */
export function ReviewPanel({ exhibit }: { exhibit: Exhibit }) {
  const diff = useDiff(exhibit.id, exhibit.revision > 0);
  if (!diff.data) return diff.isPending ? <Spinner /> : <ErrorNote error={diff.error} />;
  const d = diff.data.diff;
  return (
    <section className="space-y-3" aria-label="What changed" data-testid="review-diff">
      {(d.from || !diff.data.published) && <h2 className="font-heading text-lg font-bold">{d.from ? `What changed since revision ${d.from}` : 'First submission'}</h2>}
      {!d.from && !diff.data.published && <p className="text-sm text-ink-soft">This is the first revision submitted, so there is nothing earlier to compare with.</p>}
      {d.from && <Changes d={d} />}
      {diff.data.previous && (
        <div className="grid gap-3 xl:grid-cols-2">
          <div>
            <p className="label">Revision {d.from} (reviewed before)</p>
            <ExhibitFigure snapshot={diff.data.previous} titleLevel={3} />
          </div>
          <div>
            <p className="label">Revision {d.to} (now)</p>
            <ExhibitFigure snapshot={diff.data.current} titleLevel={3} />
          </div>
        </div>
      )}
      {diff.data.published && (
        <section className="space-y-3 border-t border-hairline pt-3" aria-labelledby="against-published" data-testid="update-diff">
          <h2 id="against-published" className="font-heading text-lg font-bold">
            What changed against the published exhibit {diff.data.published.exhibitId}
          </h2>
          <p className="text-sm text-ink-soft">Publishing this update supersedes “{diff.data.published.title}”: it stays readable at its address and points to this one.</p>
          <Changes d={diff.data.published.diff} />
          <div className="grid gap-3 xl:grid-cols-2">
            <div>
              <p className="label">Published now</p>
              <ExhibitFigure snapshot={diff.data.published.snapshot} titleLevel={3} />
            </div>
            <div>
              <p className="label">The update (revision {d.to})</p>
              <ExhibitFigure snapshot={diff.data.current} titleLevel={3} />
            </div>
          </div>
        </section>
      )}
    </section>
  );
}

