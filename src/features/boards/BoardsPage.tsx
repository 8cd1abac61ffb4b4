import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { Link, useNavigate } from 'react-router-dom';
import { createBoardSchema } from '@schemas/boards';
import { DataTable } from '@/components/DataTable';
import { EmptyState, ErrorNote, Field, formatDate, PageHeader, Spinner } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { useBoardMutations, useBoards } from './api';
import { ACCESS, allows } from '@schemas/access';

export function BoardsPage() {
  const me = useMe();
  const boards = useBoards();
  const { create } = useBoardMutations();
  const navigate = useNavigate();
  const form = useForm<{ title: string; description?: string; visibility: 'private' | 'team' }>({ resolver: zodResolver(createBoardSchema) as never, defaultValues: { title: '', description: '', visibility: 'team' } });
  const canCompose = allows(ACCESS.boardsWrite, me.data?.roles);
  return (
    <>
      <PageHeader title="Boards">Pages of panels shared with the team: a study, or a comparison across methods, series or vintages.</PageHeader>
      <div className="grid gap-6 lg:grid-cols-[1fr_20rem]">
        <div>
          {boards.isPending && <Spinner />}
          <ErrorNote error={boards.error} />
          {boards.data?.length === 0 && <EmptyState title="No boards yet">{canCompose ? 'Compose one on the right.' : 'Economists compose boards and share them with the team.'}</EmptyState>}
          {boards.data && boards.data.length > 0 && (
            <DataTable
              data={boards.data}
              testId="boards-table"
              onRowClick={(b) => navigate(`/boards/${b.id}`)}
              columns={[
                { accessorKey: 'title', header: 'Board', cell: (c) => <Link className="font-semibold text-trend hover:underline" to={`/boards/${c.row.original.id}`}>{c.getValue()}</Link> },
                { id: 'owner', header: 'Composed by', accessorFn: (b) => b.owner.name },
                { accessorKey: 'visibility', header: 'Shared', cell: (c) => (c.getValue() === 'team' ? 'with the team' : 'private') },
                { accessorKey: 'panelCount', header: 'Panels', meta: { numeric: true } },
                { accessorKey: 'updatedAt', header: 'Changed', cell: (c) => formatDate(c.getValue(), true) },
              ]}
            />
          )}
        </div>
        {canCompose && (
          <form noValidate className="card h-fit space-y-3 p-4" onSubmit={form.handleSubmit((v) => create.mutate(v, { onSuccess: (b) => navigate(`/boards/${b.id}`) }))} aria-label="New board">
            <h2 className="font-heading text-base font-bold">New board</h2>
            <Field label="Title" htmlFor="board-title" error={form.formState.errors.title?.message}>
              <input id="board-title" className="field" {...form.register('title')} />
            </Field>
            <Field label="Description" htmlFor="board-desc">
              <textarea id="board-desc" rows={2} className="field" {...form.register('description')} />
            </Field>
            <Field label="Shared" htmlFor="board-vis">
              <select id="board-vis" className="field" {...form.register('visibility')}>
                <option value="team">with the team</option>
                <option value="private">private (only me)</option>
              </select>
            </Field>
            <ErrorNote error={create.error} />
            <button className="btn" disabled={create.isPending}>
              Compose the board
            </button>
          </form>
        )}
      </div>
    </>
  );
}
