'use client';

import { flexRender, getCoreRowModel, useReactTable, type ColumnDef, type SortingState } from '@tanstack/react-table';
import Link from 'next/link';
import { useEffect, useState } from 'react';
import { useList, type ListParams } from '@/lib/hooks/use-list';

type Props<T> = {
  /** Accessible name of the table. */
  label: string;
  endpoint: string;
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- TanStack Table's own idiom: each column has its own value type, so a list of them can only say any.
  columns: ColumnDef<T, any>[];
  defaultSort: { id: string; desc: boolean };
  filters?: ListParams;
  rowHref?: (row: T) => string;
  searchLabel?: string;
  empty?: string;
};

/** A table whose sorting, filtering and paging happen on the server (TanStack Table in manual mode). */
export function DataTable<T extends { id: number }>({ label, endpoint, columns, defaultSort, filters = {}, rowHref, searchLabel = 'Search', empty = 'Nothing here yet.' }: Props<T>) {
  const [sorting, setSorting] = useState<SortingState>([defaultSort]);
  const [page, setPage] = useState(1);
  const [pageSize, setPageSize] = useState(25);
  const [search, setSearch] = useState('');
  const [q, setQ] = useState('');
  useEffect(() => {
    const t = setTimeout(() => setQ(search.trim()), 250);
    return () => clearTimeout(t);
  }, [search]);
  const filterKey = JSON.stringify(filters);
  useEffect(() => setPage(1), [q, filterKey, pageSize]);

  const sort = sorting[0] ?? defaultSort;
  const { data, error, isLoading, isValidating } = useList<T>(endpoint, { ...filters, q, page, pageSize, sort: sort.id, dir: sort.desc ? 'desc' : 'asc' });
  const table = useReactTable({
    data: data?.rows ?? [],
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    manualSorting: true,
    manualPagination: true,
    enableSortingRemoval: false,
    getCoreRowModel: getCoreRowModel(),
  });
  const total = data?.total ?? 0;
  const pages = Math.max(1, Math.ceil(total / pageSize));

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-end gap-3">
        <div className="min-w-48 flex-1">
          <label htmlFor={`${label}-search`} className="label">{searchLabel}</label>
          <input id={`${label}-search`} type="search" className="input" value={search} onChange={(e) => setSearch(e.target.value)} />
        </div>
        <div>
          <label htmlFor={`${label}-size`} className="label">Rows per page</label>
          <select id={`${label}-size`} className="input" value={pageSize} onChange={(e) => setPageSize(Number(e.target.value))}>
            {[10, 25, 50, 100].map((n) => <option key={n}>{n}</option>)}
          </select>
        </div>
      </div>
      {error && <p role="alert" className="rounded-md bg-danger-bg px-3 py-2 text-sm text-danger">{error.message}</p>}
      <div className="overflow-x-auto rounded-lg border border-line bg-paper-raised">
        <table aria-label={label} aria-busy={isLoading || isValidating}>
          <thead>
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  const canSort = h.column.getCanSort();
                  return (
                    <th key={h.id} className="th whitespace-nowrap" aria-sort={sorted ? (sorted === 'desc' ? 'descending' : 'ascending') : undefined}>
                      {canSort ? (
                        <button type="button" className="inline-flex items-center gap-1 font-medium hover:text-ink" onClick={h.column.getToggleSortingHandler()}>
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          <span aria-hidden className="text-xs">{sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}</span>
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
              <tr key={row.original.id} className="hover:bg-paper-sunk">
                {row.getVisibleCells().map((cell, i) => (
                  <td key={cell.id} className="td">
                    {i === 0 && rowHref ? <Link href={rowHref(row.original)} className="font-medium">{flexRender(cell.column.columnDef.cell, cell.getContext())}</Link> : flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
            {!isLoading && total === 0 && (
              <tr><td className="td text-ink-soft" colSpan={columns.length}>{empty}</td></tr>
            )}
            {isLoading && (
              <tr><td className="td text-ink-soft" colSpan={columns.length}>Loading…</td></tr>
            )}
          </tbody>
        </table>
      </div>
      <nav aria-label={`${label} pages`} className="flex items-center justify-between text-sm">
        <span className="text-ink-soft">{total === 0 ? 'No rows' : `Rows ${(page - 1) * pageSize + 1}–${Math.min(page * pageSize, total)} of ${total}`}</span>
        <span className="flex items-center gap-2">
          <button type="button" className="btn-secondary py-1" disabled={page <= 1} onClick={() => setPage((p) => p - 1)}>Previous page</button>
          <span>Page {page} of {pages}</span>
          <button type="button" className="btn-secondary py-1" disabled={page >= pages} onClick={() => setPage((p) => p + 1)}>Next page</button>
        </span>
      </nav>
    </div>
  );
}
