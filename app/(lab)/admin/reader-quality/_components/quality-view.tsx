'use client';

import { createColumnHelper, flexRender, getCoreRowModel, getSortedRowModel, useReactTable, type SortingState } from '@tanstack/react-table';
import dynamic from 'next/dynamic';
import { useState } from 'react';
import type { ReaderQualityReport } from '@/db/queries/reader-quality';
import type { ReaderQuality } from '@/lib/agreement/quality';
import { fmt } from '@/lib/format';

const ReaderChart = dynamic(() => import('./reader-chart').then((m) => m.ReaderChart), { ssr: false, loading: () => <div className="h-48" /> });

const signed = (v: number | null) => (v === null ? '—' : `${v > 0 ? '+' : v < 0 ? '−' : '±'}${fmt(Math.abs(v), 1)}`);
const n = (k: number) => <span className="text-xs text-ink-faint"> ({k} coll.)</span>;
const col = createColumnHelper<ReaderQuality>();

/** The per-reader table (sorted in the browser: one row per reader) and a small chart per reader. */
export function QualityView({ report, timeZone }: { report: ReaderQualityReport; timeZone: string }) {
  const [sorting, setSorting] = useState<SortingState>([{ id: 'reader', desc: false }]);
  const name = (k: string) => report.classNames[k] ?? k;
  const columns = [
    col.accessor((r) => r.reader.name, { id: 'reader', header: 'Reader' }),
    col.accessor('asFirst', { header: 'Read first' }),
    col.accessor('asSecond', { header: 'Read second' }),
    col.accessor((r) => r.meanKappa ?? -2, {
      id: 'kappa',
      header: 'Mean kappa',
      cell: (c) => <>{c.row.original.meanKappa === null ? '—' : fmt(c.row.original.meanKappa, 2)}{n(c.row.original.kappaCollections)}</>,
    }),
    col.accessor((r) => r.meanBias ?? Number.NEGATIVE_INFINITY, {
      id: 'bias',
      header: 'Bias in % normal',
      cell: (c) => <>{signed(c.row.original.meanBias)} points{n(c.row.original.biasCollections)}</>,
    }),
    col.accessor((r) => (r.exceededCollections ? r.exceeded / r.exceededCollections : -1), {
      id: 'exceeded',
      header: 'Over the acceptable difference',
      cell: (c) => <>{c.row.original.exceeded} of {c.row.original.exceededCollections}</>,
    }),
    col.accessor((r) => r.confusedCells, {
      id: 'confused',
      header: 'Confused most',
      cell: (c) => {
        const top = c.row.original.confusions[0];
        return top ? <>{name(top.said)} for {name(top.otherSaid)} ({top.count} of {c.row.original.confusedCells} cells)</> : '—';
      },
    }),
  ];
  const table = useReactTable({ data: report.readers, columns, state: { sorting }, onSortingChange: setSorting, getCoreRowModel: getCoreRowModel(), getSortedRowModel: getSortedRowModel(), enableSortingRemoval: false });

  if (report.readers.length === 0) return <p className="card text-sm">No submitted reads of collections collected from {report.from} to {report.to}.</p>;
  return (
    <div className="space-y-4">
      <p className="text-sm">
        {report.from} to {report.to}: {report.comparedCollections} collection{report.comparedCollections === 1 ? '' : 's'} read by two readers.
        Bias is this reader’s % normal minus the other reader’s (positive: calls more cells normal).
      </p>
      <div className="card overflow-x-auto p-0">
        <table aria-label="Reader quality" className="w-full text-sm">
          <thead>
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>
                {g.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  return (
                    <th key={h.id} className="th whitespace-nowrap" aria-sort={sorted ? (sorted === 'desc' ? 'descending' : 'ascending') : undefined}>
                      <button type="button" className="inline-flex items-center gap-1 font-medium hover:text-ink" onClick={h.column.getToggleSortingHandler()}>
                        {flexRender(h.column.columnDef.header, h.getContext())}
                        <span aria-hidden="true">{sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : ''}</span>
                      </button>
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((r) => (
              <tr key={r.id}>
                {r.getVisibleCells().map((c) => (
                  <td key={c.id} className={c.column.id === 'confused' ? 'td min-w-56' : 'td whitespace-nowrap'}>{flexRender(c.column.columnDef.cell, c.getContext())}</td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <div className="grid gap-4 lg:grid-cols-2">
        {table.getRowModel().rows.map(({ original: r }) => (
          <section key={r.reader.id} aria-label={`${r.reader.name}: collection by collection`} className="card space-y-2">
            <h2 className="text-base">{r.reader.name}</h2>
            <p className="text-xs text-ink-faint">Each bar: one collection, this reader’s % normal minus the other reader’s (points); the line: kappa with the other reader.</p>
            <ReaderChart points={r.points} timeZone={timeZone} />
            {r.confusions.length > 0 ? (
              <div>
                <h3 className="text-sm font-medium">Classes confused most (paired cells given another class)</h3>
                <ul className="text-sm">
                  {r.confusions.map((c) => (
                    <li key={c.said + c.otherSaid}>
                      {name(c.said)} where the other reader said {name(c.otherSaid)}: {c.count} cell{c.count === 1 ? '' : 's'}
                    </li>
                  ))}
                </ul>
              </div>
            ) : (
              <p className="text-sm text-ink-soft">No paired cell given another class.</p>
            )}
          </section>
        ))}
      </div>
    </div>
  );
}
