import { useState } from 'react';
import { Link, useNavigate } from 'react-router-dom';
import { DataTable } from '@/components/DataTable';
import { EmptyState, ErrorNote, formatDate, PageHeader, Spinner, Tabs } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { useExhibits, useReviewQueue } from './api';
import { StateBadge } from './ExhibitPage';
import { ACCESS, allows } from '@schemas/access';

export function ExhibitsPage() {
  const me = useMe();
  const isWriter = allows(ACCESS.exhibitsDraft, me.data?.roles);
  const [tab, setTab] = useState<'published' | 'mine' | 'all'>(isWriter ? 'mine' : 'published');
  const list = useExhibits(tab === 'published' ? { status: 'published' } : tab === 'mine' ? { mine: true } : {});
  const navigate = useNavigate();
  const tabs: [typeof tab, string][] = [['published', 'Published'], ...(isWriter ? ([['mine', 'Mine']] as [typeof tab, string][]) : []), ...(allows(['editor', 'admin'], me.data?.roles) ? ([['all', 'All I can see']] as [typeof tab, string][]) : [])];
  return (
    <>
      <PageHeader title="Exhibits">Charts prepared for publication. An exhibit renders from the data frozen when it was submitted.</PageHeader>
      <Tabs tabs={tabs} value={tab} onChange={setTab} label="Which exhibits">
        {list.isPending && <Spinner />}
        <ErrorNote error={list.error} />
        {list.data?.length === 0 && <EmptyState title="No exhibits here">{isWriter ? 'Draft one from a study or a board panel.' : 'Published exhibits appear here.'}</EmptyState>}
        {list.data && list.data.length > 0 && (
          <DataTable
            data={list.data}
            testId="exhibits-table"
            onRowClick={(e) => navigate(`/exhibits/${e.id}`)}
            columns={[
              { accessorKey: 'title', header: 'Title', cell: (c) => <Link className="font-semibold text-trend hover:underline" to={`/exhibits/${c.row.original.id}`}>{c.getValue()}</Link> },
              { accessorKey: 'status', header: 'State', cell: (c) => <StateBadge state={c.getValue()} /> },
              { id: 'author', header: 'Author', accessorFn: (e) => e.author.name },
              { accessorKey: 'revision', header: 'Revision', meta: { numeric: true } },
              { accessorKey: 'updatedAt', header: 'Changed', cell: (c) => formatDate(c.getValue(), true) },
            ]}
          />
        )}
      </Tabs>
    </>
  );
}

export function ReviewDeskPage() {
  const queue = useReviewQueue();
  const navigate = useNavigate();
  return (
    <>
      <PageHeader title="Review desk">Exhibits submitted for review, the oldest first. Nobody reviews their own exhibit.</PageHeader>
      {queue.isPending && <Spinner />}
      <ErrorNote error={queue.error} />
      {queue.data?.length === 0 && <EmptyState title="Nothing waits for review">Submitted exhibits appear here; editors are told by mail.</EmptyState>}
      {queue.data && queue.data.length > 0 && (
        <DataTable
          data={queue.data}
          testId="review-queue"
          onRowClick={(e) => navigate(`/exhibits/${e.id}`)}
          columns={[
            { accessorKey: 'submittedAt', header: 'Submitted', cell: (c) => formatDate(c.getValue(), true) },
            { accessorKey: 'title', header: 'Title', cell: (c) => <Link className="font-semibold text-trend hover:underline" to={`/exhibits/${c.row.original.id}`}>{c.getValue()}</Link> },
            { id: 'author', header: 'Author', accessorFn: (e) => e.author.name + (e.own ? ' (you)' : '') },
            { id: 'kind', header: 'Kind', accessorFn: (e) => (e.updateOf ? `update of exhibit ${e.updateOf}` : 'new') },
            { accessorKey: 'revision', header: 'Revision', meta: { numeric: true } },
          ]}
        />
      )}
    </>
  );
}
