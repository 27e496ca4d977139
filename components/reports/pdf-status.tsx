'use client';

import { useRouter } from 'next/navigation';
import { useEffect, useState } from 'react';
import useSWR from 'swr';
import { apiFetch, swrFetcher } from '@/lib/api/fetcher';
import { fmtDateTime } from '@/lib/format';
import type { PdfState } from '@/lib/reports/status';

/**
 * The signed PDF's state: "Preparing PDF…" until the background render has stored it (asked
 * again every two seconds), then the download link with its checksum; a failed render shows its
 * reason and, for a veterinarian or the lab manager, a retry. Once it is stored the page is
 * rendered again, so what needs the PDF (sending it) appears.
 */
export function PdfStatus({ reportId, initial, canRetry, timeZone }: { reportId: number; initial: PdfState; canRetry: boolean; timeZone: string }) {
  const [retryError, setRetryError] = useState<string | null>(null);
  const { data, mutate } = useSWR<{ report: { pdf: PdfState } }>(`/api/reports/${reportId}`, swrFetcher, {
    fallbackData: { report: { pdf: initial } },
    refreshInterval: (latest) => (latest?.report.pdf.status === 'preparing' ? 2000 : 0),
  });
  const pdf = data?.report.pdf ?? initial;
  const router = useRouter();
  useEffect(() => {
    if (initial.status !== 'stored' && pdf.status === 'stored') router.refresh();
  }, [initial.status, pdf.status, router]);

  async function retry() {
    setRetryError(null);
    try {
      const r = await apiFetch<{ pdf: PdfState }>(`/api/reports/${reportId}/pdf`, { method: 'POST' });
      await mutate({ report: { pdf: r.pdf } }, { revalidate: true });
    } catch (err) {
      setRetryError(err instanceof Error ? err.message : 'The PDF could not be queued again.');
    }
  }

  if (pdf.status === 'stored') {
    return (
      <div className="space-y-1" role="status">
        <a className="btn no-underline hover:no-underline" href={`/api/reports/${reportId}/pdf`} download>Download the signed PDF</a>
        <p className="text-xs text-ink-soft">
          SHA-256 <span className="break-all font-mono">{pdf.sha256}</span> · {Math.round(pdf.bytes / 1024)} kB · stored {fmtDateTime(pdf.storedAt, timeZone)}
        </p>
      </div>
    );
  }
  if (pdf.status === 'preparing') {
    return (
      <div role="status" className="space-y-1 text-sm">
        <p className="font-medium">Preparing PDF…</p>
        {pdf.error && (
          <p className="text-warn">
            Attempt {pdf.attempts} failed: {pdf.error}
            {pdf.retryAt ? ` Trying again at ${fmtDateTime(pdf.retryAt, timeZone)}.` : ''}
          </p>
        )}
      </div>
    );
  }
  return (
    <div role="alert" className="space-y-2 rounded-md bg-danger-bg px-3 py-2 text-sm text-danger">
      <p>The PDF could not be made after {pdf.attempts} attempt{pdf.attempts === 1 ? '' : 's'}: {pdf.error}</p>
      {canRetry && <button type="button" className="btn-secondary" onClick={retry}>Retry the PDF</button>}
      {retryError && <p>{retryError}</p>}
    </div>
  );
}
