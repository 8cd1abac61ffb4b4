import { Link, useNavigate } from 'react-router-dom';
import { ErrorNote, formatDate } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { STATE_LABELS, usePrepareUpdate, type Exhibit } from './api';

/** Where an exhibit stands among its updates: the update it was superseded by, or the exhibit it updates. */
export function Lineage({ exhibit: e }: { exhibit: Exhibit }) {
  return (
    <>
      {e.successor && (
        <p role="note" className="mb-4 rounded border border-hairline-strong bg-paper-deep px-3 py-2 text-sm" data-testid="superseded-note">
          Superseded{e.successor.publishedAt ? ` on ${formatDate(e.successor.publishedAt)}` : ''} by its update:{' '}
          <Link to={`/exhibits/${e.successor.id}`} className="text-trend underline">
            {e.successor.title} (exhibit {e.successor.id})
          </Link>
          . This version stays as it was published.
        </p>
      )}
      {e.updatesInProgress.map((u) => (
        <p key={u.id} role="note" className="mb-4 rounded border border-above px-3 py-2 text-sm" data-testid="update-in-progress">
          An update of this exhibit is being prepared by {u.author.name}:{' '}
          <Link to={`/exhibits/${u.id}`} className="text-trend underline">
            exhibit {u.id} ({STATE_LABELS[u.status]})
          </Link>
          .
        </p>
      ))}
      {e.predecessor && (
        <p role="note" className="mb-4 rounded border border-hairline-strong px-3 py-2 text-sm" data-testid="update-of-note">
          An update of{' '}
          <Link to={`/exhibits/${e.predecessor.id}`} className="text-trend underline">
            {e.predecessor.title} (exhibit {e.predecessor.id}, {STATE_LABELS[e.predecessor.status]})
          </Link>
          {e.vintagePin ? `, drawn on vintage ${e.vintagePin}` : ''}.
        </p>
      )}
    </>
  );
}

/** "Prepare an update" on a published exhibit, for economists: a new draft with the same settings on the newest vintage. */
export function PrepareUpdate({ exhibit: e }: { exhibit: Exhibit }) {
  const me = useMe();
  const prepare = usePrepareUpdate(e.id);
  const navigate = useNavigate();
  if (e.status !== 'published' || !me.data?.roles.includes('economist')) return null;
  return (
    <div className="space-y-1">
      <button className="btn" disabled={prepare.isPending} onClick={() => prepare.mutate(undefined, { onSuccess: (u) => navigate(`/exhibits/${u.id}`) })}>
        Prepare an update
      </button>
      <ErrorNote error={prepare.error} />
    </div>
  );
}
