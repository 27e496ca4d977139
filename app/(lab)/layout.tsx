import { AppShell } from '@/components/shell/app-shell';
import { LabClockProvider } from '@/components/time/lab-clock';
import { getLabSettings } from '@/db/queries/settings';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';

export default async function LabLayout({ children }: { children: React.ReactNode }) {
  const user = await requirePageUser(STAFF_ROLES);
  const { timeZone } = await getLabSettings();
  return (
    <AppShell user={user}>
      <LabClockProvider timeZone={timeZone}>{children}</LabClockProvider>
    </AppShell>
  );
}
