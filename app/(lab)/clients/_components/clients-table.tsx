'use client';

import { createColumnHelper } from '@tanstack/react-table';
import { DataTable } from '@/components/ui/data-table';
import type { Client } from '@/db/queries/clients';

const c = createColumnHelper<Client>();
const columns = [
  c.accessor('name', { id: 'name', header: 'Name' }),
  c.accessor('kind', { id: 'kind', header: 'Kind', cell: (i) => (i.getValue() === 'owner' ? 'Owner' : 'Referring vet') }),
  c.accessor('email', { id: 'email', header: 'E-mail', cell: (i) => i.getValue() ?? '—' }),
  c.accessor('phone', { id: 'phone', header: 'Phone', enableSorting: false, cell: (i) => i.getValue() ?? '—' }),
  c.accessor('stallions', { id: 'stallions', header: 'Stallions' }),
];

export function ClientsTable() {
  return <DataTable<Client> label="Clients" endpoint="/api/clients" columns={columns} defaultSort={{ id: 'name', desc: false }} rowHref={(r) => `/clients/${r.id}`} searchLabel="Search name or e-mail" empty="No clients match." />;
}
