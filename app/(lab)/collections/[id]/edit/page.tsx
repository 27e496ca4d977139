import { notFound } from 'next/navigation';
import { CollectionForm } from '@/components/forms/collection-form';
import { getCollection } from '@/db/queries/collections';
import { stallionOptions } from '@/db/queries/stallions';
import { nullIfNotFound } from '@/lib/api/errors';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';

export const metadata = { title: 'Edit collection' };

export default async function EditCollectionPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser(STAFF_ROLES);
  const { id } = await params;
  if (!/^\d+$/.test(id)) notFound();
  const [c, stallions] = await Promise.all([nullIfNotFound(getCollection(user, Number(id))), stallionOptions()]);
  if (!c) notFound();
  const { id: _id, stallion, recordedBy, daysSincePrevious, numberThatDay, firstRead, recountAdvised, collectedAt, ...values } = c;
  return (
    <div className="space-y-4">
      <h1>Edit collection of {stallion}</h1>
      <CollectionForm stallions={stallions} collectionId={c.id} initial={{ ...values, collectedAt }} />
    </div>
  );
}
