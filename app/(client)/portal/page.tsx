import Link from 'next/link';
import { listReports } from '@/db/queries/reports';
import { getLabSettings } from '@/db/queries/settings';
import { ownStallions } from '@/db/queries/stallions';
import { requirePageUser } from '@/lib/auth/session';
import { fmtDate } from '@/lib/format';
import { reportStatusLabel } from '@/lib/reports/status';

export const metadata = { title: 'My stallions' };

export default async function PortalPage() {
  const user = await requirePageUser(['client']);
  // Both queries take the signed-in user and return only this client's stallions and reports.
  const [stallions, reports, { timeZone }] = await Promise.all([
    ownStallions(user),
    listReports(user, { page: 1, pageSize: 100, sort: 'collectedAt', dir: 'desc', status: 'latest' }),
    getLabSettings(),
  ]);
  return (
    <div className="space-y-4">
      <h1>My stallions</h1>
      <p className="text-sm text-ink-soft">The signed morphology reports of your stallions, newest collection first. Each report can be checked by anyone holding its verification code.</p>
      {stallions.length === 0 ? (
        <p className="card">No stallions are linked to your account yet.</p>
      ) : (
        <ul className="grid gap-3 lg:grid-cols-2">
          {stallions.map((s) => {
            const own = reports.rows.filter((r) => r.stallionId === s.id);
            return (
              <li key={s.id} className="card space-y-2">
                <div>
                  <h2><Link href={`/portal/stallions/${s.id}`}>{s.name}</Link></h2>
                  <p className="text-sm text-ink-soft">{[s.breed, s.registration].filter(Boolean).join(' · ')}</p>
                </div>
                {own.length === 0 ? (
                  <p className="text-sm text-ink-soft">No signed report yet.</p>
                ) : (
                  <ul aria-label={`Signed reports of ${s.name}`} className="divide-y divide-line text-sm">
                    {own.map((r) => (
                      <li key={r.id} className="flex flex-wrap justify-between gap-2 py-1.5">
                        <Link href={`/portal/reports/${r.id}`}>Collected {fmtDate(r.collectedAt, timeZone)} — version {r.version}</Link>
                        <span className={r.status === 'current' ? 'text-ok' : 'text-warn'}>{reportStatusLabel(r.status)}</span>
                      </li>
                    ))}
                  </ul>
                )}
                <p className="text-sm"><Link href={`/portal/stallions/${s.id}`}>All reports of {s.name}, earlier versions included</Link></p>
              </li>
            );
          })}
        </ul>
      )}
    </div>
  );
}
