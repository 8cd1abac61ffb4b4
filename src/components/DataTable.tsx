/** A sortable table on TanStack Table, with the house style: hairlines, tabular figures for numbers. */
import { flexRender, getCoreRowModel, getFilteredRowModel, getSortedRowModel, useReactTable, type ColumnDef, type SortingState } from '@tanstack/react-table';
import { useState } from 'react';
import { ScrollRegion } from './ScrollRegion';

/** A column header read by screen readers but not shown (a column of buttons): a table header is never empty. */
export const hiddenHeader = (text: string) => () => <span className="sr-only">{text}</span>;

export interface DataTableProps<T> {
  data: T[];
  columns: ColumnDef<T, any>[];
  globalFilter?: string;
  initialSorting?: SortingState;
  empty?: string;
  onRowClick?: (row: T) => void;
  testId?: string;
  dense?: boolean;
  /** Names the table's box for keyboard users when it scrolls. */
  label?: string;
  /** Sorting done elsewhere (the server): the table shows and changes this state, and sorts nothing itself. */
  sorting?: SortingState;
  onSortingChange?: (sorting: SortingState) => void;
}

export function DataTable<T>({ data, columns, globalFilter, initialSorting = [], empty = 'Nothing here yet.', onRowClick, testId, dense, label = 'Table', sorting: outside, onSortingChange }: DataTableProps<T>) {
  const [own, setOwn] = useState<SortingState>(initialSorting);
  const sorting = outside ?? own;
  const table = useReactTable({
    data,
    columns,
    state: { sorting, globalFilter },
    manualSorting: !!outside,
    onSortingChange: (change) => {
      const next = typeof change === 'function' ? change(sorting) : change;
      if (outside) onSortingChange?.(next);
      else setOwn(next);
    },
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  const pad = dense ? 'px-2 py-1' : 'px-3 py-2';
  return (
    <ScrollRegion label={label} className="card overflow-x-auto">
      <table className="w-full border-collapse text-sm" data-testid={testId}>
        <thead>
          {table.getHeaderGroups().map((hg) => (
            <tr key={hg.id} className="border-b border-hairline bg-paper-deep/60">
              {hg.headers.map((h) => {
                const sortable = h.column.getCanSort();
                const dir = h.column.getIsSorted();
                const numeric = (h.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                return (
                  <th key={h.id} scope="col" className={`${pad} text-xs font-semibold tracking-wide text-ink-soft ${numeric ? 'text-right' : 'text-left'}`} aria-sort={dir === 'asc' ? 'ascending' : dir === 'desc' ? 'descending' : undefined}>
                    {sortable ? (
                      <button type="button" className="inline-flex items-center gap-1 hover:text-ink" onClick={h.column.getToggleSortingHandler()}>
                        {flexRender(h.column.columnDef.header, h.getContext())}
                        <span aria-hidden className="text-ink-faint">{dir === 'asc' ? '▲' : dir === 'desc' ? '▼' : '↕'}</span>
                      </button>
                    ) : (
                      flexRender(h.column.columnDef.header, h.getContext())
                    )}
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody>
          {table.getRowModel().rows.length === 0 && (
            <tr>
              <td colSpan={columns.length} className="px-3 py-8 text-center text-ink-soft">
                {empty}
              </td>
            </tr>
          )}
          {table.getRowModel().rows.map((row) => (
            <tr
              key={row.id}
              className={`border-b border-hairline last:border-0 ${onRowClick ? 'cursor-pointer hover:bg-paper-deep/50' : ''}`}
              onClick={onRowClick ? () => onRowClick(row.original) : undefined}
            >
              {row.getVisibleCells().map((cell) => {
                const numeric = (cell.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                return (
                  <td key={cell.id} className={`${pad} ${numeric ? 'num' : ''}`}>
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                );
              })}
            </tr>
          ))}
        </tbody>
      </table>
    </ScrollRegion>
  );
}
