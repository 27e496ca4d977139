import { CollectionForm } from '@/components/forms/collection-form';
import { stallionOptions } from '@/db/queries/stallions';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';

export const metadata = { title: 'Record a collection' };

export default async function NewCollectionPage({ searchParams }: { searchParams: Promise<{ stallionId?: string }> }) {
  await requirePageUser(STAFF_ROLES);
  const [{ stallionId }, stallions] = await Promise.all([searchParams, stallionOptions()]);
  return (
    <div className="space-y-4">
      <h1>Record a collection</h1>
      <CollectionForm stallions={stallions} initial={stallionId && /^\d+$/.test(stallionId) ? { stallionId } : undefined} />
    </div>
  );
}
