import { notFound } from 'next/navigation';
import { StallionForm } from '@/components/forms/stallion-form';
import { clientOptions } from '@/db/queries/clients';
import { getStallion } from '@/db/queries/stallions';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import { nullIfNotFound } from '@/lib/api/errors';

export const metadata = { title: 'Edit stallion' };

export default async function EditStallionPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser(STAFF_ROLES);
  const { id } = await params;
  if (!/^\d+$/.test(id)) notFound();
  const s = await nullIfNotFound(getStallion(user, Number(id)));
  if (!s) notFound();
  return (
    <div className="space-y-4">
      <h1>Edit {s.name}</h1>
      <StallionForm
        clients={await clientOptions()}
        stallionId={s.id}
        initial={{ name: s.name, registration: s.registration, breed: s.breed, foalingYear: s.foalingYear, clientId: s.clientId, notes: s.notes }}
      />
    </div>
  );
}
