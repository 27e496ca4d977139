'use client';

import { createColumnHelper } from '@tanstack/react-table';
import { useMemo } from 'react';
import { DataTable } from '@/components/ui/data-table';
import { useLabTimeZone } from '@/components/time/lab-clock';
import { fmtDate } from '@/lib/format';
import type { Stallion } from '@/db/queries/stallions';

const c = createColumnHelper<Stallion>();
/** The columns, with dates on the lab's calendar. */
const columnsFor = (timeZone: string) => [
  c.accessor('name', { id: 'name', header: 'Name' }),
  c.accessor('breed', { id: 'breed', header: 'Breed', cell: (i) => i.getValue() ?? '—' }),
  c.accessor('foalingYear', { id: 'foalingYear', header: 'Foaled', cell: (i) => i.getValue() ?? '—' }),
  c.accessor('owner', { id: 'owner', header: 'Owner' }),
  c.accessor('registration', { id: 'registration', header: 'Registration / microchip', enableSorting: false, cell: (i) => i.getValue() ?? '—' }),
  c.accessor('collections', { id: 'collections', header: 'Collections' }),
  c.accessor('lastCollection', { id: 'lastCollection', header: 'Last collection', cell: (i) => (i.getValue() ? fmtDate(i.getValue()!, timeZone) : '—') }),
];

export function StallionsTable({ clientId }: { clientId?: number }) {
  const timeZone = useLabTimeZone();
  const columns = useMemo(() => columnsFor(timeZone), [timeZone]);
  return (
    <DataTable<Stallion>
      label="Stallions"
      endpoint="/api/stallions"
      columns={columns}
      defaultSort={{ id: 'name', desc: false }}
      filters={{ clientId }}
      rowHref={(s) => `/stallions/${s.id}`}
      searchLabel="Search name, breed, owner or number"
      empty="No stallions match."
    />
  );
}
