import { Link } from 'react-router-dom';
import { formatDate, PageHeader } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { useLoads, useSeriesPage } from '@/features/catalogue/api';
import { useExhibits, useReviewQueue } from '@/features/exhibits/api';
import { StateBadge } from '@/features/exhibits/ExhibitPage';
import { useStudies } from '@/features/studies/api';
import { ACCESS, allows } from '@schemas/access';

function Card({ title, children, to, action }: { title: string; children: React.ReactNode; to?: string; action?: string }) {
  return (
    <section className="card flex flex-col p-4">
      <h2 className="mb-2 font-heading text-base font-bold">{title}</h2>
      <div className="flex-1 text-sm">{children}</div>
      {to && (
        <Link to={to} className="mt-3 text-sm font-semibold text-trend hover:underline">
          {action ?? 'Open'} →
        </Link>
      )}
    </section>
  );
}

/** The start page: what is new and what waits for this person, by role. */
export function HomePage() {
  const me = useMe();
  // The count, and a first few series to tell a demo workspace by: not the whole Catalogue.
  const series = useSeriesPage({ limit: 20 });
  const loads = useLoads();
  const economist = allows(ACCESS.studiesWrite, me.data?.roles);
  const editor = allows(ACCESS.review, me.data?.roles);
  const studies = useStudies({ mine: true }, economist);
  const mine = useExhibits({ mine: true });
  const published = useExhibits({ status: 'published' });
  const review = useReviewQueue(editor);
  const invented = series.data?.items.some((s) => /invented/i.test(s.source));
  return (
    <>
      <PageHeader title={`Good to see you, ${me.data?.name.split(' ')[0] ?? ''}`} docTitle="Start page">
        Trend and cycle decompositions of the Catalogue’s series, every release kept as a vintage, and the charts that go into reports taken through review.
      </PageHeader>
      {invented && (
        <p className="mb-4 rounded border border-above/40 bg-above-light px-3 py-2 text-sm">
          This workspace holds the demo economy, the Republic of Estuary: its numbers are invented.
        </p>
      )}
      <div className="grid gap-4 md:grid-cols-2 xl:grid-cols-3">
        <Card title="Catalogue" to="/catalogue" action="Browse the series">
          <p>{series.data ? `${series.data.total.toLocaleString('en-GB')} series` : '…'}</p>
          <ul className="mt-2 space-y-1">
            {loads.data?.slice(0, 4).map((l) => (
              <li key={l.id} className="text-ink-soft">
                {formatDate(l.createdAt)}: {l.seriesCount} series loaded from {l.filename} by {l.createdBy}
              </li>
            ))}
          </ul>
        </Card>
        {economist && (
          <Card title="Your studies" to="/studies" action="All studies">
            {studies.data?.length ? (
              <ul className="space-y-1">
                {studies.data.slice(0, 5).map((s) => (
                  <li key={s.id}>
                    <Link className="text-trend hover:underline" to={`/studies/${s.id}`}>
                      {s.title}
                    </Link>{' '}
                    <span className="text-ink-faint">{s.series.code}</span>
                  </li>
                ))}
              </ul>
            ) : (
              <p className="text-ink-soft">No study yet: open a series and decompose it.</p>
            )}
          </Card>
        )}
        {economist && (
          <Card title="Your exhibits" to="/exhibits" action="All exhibits">
            {mine.data?.length ? (
              <ul className="space-y-1">
                {mine.data.slice(0, 5).map((e) => (
                  <li key={e.id} className="flex items-center gap-2">
                    <StateBadge state={e.status} />
                    <Link className="text-trend hover:underline" to={`/exhibits/${e.id}`}>
                      {e.title}
                    </Link>
                  </li>
                ))}
              </ul>
            ) : (
              <p className="text-ink-soft">Draft an exhibit from a study or a board panel.</p>
            )}
          </Card>
        )}
        {editor && (
          <Card title="Review desk" to="/review" action="Open the Review desk">
            <p data-testid="review-count">{review.data ? `${review.data.length} exhibit${review.data.length === 1 ? '' : 's'} waiting for review` : '…'}</p>
          </Card>
        )}
        <Card title="Recently published" to="/exhibits" action="All published exhibits">
          {published.data?.length ? (
            <ul className="space-y-1">
              {published.data.slice(0, 5).map((e) => (
                <li key={e.id}>
                  <Link className="text-trend hover:underline" to={`/exhibits/${e.id}`}>
                    {e.title}
                  </Link>{' '}
                  <span className="text-ink-faint">{formatDate(e.publishedAt)}</span>
                </li>
              ))}
            </ul>
          ) : (
            <p className="text-ink-soft">Nothing published yet.</p>
          )}
        </Card>
      </div>
    </>
  );
}
