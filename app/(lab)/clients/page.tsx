import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import { ClientForm } from '@/components/forms/client-form';
import { ClientsTable } from './_components/clients-table';

export const metadata = { title: 'Clients' };

export default async function ClientsPage() {
  await requirePageUser(STAFF_ROLES);
  return (
    <div className="space-y-6">
      <h1>Clients</h1>
      <p className="text-sm text-ink-soft">Stallion owners and referring vets. Signed reports go to them.</p>
      <ClientsTable />
      <details className="card">
        <summary className="cursor-pointer font-medium text-brand-dark">Add a client</summary>
        <div className="mt-4"><ClientForm /></div>
      </details>
    </div>
  );
}
