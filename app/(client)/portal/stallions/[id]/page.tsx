import Link from 'next/link';
import { notFound } from 'next/navigation';
import { listReports } from '@/db/queries/reports';
import { getLabSettings } from '@/db/queries/settings';
import { getStallion } from '@/db/queries/stallions';
import { nullIfNotFound } from '@/lib/api/errors';
import { requirePageUser } from '@/lib/auth/session';
import { fmtDate, fmtDateTime } from '@/lib/format';
import { reportStatusLabel } from '@/lib/reports/status';

export const metadata = { title: 'Reports of my stallion' };

export default async function PortalStallionPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser(['client']);
  const { id } = await params;
  if (!/^\d+$/.test(id)) notFound();
  // Another owner's stallion is "not found" for this client.
  const stallion = await nullIfNotFound(getStallion(user, Number(id)));
  if (!stallion) notFound();
  const [reports, { timeZone }] = await Promise.all([
    listReports(user, { page: 1, pageSize: 100, sort: 'collectedAt', dir: 'desc', status: 'all', stallionId: stallion.id }),
    getLabSettings(),
  ]);
  return (
    <div className="space-y-4">
      <p className="text-sm"><Link href="/portal">My stallions</Link></p>
      <h1>{stallion.name}</h1>
      <p className="text-sm text-ink-soft">{[stallion.breed, stallion.registration].filter(Boolean).join(' · ')}</p>
      {reports.rows.length === 0 ? (
        <p className="card">No signed report yet.</p>
      ) : (
        <table aria-label={`Signed reports of ${stallion.name}`} className="card">
          <thead><tr><th className="th">Collected</th><th className="th">Version</th><th className="th">Signed</th><th className="th">Status</th></tr></thead>
          <tbody>
            {reports.rows.map((r) => (
              <tr key={r.id}>
                <td className="td"><Link href={`/portal/reports/${r.id}`}>{fmtDate(r.collectedAt, timeZone)}</Link></td>
                <td className="td">{r.version}</td>
                <td className="td">{r.signedBy}, {fmtDateTime(r.signedAt, timeZone)}</td>
                <td className={`td ${r.status === 'current' ? 'text-ok' : 'text-warn'}`}>{reportStatusLabel(r.status)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </div>
  );
}
