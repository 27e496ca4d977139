import { redirect } from 'next/navigation';
import { isStaff } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';

export default async function Home() {
  const user = await requirePageUser();
  redirect(isStaff(user.role) ? '/dashboard' : '/portal');
}
