import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import Link from 'next/link';
import { StallionsTable } from './_components/stallions-table';

export const metadata = { title: 'Stallions' };

export default async function StallionsPage() {
  await requirePageUser(STAFF_ROLES);
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h1>Stallions</h1>
        <Link href="/stallions/new" className="btn no-underline hover:no-underline">New stallion</Link>
      </div>
      <StallionsTable />
    </div>
  );
}
