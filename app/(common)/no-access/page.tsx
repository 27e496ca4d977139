import Link from 'next/link';
import { requirePageUser } from '@/lib/auth/session';
import { isStaff } from '@/lib/auth/roles';

export const metadata = { title: 'No access' };

export default async function NoAccessPage() {
  const user = await requirePageUser();
  const home = isStaff(user.role) ? '/dashboard' : '/portal';
  return (
    <div className="card max-w-xl">
      <h1 className="mb-2">You do not have access to that page</h1>
      <p className="text-ink-soft">
        Your account’s role does not include it. If you need it for your work, ask the lab manager.
      </p>
      <p className="mt-4">
        <Link href={home}>Go to your start page</Link>
      </p>
    </div>
  );
}
