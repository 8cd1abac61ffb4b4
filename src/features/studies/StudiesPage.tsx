import { useState } from 'react';
import { Link, useNavigate } from 'react-router-dom';
import { DataTable } from '@/components/DataTable';
import { EmptyState, ErrorNote, formatDate, PageHeader, Spinner } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { useMethods, useStudies } from './api';
import { ACCESS, allows } from '@schemas/access';

export function StudiesPage() {
  const me = useMe();
  const [mine, setMine] = useState(allows(ACCESS.studiesWrite, me.data?.roles));
  const [method, setMethod] = useState('');
  const [q, setQ] = useState('');
  const studies = useStudies({ mine, method: method || undefined, q: q || undefined });
  const navigate = useNavigate();
  const methods = useMethods().data?.methods ?? [];
  const nameOf = (s: { method: string; methods: unknown[] | null }) => (s.methods ? `Range across ${s.methods.length} methods` : (methods.find((m) => m.id === s.method)?.name ?? s.method));
  return (
    <>
      <PageHeader title="Studies" actions={
          allows(ACCESS.studiesWrite, me.data?.roles) && (
            <>
              <Link to="/studies/new" className="btn">New study</Link>
              <Link to="/analyses" className="btn-quiet">New range study</Link>
            </>
          )
        }
      >
        Saved decompositions: a series, a vintage (pinned, or the latest), a method and its parameters — or a range study, the range of estimates across several methods.
      </PageHeader>
      <div className="mb-3 flex flex-wrap items-center gap-3">
        <input className="field max-w-xs" placeholder="Search title or series" value={q} onChange={(e) => setQ(e.target.value)} aria-label="Search studies" />
        <select className="field max-w-[14rem]" value={method} onChange={(e) => setMethod(e.target.value)} aria-label="Filter by method">
          <option value="">All methods</option>
          <option value="range">Range across methods</option>
          {methods.map((m) => (
            <option key={m.id} value={m.id}>
              {m.name}
            </option>
          ))}
        </select>
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" checked={mine} onChange={(e) => setMine(e.target.checked)} /> Only mine
        </label>
      </div>
      {studies.isPending && <Spinner />}
      <ErrorNote error={studies.error} />
      {studies.data && studies.data.length === 0 && (
        <EmptyState title="No studies yet">Open a series in the Catalogue and choose “Decompose in a study”, or start a new study here.</EmptyState>
      )}
      {studies.data && studies.data.length > 0 && (
        <DataTable
          data={studies.data}
          onRowClick={(s) => navigate(`/studies/${s.id}`)}
          testId="studies-table"
          columns={[
            { accessorKey: 'title', header: 'Title', cell: (c) => <Link to={`/studies/${c.row.original.id}`} className="font-semibold text-trend hover:underline">{c.getValue()}</Link> },
            { id: 'series', header: 'Series', accessorFn: (s) => s.series.code },
            { id: 'method', header: 'Method', accessorFn: (s) => nameOf(s) },
            { id: 'vintage', header: 'Vintage', accessorFn: (s) => (s.vintage === 'latest' ? 'latest' : `pinned: ${s.vintage}`) },
            { id: 'owner', header: 'Owner', accessorFn: (s) => s.owner.name },
            { accessorKey: 'updatedAt', header: 'Changed', cell: (c) => formatDate(c.getValue(), true) },
          ]}
        />
      )}
    </>
  );
}
