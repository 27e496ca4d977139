import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import { ReportsTable } from './_components/reports-table';

export const metadata = { title: 'Signed reports' };

export default async function ReportsPage() {
  await requirePageUser(STAFF_ROLES);
  return (
    <div className="space-y-4">
      <h1>Signed reports</h1>
      <p className="text-sm text-ink-soft">Every signed version, newest first. A draft is on its collection’s report page until a veterinarian signs it.</p>
      <ReportsTable />
    </div>
  );
}
