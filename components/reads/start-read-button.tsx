'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { apiFetch } from '@/lib/api/fetcher';
import type { ReadKind } from '@/lib/reads/kinds';

export function StartReadButton({ collectionId, kind, label }: { collectionId: number; kind: ReadKind; label: string }) {
  const router = useRouter();
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  async function start() {
    setBusy(true);
    setError(null);
    try {
      const { read } = await apiFetch<{ read: { id: number } }>(`/api/collections/${collectionId}/reads`, { method: 'POST', body: JSON.stringify({ kind }) });
      router.push(`/reads/${read.id}`);
    } catch (err) {
      setError(err instanceof Error ? err.message : 'The read could not be started.');
      setBusy(false);
    }
  }
  return (
    <span className="inline-flex flex-col gap-1">
      <button type="button" className="btn" onClick={start} disabled={busy}>{busy ? 'Opening…' : label}</button>
      {error && <span className="text-sm text-danger">{error}</span>}
    </span>
  );
}
