import Link from 'next/link';
import { headers } from 'next/headers';
import { verifyReport } from '@/db/queries/reports';
import { requestAddress } from '@/lib/auth/request-address';
import { fmtDate, fmtDateTime } from '@/lib/format';
import { takeVerifyLookup } from '@/lib/reports/verify-limit';
import { isTimeZone } from '@/lib/time/lab-time';
import { verificationCodeParams } from '@/lib/validations/report';

export const metadata = { title: 'Report verification' };

/*
 * Public: anyone holding a report's verification code may check it here without signing in, and
 * sees only the stallion's name, the collection date, the version, who signed it and when,
 * whether it is current or superseded, and the PDF's checksum. Rate-limited per address.
 */
function Shell({ children }: { children: React.ReactNode }) {
  return (
    <main className="mx-auto max-w-xl space-y-4 px-4 py-10">
      <p className="text-sm font-medium text-ink-soft">Fieldmark · report verification</p>
      {children}
      <p className="text-sm"><Link href="/verify">Check another code</Link></p>
    </main>
  );
}

export default async function VerifyPage({ params }: { params: Promise<{ code: string }> }) {
  const { code: raw } = await params;
  const parsed = verificationCodeParams.safeParse({ code: raw });
  if (!parsed.success) {
    return (
      <Shell>
        <h1>Check the code</h1>
        <p role="alert" className="rounded-md bg-warn-bg px-3 py-2 text-sm text-warn">{parsed.error.issues[0]?.message}</p>
      </Shell>
    );
  }
  const h = await headers();
  const gate = await takeVerifyLookup(requestAddress((name) => h.get(name)));
  if (!gate.ok) {
    return (
      <Shell>
        <h1>Too many checks</h1>
        <p role="alert" className="rounded-md bg-warn-bg px-3 py-2 text-sm text-warn">Too many codes were checked from your address. Try again in {Math.ceil(gate.retryAfter / 60)} minutes.</p>
      </Shell>
    );
  }
  const v = await verifyReport(parsed.data.code);
  if (!v) {
    return (
      <Shell>
        <h1>No report has this code</h1>
        <p className="text-sm">
          The code <span className="font-mono">{parsed.data.code}</span> is well formed, but no signed report carries it. Check it against the report;
          if it is right, the report did not come from this laboratory’s Fieldmark.
        </p>
      </Shell>
    );
  }
  const tz = isTimeZone(v.timeZone) ? v.timeZone : 'UTC';
  const status =
    v.status === 'current'
      ? 'Current: this is the latest signed version.'
      : v.status === 'superseded'
        ? `Superseded by version ${v.supersededByVersion}: a later signed version replaces this one.`
        : 'Not current: withdrawn for amendment; a corrected version will replace it.';
  return (
    <Shell>
      <h1>Genuine signed report</h1>
      <p className={`rounded-md px-3 py-2 text-sm font-medium ${v.status === 'current' ? 'bg-ok-bg text-ok' : 'bg-warn-bg text-warn'}`} data-testid="verify-status">{status}</p>
      <dl className="card grid grid-cols-[10rem_1fr] gap-x-3 gap-y-2 text-sm">
        <dt className="text-ink-soft">Stallion</dt><dd>{v.stallionName}</dd>
        <dt className="text-ink-soft">Collected on</dt><dd>{fmtDate(v.collectedOn, tz)}</dd>
        <dt className="text-ink-soft">Version</dt><dd>{v.version}</dd>
        <dt className="text-ink-soft">Signed by</dt><dd>{v.signedBy}</dd>
        <dt className="text-ink-soft">Signed on</dt><dd>{fmtDateTime(v.signedAt, tz)}</dd>
        <dt className="text-ink-soft">PDF checksum (SHA-256)</dt>
        <dd className="break-all font-mono text-xs" data-testid="verify-sha256">{v.pdfSha256 ?? 'the PDF is being prepared'}</dd>
      </dl>
      <p className="text-xs text-ink-soft">
        To check a copy of the PDF, compare its SHA-256 checksum with the one above (for example with <span className="font-mono">sha256sum</span>).
        Nothing else about the report is shown here.
      </p>
    </Shell>
  );
}
