import Link from 'next/link';
import { getLabOverview } from '@/db/queries/dashboard';
import { ROLE_LABELS, STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';

export const metadata = { title: 'Dashboard' };

export default async function DashboardPage() {
  const user = await requirePageUser(STAFF_ROLES);
  const o = await getLabOverview();
  const tiles = [
    { label: 'Stallions on file', value: o.stallions, href: '/stallions' },
    { label: 'Collections in the last 30 days', value: o.collectionsLast30Days, href: '/collections' },
    { label: 'Clients', value: o.clients, href: '/clients' },
  ];
  return (
    <div className="space-y-6">
      <div>
        <h1>Good to see you, {user.name.split(' ')[0]}</h1>
        <p className="text-sm text-ink-soft">Signed in as {ROLE_LABELS[user.role]}.</p>
      </div>
      <ul className="grid gap-4 sm:grid-cols-3">
        {tiles.map((t) => (
          <li key={t.label}>
            <Link href={t.href} className="card block no-underline hover:border-brand hover:no-underline">
              <span className="block text-3xl font-semibold text-ink">{t.value}</span>
              <span className="text-sm text-ink-soft">{t.label}</span>
            </Link>
          </li>
        ))}
      </ul>
    </div>
  );
}
