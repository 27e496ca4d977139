import { AppShell } from '@/components/shell/app-shell';
import { requirePageUser } from '@/lib/auth/session';

export default async function CommonLayout({ children }: { children: React.ReactNode }) {
  const user = await requirePageUser();
  return <AppShell user={user}>{children}</AppShell>;
}
