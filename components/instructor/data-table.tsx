'use client';
import { useState } from 'react';
import {
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnDef,
  type SortingState,
} from '@tanstack/react-table';
import { TableScroll } from '@/components/ui/table-scroll';

/** A table that sorts by any column header and filters on a typed text, for staff lists. */
export function DataTable<T>({
  data,
  columns,
  label,
  filterPlaceholder = 'Filter…',
  numeric = [],
}: {
  data: T[];
  columns: ColumnDef<T, unknown>[];
  label: string;
  filterPlaceholder?: string;
  numeric?: string[];
}) {
  const [sorting, setSorting] = useState<SortingState>([]);
  const [filter, setFilter] = useState('');
  // eslint-disable-next-line react-hooks/incompatible-library -- TanStack Table keeps its own state; this component is left unmemoised by the compiler
  const table = useReactTable({
    data,
    columns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  const id = label.toLowerCase().replace(/[^a-z0-9]+/g, '-');
  return (
    <div>
      <label htmlFor={`${id}-filter`} className="sr-only">
        Filter {label}
      </label>
      <input
        id={`${id}-filter`}
        className="field mb-2 max-w-xs"
        placeholder={filterPlaceholder}
        value={filter}
        onChange={(e) => setFilter(e.target.value)}
      />
      <TableScroll label={`${label}, scrollable`}>
        <table className="data-table" aria-label={label}>
          <thead>
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  return (
                    <th
                      key={h.id}
                      className={numeric.includes(h.column.id) ? 'num' : undefined}
                      aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none'}
                    >
                      {h.column.getCanSort() ? (
                        <button type="button" className="uppercase" onClick={h.column.getToggleSortingHandler()}>
                          {flexRender(h.column.columnDef.header, h.getContext())} {sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : ''}
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
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id}>
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className={numeric.includes(cell.column.id) ? 'num' : undefined}>
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
            {table.getRowModel().rows.length === 0 && (
              <tr>
                <td colSpan={columns.length} className="text-ink-soft">
                  Nothing to show.
                </td>
              </tr>
            )}
          </tbody>
        </table>
      </TableScroll>
    </div>
  );
}
