import { redirect } from 'next/navigation';
import { parseVerificationCode } from '@/lib/reports/verification';

export const metadata = { title: 'Report verification' };

/** Public: type the code printed on a report (or scan its QR code, which opens /verify/{code} directly). */
export default async function VerifyFormPage({ searchParams }: { searchParams: Promise<{ code?: string | string[] }> }) {
  const { code } = await searchParams;
  const typed = typeof code === 'string' ? code : '';
  const parsed = typed ? parseVerificationCode(typed) : null;
  if (parsed?.ok) redirect(`/verify/${encodeURIComponent(parsed.code)}`);
  return (
    <main className="mx-auto max-w-xl space-y-4 px-4 py-10">
      <p className="text-sm font-medium text-ink-soft">Fieldmark · report verification</p>
      <h1>Check a signed report</h1>
      <p className="text-sm">Enter the verification code printed beside the QR code on the report. Case, spaces and dashes do not matter.</p>
      <form method="get" action="/verify" className="card space-y-2">
        <label htmlFor="code" className="label">Verification code</label>
        <input id="code" name="code" className="input font-mono" defaultValue={typed} placeholder="XXXX-XXXX-XXXX-XXXX-XXXX" autoComplete="off" aria-describedby={parsed && !parsed.ok ? 'code-error' : undefined} />
        {parsed && !parsed.ok && <p id="code-error" role="alert" className="field-error">{parsed.message}</p>}
        <button type="submit" className="btn">Check</button>
      </form>
    </main>
  );
}
