import { notFound } from 'next/navigation';
import { CollectionForm } from '@/components/forms/collection-form';
import { getCollection } from '@/db/queries/collections';
import { stallionOptions } from '@/db/queries/stallions';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';

export const metadata = { title: 'Edit collection' };

export default async function EditCollectionPage({ params }: { params: Promise<{ id: string }> }) {
  await requirePageUser(STAFF_ROLES);
  const { id } = await params;
  if (!/^\d+$/.test(id)) notFound();
  const [c, stallions] = await Promise.all([getCollection(Number(id)).catch(() => null), stallionOptions()]);
  if (!c) notFound();
  const { id: _id, stallion, recordedBy, daysSincePrevious, numberThatDay, collectedAt, ...values } = c;
  return (
    <div className="space-y-4">
      <h1>Edit collection of {stallion}</h1>
      <CollectionForm stallions={stallions} collectionId={c.id} initial={{ ...values, collectedAt }} />
    </div>
  );
}
