import type { ColumnDef } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import { Link, useNavigate } from 'react-router-dom';
import { FREQUENCY_LABELS } from '@schemas/frequency';
import { DataTable } from '@/components/DataTable';
import { EmptyState, ErrorNote, formatDate, PageHeader, Spinner } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { useSeriesList, type SeriesListItem } from './api';
import { ACCESS, allows } from '@schemas/access';

export function InventedBadge({ source }: { source: string }) {
  if (!/invented/i.test(source)) return null;
  return (
    <span className="tag border-above text-above" title="The demo workspace's numbers are invented">
      invented demo data
    </span>
  );
}

export function CataloguePage() {
  const list = useSeriesList();
  const me = useMe();
  const navigate = useNavigate();
  const [q, setQ] = useState('');
  const [frequency, setFrequency] = useState('');
  const [unit, setUnit] = useState('');
  const canEdit = allows(ACCESS.catalogueWrite, me.data?.roles);
  const columns = useMemo<ColumnDef<SeriesListItem, any>[]>(
    () => [
      { accessorKey: 'code', header: 'Code', cell: (c) => <Link to={`/catalogue/${c.row.original.id}`} className="font-semibold text-trend hover:underline">{c.getValue()}</Link> },
      { accessorKey: 'title', header: 'Title', cell: (c) => (<span>{c.getValue()} <InventedBadge source={c.row.original.source} /></span>) },
      { accessorKey: 'frequency', header: 'Frequency', cell: (c) => FREQUENCY_LABELS[c.getValue() as 'A'] },
      { accessorKey: 'unit', header: 'Unit' },
      { id: 'vintage', header: 'Latest vintage', accessorFn: (s) => s.latestVintage?.number ?? 0, meta: { numeric: true }, cell: (c) => c.row.original.latestVintage?.number ?? '—' },
      { id: 'asOf', header: 'Data as of', accessorFn: (s) => s.latestVintage?.asOf ?? '', cell: (c) => formatDate(c.getValue() || null) },
      { id: 'last', header: 'Last period', accessorFn: (s) => s.latestVintage?.lastPeriod ?? '', cell: (c) => c.getValue() || '—' },
    ],
    [],
  );
  const units = useMemo(() => [...new Set((list.data ?? []).map((s) => s.unit))].sort(), [list.data]);
  const rows = (list.data ?? []).filter((s) => (!frequency || s.frequency === frequency) && (!unit || s.unit === unit));
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
      <div className="mb-3 flex flex-wrap gap-3">
        <input className="field max-w-xs" placeholder="Search code or title" value={q} onChange={(e) => setQ(e.target.value)} aria-label="Search the Catalogue" />
        <select className="field max-w-[10rem]" value={frequency} onChange={(e) => setFrequency(e.target.value)} aria-label="Filter by frequency">
          <option value="">All frequencies</option>
          <option value="A">annual</option>
          <option value="Q">quarterly</option>
          <option value="M">monthly</option>
        </select>
        <select className="field max-w-[16rem]" value={unit} onChange={(e) => setUnit(e.target.value)} aria-label="Filter by unit">
          <option value="">All units</option>
          {units.map((u) => (
            <option key={u}>{u}</option>
          ))}
        </select>
      </div>
      {list.isPending && <Spinner />}
      <ErrorNote error={list.error} />
      {list.data && list.data.length === 0 ? (
        <EmptyState title="The Catalogue is empty">{canEdit ? 'Define a series, then load its first release.' : 'A data steward defines series and loads their releases.'}</EmptyState>
      ) : (
        list.data && <DataTable data={rows} columns={columns} globalFilter={q} initialSorting={[{ id: 'code', desc: false }]} onRowClick={(s) => navigate(`/catalogue/${s.id}`)} testId="catalogue-table" empty="No series match." />
      )}
    </>
  );
}
