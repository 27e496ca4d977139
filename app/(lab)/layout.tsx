import { AppShell } from '@/components/shell/app-shell';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';

export default async function LabLayout({ children }: { children: React.ReactNode }) {
  const user = await requirePageUser(STAFF_ROLES);
  return <AppShell user={user}>{children}</AppShell>;
}
