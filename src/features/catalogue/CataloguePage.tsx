import type { ColumnDef } from '@tanstack/react-table';
import { useEffect, useMemo, useRef, useState } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { FREQUENCY_LABELS } from '@schemas/frequency';
import { DataTable } from '@/components/DataTable';
import { EmptyState, ErrorNote, formatDate, PageHeader, Spinner } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { useDebounced } from '@/lib/useDebounced';
import { useCatalogueUnits, useSeriesPage, type SeriesListItem } from './api';
import { SERIES_SORTS, type SeriesListQuery } from '@schemas/catalogue';

type SeriesSort = NonNullable<SeriesListQuery['sort']>;
import { ACCESS, allows } from '@schemas/access';

export function InventedBadge({ source }: { source: string }) {
  if (!/invented/i.test(source)) return null;
  return (
    <span className="tag whitespace-nowrap border-above text-above" title="The demo workspace's numbers are invented">
      invented demo data
    </span>
  );
}

/** Series a page of the Catalogue shows. */
export const CATALOGUE_PAGE_SIZE = 50;
const count = (n: number) => n.toLocaleString('en-GB');

/**
 * The Catalogue, searched, sorted and paged on the server: 50 series a page, in code order unless a
 * column header says otherwise; the search (code or title), the frequency and unit filters and the
 * order in the address, so that Back returns to the same page.
 */
