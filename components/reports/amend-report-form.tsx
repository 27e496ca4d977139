'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { apiFetch } from '@/lib/api/fetcher';

/** Withdraws the current version for correction, with the reason (kept with the version and in the audit log). */
export function AmendReportForm({ reportId, collectionId }: { reportId: number; collectionId: number }) {
  const router = useRouter();
  const [reason, setReason] = useState('');
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);

  async function amend(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    try {
      await apiFetch(`/api/reports/${reportId}/amend`, { method: 'POST', body: JSON.stringify({ reason }) });
      router.push(`/collections/${collectionId}/report`);
    } catch (err) {
      setError(err instanceof Error ? err.message : 'The report could not be amended.');
      setBusy(false);
    }
  }

  return (
    <form onSubmit={amend} className="card space-y-2" aria-label="Amend the report">
      <h2>Amend</h2>
      <p className="text-sm text-ink-soft">
        An amendment unlocks the collection for correction. This version stays readable and is marked superseded once the corrected report is
        signed as the next version.
      </p>
      <label htmlFor="amend-reason" className="label">Reason for the amendment</label>
      <textarea id="amend-reason" className="input min-h-20" value={reason} onChange={(e) => setReason(e.target.value)} maxLength={2000} required />
      {error && <p role="alert" className="rounded-md bg-danger-bg px-3 py-2 text-sm text-danger">{error}</p>}
      <button type="submit" className="btn-danger" disabled={busy || reason.trim().length < 5}>{busy ? 'Amending…' : 'Amend report'}</button>
    </form>
  );
}
