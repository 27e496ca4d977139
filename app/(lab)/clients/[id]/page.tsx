import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import { notFound } from 'next/navigation';
import { ClientForm } from '@/components/forms/client-form';
import { getClient } from '@/db/queries/clients';
import { StallionsTable } from '../../stallions/_components/stallions-table';
import { nullIfNotFound } from '@/lib/api/errors';

export const metadata = { title: 'Client' };

export default async function ClientPage({ params }: { params: Promise<{ id: string }> }) {
  await requirePageUser(STAFF_ROLES);
  const { id } = await params;
  if (!/^\d+$/.test(id)) notFound();
  const c = await nullIfNotFound(getClient(Number(id)));
  if (!c) notFound();
  return (
    <div className="space-y-6">
      <h1>{c.name}</h1>
      <section aria-labelledby="cs" className="space-y-3">
        <h2 id="cs">Stallions</h2>
        <StallionsTable clientId={c.id} />
      </section>
      <section aria-labelledby="cd" className="card">
        <h2 id="cd" className="mb-3">Details</h2>
        <ClientForm clientId={c.id} initial={{ name: c.name, kind: c.kind, email: c.email, phone: c.phone, address: c.address, notes: c.notes }} />
      </section>
    </div>
  );
}
