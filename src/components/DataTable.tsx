/**
 * The one table every screen uses: TanStack Table with click-to-sort
 * headers and a text filter over all columns. It renders what it is given.
 */
import { flexRender, getCoreRowModel, getFilteredRowModel, getSortedRowModel, useReactTable, type ColumnDef, type SortingState } from '@tanstack/react-table';
import { useState, type ReactNode } from 'react';

interface Props<T> {
  data: T[];
  columns: ColumnDef<T, any>[];
  empty: ReactNode;
  filterPlaceholder?: string;
  initialSort?: SortingState;
  label: string;
  toolbar?: ReactNode;
}

export function DataTable<T>({ data, columns, empty, filterPlaceholder = 'Filter…', initialSort = [], label, toolbar }: Props<T>) {
  const [sorting, setSorting] = useState<SortingState>(initialSort);
  const [filter, setFilter] = useState('');
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
  const rows = table.getRowModel().rows;
  return (
    <div>
      <div className="flex items-center gap-2 px-3 py-2">
        <input
          className="field max-w-64"
          type="search"
          aria-label={`Filter ${label}`}
          placeholder={filterPlaceholder}
          value={filter}
          onChange={(e) => setFilter(e.target.value)}
        />
        <span className="text-[12px] text-muted">
          {rows.length} of {data.length} {label}
        </span>
        <div className="ml-auto flex items-center gap-2">{toolbar}</div>
      </div>
      <div className="overflow-x-auto">
        <table className="tbl" aria-label={label}>
          <thead>
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  return (
                    <th key={h.id} aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined}>
                      {h.column.getCanSort() ? (
                        <button type="button" className="cursor-pointer uppercase" onClick={h.column.getToggleSortingHandler()}>
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          <span aria-hidden className="ml-1 inline-block w-2">
                            {sorted === 'asc' ? '▴' : sorted === 'desc' ? '▾' : ''}
                          </span>
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
            {rows.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="py-6 text-center text-muted">
                  {data.length === 0 ? empty : 'Nothing matches the filter.'}
                </td>
              </tr>
            ) : (
              rows.map((r) => (
                <tr key={r.id}>
                  {r.getVisibleCells().map((c) => (
                    <td key={c.id}>{flexRender(c.column.columnDef.cell, c.getContext())}</td>
                  ))}
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
    </div>
  );
}
