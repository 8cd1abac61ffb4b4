import { useQuery } from '@tanstack/react-query';
import { useParams } from 'react-router-dom';
import { ErrorNote, Spinner } from '@/components/ui';
import { api } from '@/lib/api';
import { useDocumentTitle } from '@/lib/useDocumentTitle';
import type { PublicExhibit } from './api';
import { ExhibitDownloads, ExhibitFigure } from './ExhibitFigure';

/** A published exhibit opened by its public link (when an administrator allows public links). */
export function PublicExhibitPage() {
  const { slug = '' } = useParams();
  const ex = useQuery({ queryKey: ['public', slug], queryFn: () => api<PublicExhibit>(`/public/exhibits/${encodeURIComponent(slug)}`), retry: false });
  useDocumentTitle(ex.data?.snapshot.text.title ?? (ex.error ? 'Exhibit not found' : 'Published exhibit'));
  return (
    <div className="mx-auto max-w-4xl px-6 py-8">
      <header className="mb-4 flex items-center gap-2 text-sm text-ink-soft">
        <img src="/favicon.svg" alt="" className="h-5 w-5" /> Published with Tidegauge
      </header>
      <main>
        {ex.isPending && <Spinner />}
        {ex.error && (
          <>
            <h1 className="page-title mb-3">Exhibit not found</h1>
            <ErrorNote error={ex.error} />
          </>
        )}
        {ex.data?.status === 'superseded' && (
          <p role="note" className="mb-4 rounded border border-hairline-strong bg-paper-deep px-3 py-2 text-sm" data-testid="superseded-note">
            This exhibit was superseded by an update
            {ex.data.successorSlug ? (
              <>
                :{' '}
                <a className="text-trend underline" href={`/p/${ex.data.successorSlug}`}>
                  read the update
                </a>
              </>
            ) : null}
            . It stays as it was published.
          </p>
        )}
        {ex.data?.snapshot && (
          <div className="space-y-3">
            <ExhibitFigure snapshot={ex.data.snapshot} titleLevel={1} />
            <ExhibitDownloads snapshot={ex.data.snapshot} dataUrl={`/public/exhibits/${slug}/data`} name={`exhibit-${ex.data.slug}`} />
          </div>
        )}
      </main>
    </div>
  );
}
