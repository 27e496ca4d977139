'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { apiFetch } from '@/lib/api/fetcher';

/** E-mails the signed PDF to the owner and to addresses typed in; every attempt is recorded, sent or not. */
export function SendReportForm({ reportId, ownerEmail }: { reportId: number; ownerEmail: string | null }) {
  const router = useRouter();
  const [includeOwner, setIncludeOwner] = useState(Boolean(ownerEmail));
  const [others, setOthers] = useState('');
  const [message, setMessage] = useState('');
  const [busy, setBusy] = useState(false);
  const [result, setResult] = useState<{ kind: 'error' | 'ok'; text: string } | null>(null);

  async function send(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setResult(null);
    const to = others.split(/[\s,;]+/).map((a) => a.trim()).filter(Boolean);
    try {
      await apiFetch(`/api/reports/${reportId}/send`, { method: 'POST', body: JSON.stringify({ includeOwner, to, message: message || null }) });
      setResult({ kind: 'ok', text: `Sent to ${[...(includeOwner && ownerEmail ? [ownerEmail] : []), ...to].join(', ')}.` });
      setOthers('');
    } catch (err) {
      setResult({ kind: 'error', text: err instanceof Error ? err.message : 'The report could not be sent.' });
    } finally {
      setBusy(false);
      router.refresh();
    }
  }

  return (
    <form onSubmit={send} className="card space-y-2" aria-label="Send the report">
      <h2>Send by e-mail</h2>
      <label className="flex items-center gap-2 text-sm">
        <input type="checkbox" checked={includeOwner} disabled={!ownerEmail} onChange={(e) => setIncludeOwner(e.target.checked)} />
        {ownerEmail ? `To the owner (${ownerEmail})` : 'The owner has no e-mail address on record'}
      </label>
      <div>
        <label htmlFor="send-to" className="label">Other addresses (separated by commas)</label>
        <input id="send-to" className="input" value={others} onChange={(e) => setOthers(e.target.value)} placeholder="referring.vet@example.com" />
      </div>
      <div>
        <label htmlFor="send-message" className="label">Message (optional)</label>
        <textarea id="send-message" className="input min-h-16" value={message} onChange={(e) => setMessage(e.target.value)} maxLength={2000} />
      </div>
      {result && (
        <p role={result.kind === 'error' ? 'alert' : 'status'} className={`rounded-md px-3 py-2 text-sm ${result.kind === 'error' ? 'bg-danger-bg text-danger' : 'bg-ok-bg text-ok'}`}>
          {result.text}
        </p>
      )}
      <button type="submit" className="btn" disabled={busy}>{busy ? 'Sending…' : 'Send report'}</button>
    </form>
  );
}
