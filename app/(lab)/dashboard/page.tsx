import Link from 'next/link';
import { collectionsAwaitingRead, getLabOverview } from '@/db/queries/dashboard';
import { getLabSettings } from '@/db/queries/settings';
import { fmtDateTime } from '@/lib/format';
import { ROLE_LABELS, STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';

export const metadata = { title: 'Dashboard' };

export default async function DashboardPage() {
  const user = await requirePageUser(STAFF_ROLES);
  const [o, waiting, { timeZone }] = await Promise.all([getLabOverview(), collectionsAwaitingRead(), getLabSettings()]);
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
      <section aria-labelledby="worklist" className="card">
        <h2 id="worklist" className="mb-2">Waiting for a first read</h2>
        {waiting.length === 0 ? (
          <p className="text-sm text-ink-soft">Every collection with field images has a submitted first read.</p>
        ) : (
          <ul className="divide-y divide-line text-sm">
            {waiting.map((c) => (
              <li key={c.id} className="flex flex-wrap justify-between gap-2 py-2">
                <Link href={`/collections/${c.id}`}>{c.stallion} · {fmtDateTime(c.collectedAt, timeZone)}</Link>
                <span className="text-ink-soft">{c.images} image(s) · {c.started ? 'read in progress' : 'not started'}</span>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
