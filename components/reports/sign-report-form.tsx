'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { apiFetch, ApiRequestError } from '@/lib/api/fetcher';

/**
 * The veterinarian's remarks and interpretation, and sign-off with the password re-entered.
 * "Save text" keeps the text for later; "Sign report" saves it and signs in one request.
 */
export function SignReportForm({ collectionId, initial, ready }: { collectionId: number; initial: { remarks: string | null; interpretation: string | null }; ready: boolean }) {
  const router = useRouter();
  const [remarks, setRemarks] = useState(initial.remarks ?? '');
  const [interpretation, setInterpretation] = useState(initial.interpretation ?? '');
  const [password, setPassword] = useState('');
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<{ kind: 'error' | 'ok'; text: string } | null>(null);

  async function save() {
    setBusy(true);
    setMessage(null);
    try {
      await apiFetch(`/api/collections/${collectionId}/report`, { method: 'PUT', body: JSON.stringify({ remarks, interpretation }) });
      setMessage({ kind: 'ok', text: 'Text saved.' });
      router.refresh();
    } catch (err) {
      setMessage({ kind: 'error', text: err instanceof Error ? err.message : 'The text could not be saved.' });
    } finally {
      setBusy(false);
    }
  }

  async function sign(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setMessage(null);
    try {
      const { report } = await apiFetch<{ report: { id: number } }>(`/api/collections/${collectionId}/report/sign`, {
        method: 'POST',
        body: JSON.stringify({ password, remarks, interpretation }),
      });
      router.push(`/reports/${report.id}`);
    } catch (err) {
      setPassword('');
      setMessage({ kind: 'error', text: err instanceof ApiRequestError || err instanceof Error ? err.message : 'The report could not be signed.' });
      setBusy(false);
    }
  }

  return (
    <form onSubmit={sign} className="card space-y-3" aria-label="Sign the report">
      <h2>Remarks, interpretation and sign-off</h2>
      <div>
        <label htmlFor="remarks" className="label">Remarks</label>
        <textarea id="remarks" className="input min-h-24" value={remarks} onChange={(e) => setRemarks(e.target.value)} maxLength={20000} />
      </div>
      <div>
        <label htmlFor="interpretation" className="label">Interpretation</label>
        <textarea id="interpretation" className="input min-h-24" value={interpretation} onChange={(e) => setInterpretation(e.target.value)} maxLength={20000} />
      </div>
      <button type="button" className="btn-secondary" onClick={save} disabled={busy}>Save text</button>
      <div className="border-t border-line pt-3">
        <label htmlFor="sign-password" className="label">Your password (to sign)</label>
        <input
          id="sign-password"
          type="password"
          autoComplete="current-password"
          className="input max-w-sm"
          value={password}
          onChange={(e) => setPassword(e.target.value)}
          aria-describedby="sign-hint"
          required
        />
        <p id="sign-hint" className="mt-1 text-xs text-ink-faint">
          Signing freezes this report as shown, with every figure and setting it uses, and locks the collection’s records, reads, marks and
          images. A change afterwards needs an amendment, which makes a new version.
        </p>
      </div>
      {message && (
        <p role={message.kind === 'error' ? 'alert' : 'status'} className={`rounded-md px-3 py-2 text-sm ${message.kind === 'error' ? 'bg-danger-bg text-danger' : 'bg-ok-bg text-ok'}`}>
          {message.text}
        </p>
      )}
      <button type="submit" className="btn" disabled={busy || !ready || password === ''}>{busy ? 'Signing…' : 'Sign report'}</button>
    </form>
  );
}
