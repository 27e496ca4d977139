'use client';

import { createColumnHelper } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import { useLabTimeZone } from '@/components/time/lab-clock';
import { DataTable } from '@/components/ui/data-table';
import type { ReportListItem } from '@/db/queries/reports';
import { fmtDateTime } from '@/lib/format';
import { reportStatusLabel } from '@/lib/reports/status';

const c = createColumnHelper<ReportListItem>();
const columnsFor = (timeZone: string) => [
  c.accessor('signedAt', { id: 'signedAt', header: 'Signed', cell: (i) => fmtDateTime(i.getValue(), timeZone) }),
  c.accessor('stallionName', { id: 'stallion', header: 'Stallion' }),
  c.accessor('collectedAt', { id: 'collectedAt', header: 'Collected', cell: (i) => fmtDateTime(i.getValue(), timeZone) }),
  c.accessor('version', { id: 'version', header: 'Version', enableSorting: false }),
  c.accessor('status', { id: 'status', header: 'Status', enableSorting: false, cell: (i) => reportStatusLabel(i.getValue()) }),
  c.accessor('signedBy', { id: 'signedBy', header: 'Signed by', enableSorting: false }),
  c.accessor((r) => r.pdf.status, { id: 'pdf', header: 'PDF', enableSorting: false, cell: (i) => ({ stored: 'stored', preparing: 'preparing…', failed: 'failed' })[i.getValue()] }),
  c.accessor('verificationCode', { id: 'code', header: 'Verification code', enableSorting: false, cell: (i) => <span className="font-mono text-xs">{i.getValue()}</span> }),
];

export function ReportsTable() {
  const timeZone = useLabTimeZone();
  const columns = useMemo(() => columnsFor(timeZone), [timeZone]);
  const [status, setStatus] = useState('all');
  return (
    <div className="space-y-3">
      <div>
        <label htmlFor="filter-status" className="label">Status</label>
        <select id="filter-status" className="input max-w-60" value={status} onChange={(e) => setStatus(e.target.value)}>
          <option value="all">All versions</option>
          <option value="current">Current</option>
          <option value="amended">Being amended</option>
          <option value="superseded">Superseded</option>
        </select>
      </div>
      <DataTable<ReportListItem>
        label="Signed reports"
        endpoint="/api/reports"
        columns={columns}
        defaultSort={{ id: 'signedAt', desc: true }}
        filters={{ status }}
        rowHref={(r) => `/reports/${r.id}`}
        searchLabel="Search stallion or verification code"
        empty="No signed reports yet."
      />
    </div>
  );
}
