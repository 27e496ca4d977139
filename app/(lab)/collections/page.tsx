import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import Link from 'next/link';
import { stallionOptions } from '@/db/queries/stallions';
import { CollectionsTable } from './_components/collections-table';

export const metadata = { title: 'Collections' };

export default async function CollectionsPage() {
  await requirePageUser(STAFF_ROLES);
  const stallions = await stallionOptions();
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h1>Collections</h1>
        <Link href="/collections/new" className="btn no-underline hover:no-underline">Record a collection</Link>
      </div>
      <CollectionsTable stallions={stallions} />
    </div>
  );
}
