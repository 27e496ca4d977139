import Link from 'next/link';
import { notFound } from 'next/navigation';
import { ReportView } from '@/components/reports/report-view';
import { SignReportForm } from '@/components/reports/sign-report-form';
import { getCollectionReport, getReport } from '@/db/queries/reports';
import { getLabSettings } from '@/db/queries/settings';
import { nullIfNotFound } from '@/lib/api/errors';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import { fmtDateTime } from '@/lib/format';
import { reportStatusLabel } from '@/lib/reports/status';

export const metadata = { title: 'Report' };

export default async function CollectionReportPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser(STAFF_ROLES);
  const { id } = await params;
  if (!/^\d+$/.test(id)) notFound();
  const r = await nullIfNotFound(getCollectionReport(user, Number(id)));
  if (!r) notFound();
  const { timeZone } = await getLabSettings();
  const signed = r.current ? await getReport(user, r.current.id) : null;
  const shown = signed?.content ?? r.draft;
  const vet = user.role === 'veterinarian';

  return (
    <div className="space-y-6">
      <div className="space-y-1">
        <p className="text-sm"><Link href={`/collections/${r.collectionId}`}>Collection of {fmtDateTime(r.draft.collection.collectedAt, timeZone)}</Link></p>
        <h1>Report: {r.draft.stallion.name}, collected {fmtDateTime(r.draft.collection.collectedAt, timeZone)}</h1>
        <p className="text-sm" data-testid="report-state">
          {r.state === 'signed' && r.current && (
            <>Signed, version {r.current.version}, by {r.current.signedBy} on {fmtDateTime(r.current.signedAt, timeZone)} — <Link href={`/reports/${r.current.id}`}>open the signed report</Link></>
          )}
          {r.state === 'amended' && 'Amended: the last signed version is withdrawn for correction; sign the corrected report to make the next version.'}
          {r.state === 'draft' && 'Draft: not signed yet.'}
        </p>
      </div>

      {r.blind && (
        <p role="note" className="rounded-md bg-warn-bg px-3 py-2 text-sm text-warn">
          You are doing this collection’s blind second read: no read’s figures are shown here until you submit it.
        </p>
      )}

      {r.state !== 'signed' && (
        <section aria-labelledby="readiness" className="card space-y-2">
          <h2 id="readiness">Ready to sign?</h2>
          {r.readiness.ready ? (
            <p className="text-sm text-ok">Yes: every read is submitted{r.draft.basis === 'settled' ? ' and settled' : ''}. A veterinarian can sign this report.</p>
          ) : (
            <ul aria-label="Why the report cannot be signed yet" className="list-disc space-y-1 pl-5 text-sm">
              {r.readiness.reasons.map((x) => <li key={x.code + x.message}>{x.message}</li>)}
            </ul>
          )}
        </section>
      )}

      {vet && r.state !== 'signed' && <SignReportForm collectionId={r.collectionId} initial={r.draft.veterinarian} ready={r.readiness.ready} />}

      {r.versions.length > 0 && (
        <section aria-labelledby="versions" className="card">
          <h2 id="versions" className="mb-2">Signed versions</h2>
          <ul className="divide-y divide-line text-sm">
            {r.versions.map((v) => (
              <li key={v.id} className="flex flex-wrap justify-between gap-2 py-2">
                <Link href={`/reports/${v.id}`}>Version {v.version}, signed by {v.signedBy} on {fmtDateTime(v.signedAt, timeZone)}</Link>
                <span className="text-ink-soft">{reportStatusLabel(v.status, v.status === 'superseded' ? (r.versions.find((n) => n.version === v.version + 1)?.version ?? null) : null)}</span>
              </li>
            ))}
          </ul>
        </section>
      )}

      <ReportView report={shown} />
    </div>
  );
}
