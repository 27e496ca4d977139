import Link from 'next/link';
import { notFound } from 'next/navigation';
import { AmendReportForm } from '@/components/reports/amend-report-form';
import { PdfStatus } from '@/components/reports/pdf-status';
import { ReportView } from '@/components/reports/report-view';
import { SendReportForm } from '@/components/reports/send-report-form';
import { getReport } from '@/db/queries/reports';
import { getLabSettings } from '@/db/queries/settings';
import { nullIfNotFound } from '@/lib/api/errors';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import { fmtDateTime } from '@/lib/format';
import { reportStatusLabel } from '@/lib/reports/status';

export const metadata = { title: 'Signed report' };

export default async function SignedReportPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser(STAFF_ROLES);
  const { id } = await params;
  if (!/^\d+$/.test(id)) notFound();
  const r = await nullIfNotFound(getReport(user, Number(id)));
  if (!r) notFound();
  const { timeZone } = await getLabSettings();
  const latest = r.versions[r.versions.length - 1]!;
  const vet = user.role === 'veterinarian';
  const sender = vet || user.role === 'lab_manager';

  return (
    <div className="space-y-6">
      <div className="space-y-1">
        <p className="text-sm">
          <Link href={`/collections/${r.collectionId}`}>Collection</Link> · <Link href={`/collections/${r.collectionId}/report`}>Report of the collection</Link>
        </p>
        <h1>{r.stallionName}, collected {fmtDateTime(r.collectedAt, timeZone)} — version {r.version}</h1>
        <p className="text-sm">
          Signed by {r.signedBy} on {fmtDateTime(r.signedAt, timeZone)} · verification code <span className="font-mono">{r.verificationCode}</span> ·{' '}
          <span data-testid="report-status" className={r.status === 'current' ? 'text-ok' : 'text-warn'}>{reportStatusLabel(r.status, r.supersededBy?.version)}</span>
        </p>
        {r.amendment && (
          <p className="text-sm text-ink-soft">Amended by {r.amendment.by} on {fmtDateTime(r.amendment.at, timeZone)}: {r.amendment.reason}</p>
        )}
        {r.status !== 'current' && latest.id !== r.id && <p className="text-sm"><Link href={`/reports/${latest.id}`}>Open version {latest.version}</Link></p>}
      </div>

      <section aria-labelledby="pdf" className="card space-y-2">
        <h2 id="pdf">Signed PDF</h2>
        <PdfStatus reportId={r.id} initial={r.pdf} canRetry={sender} timeZone={timeZone} />
      </section>

      <div className="grid gap-4 lg:grid-cols-2">
        {sender && r.status === 'current' && r.pdf.status === 'stored' && <SendReportForm reportId={r.id} ownerEmail={r.ownerEmail} />}
        {vet && r.status === 'current' && <AmendReportForm reportId={r.id} collectionId={r.collectionId} />}
      </div>

      <section aria-labelledby="sendings" className="card">
        <h2 id="sendings" className="mb-2">Sent by e-mail</h2>
        {r.sendings.length === 0 ? (
          <p className="text-sm text-ink-soft">Not sent yet.</p>
        ) : (
          <table aria-label="Sendings">
            <thead><tr><th className="th">When</th><th className="th">To</th><th className="th">By</th><th className="th">Result</th><th className="th">The relay answered</th></tr></thead>
            <tbody>
              {r.sendings.map((e) => (
                <tr key={e.id}>
                  <td className="td">{fmtDateTime(e.sentAt, timeZone)}</td>
                  <td className="td">{e.recipient}</td>
                  <td className="td">{e.sentBy}</td>
                  <td className={`td font-medium ${e.status === 'sent' ? 'text-ok' : 'text-danger'}`}>{e.status === 'sent' ? 'Sent' : 'Not sent'}</td>
                  <td className="td break-all text-xs">{e.relayResponse ?? '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>

      {r.versions.length > 1 && (
        <section aria-labelledby="all-versions" className="card">
          <h2 id="all-versions" className="mb-2">All versions</h2>
          <ul className="text-sm">
            {r.versions.map((v) => (
              <li key={v.id}>{v.id === r.id ? <strong>Version {v.version} (this one)</strong> : <Link href={`/reports/${v.id}`}>Version {v.version}</Link>} — {reportStatusLabel(v.status)}</li>
            ))}
          </ul>
        </section>
      )}

      <ReportView report={r.content} />
    </div>
  );
}
