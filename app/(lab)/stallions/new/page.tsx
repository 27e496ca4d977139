import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import { StallionForm } from '@/components/forms/stallion-form';
import { clientOptions } from '@/db/queries/clients';

export const metadata = { title: 'New stallion' };

export default async function NewStallionPage() {
  await requirePageUser(STAFF_ROLES);
  return (
    <div className="space-y-4">
      <h1>New stallion</h1>
      <StallionForm clients={await clientOptions()} />
    </div>
  );
}