export function CataloguePage() {
  const me = useMe();
  const navigate = useNavigate();
  const [params, setParams] = useSearchParams();
  const frequency = params.get('frequency') ?? '';
  const unit = params.get('unit') ?? '';
  // The order, kept in the address: a column the server sorts by (then by code), either way.
  const sort = (SERIES_SORTS as readonly string[]).includes(params.get('sort') ?? '') ? (params.get('sort') as SeriesSort) : 'code';
  const order = params.get('order') === 'desc' ? 'desc' : 'asc';
  const units = useCatalogueUnits();
  const pageNumber = Math.max(1, Number(params.get('page')) || 1);
  const [q, setQ] = useState(params.get('q') ?? '');
  const searched = useDebounced(q.trim(), 300);
  /** Changes the address: a new search or filter starts again at page 1. */
  const change = (next: Record<string, string>) =>
    setParams(
      (old) => {
        const out = new URLSearchParams(old);
        for (const [key, value] of Object.entries(next)) {
          if (value) out.set(key, value);
          else out.delete(key);
        }
        if (!('page' in next)) out.delete('page');
        return out;
      },
      { replace: !('page' in next) },
    );
  useEffect(() => {
    if (searched !== (params.get('q') ?? '')) change({ q: searched });
  }, [searched]);
  const offset = (pageNumber - 1) * CATALOGUE_PAGE_SIZE;
  const list = useSeriesPage({ q: params.get('q') || undefined, frequency: (frequency || undefined) as 'A' | undefined, unit: unit || undefined, sort, order, limit: CATALOGUE_PAGE_SIZE, offset });
  const canEdit = allows(ACCESS.catalogueWrite, me.data?.roles);
  const columns = useMemo<ColumnDef<SeriesListItem, any>[]>(
    () =>
      ([
      { accessorKey: 'code', header: 'Code', cell: (c) => <Link to={`/catalogue/${c.row.original.id}`} className="font-semibold text-trend hover:underline">{c.getValue()}</Link> },
      { accessorKey: 'title', header: 'Title', cell: (c) => (<span className="inline-block min-w-[12rem]">{c.getValue()} <InventedBadge source={c.row.original.source} /></span>) },
      { accessorKey: 'frequency', header: 'Frequency', cell: (c) => FREQUENCY_LABELS[c.getValue() as 'A'] },
      { accessorKey: 'unit', header: 'Unit' },
      { id: 'vintage', header: 'Latest vintage', accessorFn: (s) => s.latestVintage?.number ?? 0, meta: { numeric: true }, cell: (c) => c.row.original.latestVintage?.number ?? '—' },
      { id: 'asOf', header: 'Data as of', accessorFn: (s) => s.latestVintage?.asOf ?? '', cell: (c) => <span className="whitespace-nowrap">{formatDate(c.getValue() || null)}</span> },
      { id: 'last', header: 'Last period', accessorFn: (s) => s.latestVintage?.lastPeriod ?? '', cell: (c) => <span className="whitespace-nowrap">{c.getValue() || '—'}</span> },
    ] as ColumnDef<SeriesListItem, any>[]).map((column) => ({ ...column, enableSorting: (SERIES_SORTS as readonly string[]).includes(String((column as { accessorKey?: string }).accessorKey)) })),
    [],
  );
  const total = list.data?.total ?? 0;
  const rows = list.data?.items ?? [];
  const filtered = !!params.get('q') || !!frequency || !!unit;
  const last = Math.max(1, Math.ceil(total / CATALOGUE_PAGE_SIZE));
  const status = useRef<HTMLParagraphElement>(null);
  // A new page: focus and show its count, at the top of the table (a disabled Next would drop focus).
  const go = (n: number) => {
    change({ page: n > 1 ? String(n) : '' });
    requestAnimationFrame(() => {
      status.current?.focus();
      status.current?.scrollIntoView({ block: 'nearest' });
    });
  };
  const pastEnd = !!list.data && !list.isPlaceholderData && total > 0 && rows.length === 0 && offset > 0;
  return (
    <>
      <PageHeader
        title="Catalogue"
        actions={
          canEdit && (
            <>
              <Link to="/catalogue/loads" className="btn-quiet">
                Loads
              </Link>
              <Link to="/catalogue/feeds" className="btn-quiet">
                Feeds
              </Link>
              <Link to="/catalogue/new" className="btn">
                New series
              </Link>
            </>
          )
        }
      >
        Every series, with the release its latest vintage holds.
      </PageHeader>
      <div role="search" aria-label="Catalogue" className="mb-3 flex flex-wrap gap-3">
        <input type="search" className="field max-w-xs" placeholder="Search code or title" value={q} onChange={(e) => setQ(e.target.value)} aria-label="Search the Catalogue" />
        <select className="field max-w-[10rem]" value={frequency} onChange={(e) => change({ frequency: e.target.value })} aria-label="Filter by frequency">
          <option value="">All frequencies</option>
          <option value="A">annual</option>
          <option value="Q">quarterly</option>
          <option value="M">monthly</option>
        </select>
        <select className="field max-w-[14rem]" value={unit} onChange={(e) => change({ unit: e.target.value })} aria-label="Filter by unit">
          <option value="">All units</option>
          {units.data?.items.map((u) => (
            <option key={u.unit} value={u.unit}>
              {u.unit} ({count(u.series)})
            </option>
          ))}
        </select>
      </div>
      <p role="status" ref={status} tabIndex={-1} className="mb-2 text-sm text-ink-soft" data-testid="catalogue-count">
        {list.isPending || list.isPlaceholderData ? 'Loading the Catalogue…' : pastEnd ? `Page ${count(pageNumber)} is past the last page, ${count(last)}.` : list.data && total > 0 ? `Showing ${count(offset + 1)}–${count(offset + rows.length)} of ${count(total)} series${filtered ? ' that match' : ''}` : list.data && filtered ? 'No series match.' : ''}
      </p>
      {list.isPending && <Spinner />}
      <ErrorNote error={list.error} />
      {list.data && total === 0 && !filtered ? (
        <EmptyState title="The Catalogue is empty">{canEdit ? 'Define a series, then load its first release.' : 'A data steward defines series and loads their releases.'}</EmptyState>
      ) : (
        list.data && (
          <div aria-busy={list.isPlaceholderData} className={list.isPlaceholderData ? 'opacity-60' : ''}>
            <DataTable
              data={rows}
              columns={columns}
              sorting={[{ id: sort, desc: order === 'desc' }]}
              onSortingChange={(next) => change({ sort: next[0] && next[0].id !== 'code' ? next[0].id : '', order: next[0]?.desc ? 'desc' : '' })}
              onRowClick={(s) => navigate(`/catalogue/${s.id}`)}
              testId="catalogue-table"
              label="Catalogue series"
              empty={offset > 0 ? 'This page is past the last series.' : 'No series match.'}
            />
          </div>
        )
      )}
      {pastEnd && (
        <button type="button" className="btn-quiet mt-3" onClick={() => go(last)}>
          Go to the last page
        </button>
      )}
      {list.data && total > CATALOGUE_PAGE_SIZE && !pastEnd && (
        <nav aria-label="Catalogue pages" className="mt-3 flex flex-wrap items-center gap-3 text-sm">
          <button type="button" className="btn-quiet" disabled={pageNumber <= 1} onClick={() => go(pageNumber - 1)}>
            ← Previous 50
          </button>
          <span className="text-ink-soft">
            Page {count(pageNumber)} of {count(last)}
          </span>
          <button type="button" className="btn-quiet" disabled={pageNumber >= last} onClick={() => go(pageNumber + 1)}>
            Next 50 →
          </button>
        </nav>
      )}
    </>
  );
}
