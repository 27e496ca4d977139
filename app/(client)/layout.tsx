import { AppShell } from '@/components/shell/app-shell';
import { requirePageUser } from '@/lib/auth/session';

export default async function ClientLayout({ children }: { children: React.ReactNode }) {
  const user = await requirePageUser(['client']);
  return <AppShell user={user}>{children}</AppShell>;
}
