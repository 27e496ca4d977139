import { auditFilterOptions } from '@/db/queries/audit-log';
import { requirePageUser } from '@/lib/auth/session';
import { AuditTable } from './_components/audit-table';

export const metadata = { title: 'Audit log' };

export default async function AuditPage() {
  const user = await requirePageUser(['lab_manager']);
  const { people, entities } = await auditFilterOptions(user);
  return (
    <div className="space-y-4">
      <h1>Audit log</h1>
      <p className="text-sm text-ink-soft">
        Who changed what and when, with the record before and after. The log is append-only: the database lets the app add to it, never change or
        remove an entry.
      </p>
      <AuditTable people={people} entities={entities} />
    </div>
  );
}
