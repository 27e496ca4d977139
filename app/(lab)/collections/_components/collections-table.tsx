'use client';

import { createColumnHelper } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import { useLabTimeZone } from '@/components/time/lab-clock';
import { ExportLinks } from '@/components/history/export-links';
import { WindowFlag } from '@/components/history/window-flag';
import { DataTable } from '@/components/ui/data-table';
import { RecountFlag } from '@/components/reads/recount-flag';
import type { Collection } from '@/db/queries/collections';
import { billions, fmt, fmtDateTime } from '@/lib/format';
import { OPEN } from '@/lib/reads/kinds';

const c = createColumnHelper<Collection>();
/** The columns, with times on the lab's clock. */
const columnsFor = (timeZone: string) => [
  c.accessor('collectedAt', { id: 'collectedAt', header: 'Collected', cell: (i) => `${fmtDateTime(i.getValue(), timeZone)}${i.row.original.numberThatDay > 1 ? ` (#${i.row.original.numberThatDay})` : ''}` }),
  c.accessor('stallion', { id: 'stallion', header: 'Stallion' }),
  c.accessor('volumeMl', { id: 'volumeMl', header: 'Volume (mL)', cell: (i) => fmt(i.getValue()) }),
  c.accessor('concentrationMillionPerMl', { id: 'concentration', header: 'Conc. (10⁶/mL)', cell: (i) => fmt(i.getValue(), 0) }),
  c.accessor('progressiveMotilityPct', { id: 'progressiveMotilityPct', header: 'Progressive (%)', cell: (i) => fmt(i.getValue(), 0) }),
  c.accessor((r) => (r.volumeMl != null && r.concentrationMillionPerMl != null ? (r.volumeMl * r.concentrationMillionPerMl) / 1000 : null), {
    id: 'totalSperm',
    header: 'Total sperm',
    cell: (i) => billions(i.getValue()),
  }),
  c.accessor('firstRead', {
    id: 'firstRead',
    header: 'Morphology (first read)',
    enableSorting: false,
    cell: (i) => {
      const f = i.getValue();
      const text = f ? `${f.cells} cells · ${f.pctNormal == null ? '—' : `${fmt(f.pctNormal)} % normal`}${f.status === OPEN ? ' (in progress)' : ''}` : '—';
      return i.row.original.recountAdvised ? (
        <span>
          {text} <RecountFlag compact />
        </span>
      ) : (
        text
      );
    },
  }),
  c.accessor('daysSincePrevious', { id: 'daysSincePrevious', header: 'Days since previous', enableSorting: false, cell: (i) => fmt(i.getValue()) }),
  c.accessor('window', { id: 'window', header: 'Health-event window', enableSorting: false, cell: (i) => <WindowFlag flag={i.getValue()} compact /> }),
];

export function CollectionsTable({ stallions, stallionId }: { stallions?: { id: number; name: string }[]; stallionId?: number }) {
  const timeZone = useLabTimeZone();
  const columns = useMemo(() => columnsFor(timeZone), [timeZone]);
  const [stallion, setStallion] = useState<string>(stallionId ? String(stallionId) : '');
  const [from, setFrom] = useState('');
  const [to, setTo] = useState('');
  return (
    <div className="space-y-3">
      {stallions && (
        <div className="flex flex-wrap gap-3">
          <div>
            <label htmlFor="filter-stallion" className="label">Stallion</label>
            <select id="filter-stallion" className="input" value={stallion} onChange={(e) => setStallion(e.target.value)}>
              <option value="">All stallions</option>
              {stallions.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
            </select>
          </div>
          <div>
            <label htmlFor="filter-from" className="label">From</label>
            <input id="filter-from" type="date" className="input" value={from} onChange={(e) => setFrom(e.target.value)} />
          </div>
          <div>
            <label htmlFor="filter-to" className="label">To</label>
            <input id="filter-to" type="date" className="input" value={to} onChange={(e) => setTo(e.target.value)} />
          </div>
          <div className="flex items-end">
            <ExportLinks endpoint="/api/collections/export" params={{ stallionId: stallion || undefined, from: from || undefined, to: to || undefined }} label="Export (stallion and dates as chosen)" />
          </div>
        </div>
      )}
      <DataTable<Collection>
        label="Collections"
        endpoint="/api/collections"
        columns={columns}
        defaultSort={{ id: 'collectedAt', desc: true }}
        filters={{ stallionId: stallion || undefined, from: from || undefined, to: to || undefined }}
        rowHref={(r) => `/collections/${r.id}`}
        searchLabel="Search stallion, collector or remarks"
        empty="No collections match."
      />
    </div>
  );
}
