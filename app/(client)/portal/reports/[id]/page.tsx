import Link from 'next/link';
import { notFound } from 'next/navigation';
import { PdfStatus } from '@/components/reports/pdf-status';
import { ReportView } from '@/components/reports/report-view';
import { getReport } from '@/db/queries/reports';
import { getLabSettings } from '@/db/queries/settings';
import { nullIfNotFound } from '@/lib/api/errors';
import { requirePageUser } from '@/lib/auth/session';
import { fmtDateTime } from '@/lib/format';
import { reportStatusLabel } from '@/lib/reports/status';

export const metadata = { title: 'Signed report' };

export default async function PortalReportPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser(['client']);
  const { id } = await params;
  if (!/^\d+$/.test(id)) notFound();
  // getReport filters by the signed-in client: another owner's report is "not found".
  const r = await nullIfNotFound(getReport(user, Number(id)));
  if (!r) notFound();
  const { timeZone } = await getLabSettings();
  const latest = r.versions[r.versions.length - 1]!;
  return (
    <div className="space-y-4">
      <p className="text-sm"><Link href={`/portal/stallions/${r.stallionId}`}>All reports of {r.stallionName}</Link></p>
      <h1>{r.stallionName}, collected {fmtDateTime(r.collectedAt, timeZone)} — version {r.version}</h1>
      <p className="text-sm">
        Signed by {r.signedBy} on {fmtDateTime(r.signedAt, timeZone)} ·{' '}
        <span data-testid="report-status" className={r.status === 'current' ? 'text-ok' : 'text-warn'}>{reportStatusLabel(r.status, r.supersededBy?.version)}</span>
        {latest.id !== r.id && <> · <Link href={`/portal/reports/${latest.id}`}>open version {latest.version}</Link></>}
      </p>
      <section aria-labelledby="pdf" className="card space-y-2">
        <h2 id="pdf">Signed PDF</h2>
        <PdfStatus reportId={r.id} initial={r.pdf} canRetry={false} timeZone={timeZone} />
        <p className="text-xs text-ink-soft">Verification code <span className="font-mono">{r.verificationCode}</span>: anyone can check it at /verify.</p>
      </section>
      <ReportView report={r.content} />
    </div>
  );
}
