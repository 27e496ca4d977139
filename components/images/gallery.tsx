'use client';

import { useState } from 'react';
import useSWR from 'swr';
import type { FieldImage } from '@/db/queries/images';
import { apiFetch, swrFetcher } from '@/lib/api/fetcher';
import { fmt } from '@/lib/format';
import { READ_KINDS, READ_KIND_LABELS } from '@/lib/reads/kinds';
import { CalibrateDialog } from './calibrate-dialog';
import { UploadZone } from './upload-zone';

export function FieldImages({ collectionId, canUpload, defaults }: { collectionId: number; canUpload: boolean; defaults: { magnification: number; optics: string } }) {
  const { data, mutate, error } = useSWR<{ images: FieldImage[] }>(`/api/collections/${collectionId}/images`, swrFetcher, {
    // Look again while any image's cells are still being found.
    refreshInterval: (latest) => (latest?.images.some((i) => i.candidates.status === 'waiting' || i.candidates.status === 'running') ? 2000 : 0),
  });
  const [message, setMessage] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);
  const [calibrating, setCalibrating] = useState<FieldImage | null>(null);
  const images = data?.images ?? [];

  async function act(fn: () => Promise<unknown>, ok: string) {
    setMessage(null);
    try {
      await fn();
      setMessage({ kind: 'ok', text: ok });
    } catch (err) {
      setMessage({ kind: 'error', text: err instanceof Error ? err.message : 'The change failed.' });
    }
    await mutate();
  }

  return (
    <div className="space-y-4">
      {canUpload && <UploadZone collectionId={collectionId} defaults={defaults} onUploaded={() => mutate()} />}
      {message && <p role="status" className={`rounded-md px-3 py-2 text-sm ${message.kind === 'ok' ? 'bg-ok-bg text-ok' : 'bg-danger-bg text-danger'}`}>{message.text}</p>}
      {error && <p className="text-sm text-danger">{error.message}</p>}
      {data && images.length === 0 && <p className="text-sm text-ink-soft">No field images yet.</p>}
      <ol aria-label="Field images" className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
        {images.map((img, i) => (
          <li key={img.id} className="card space-y-2 p-3" aria-label={`Image ${i + 1}: ${img.fileName}`}>
            {/* eslint-disable-next-line @next/next/no-img-element -- our own image route serves sized copies (thumb, display); next/image would resize them again */}
            <img src={img.thumbUrl} alt={`Thumbnail of ${img.fileName}`} className="aspect-[4/3] w-full rounded bg-paper-sunk object-contain" loading="lazy" />
            <p className="truncate text-sm font-medium" title={img.fileName}>{i + 1}. {img.fileName}</p>
            <p className="text-xs text-ink-soft">
              {img.width} × {img.height} px · {img.format.toUpperCase()}{img.bitDepth > 8 ? ` ${img.bitDepth}-bit` : ''} · {fmt(img.bytes / 1048576)} MB
              <br />
              {img.micronsPerPixel ? `${fmt(img.micronsPerPixel, 4)} µm/px` : 'no scale set'}
              {img.magnification ? ` · ${img.magnification}×` : ''} · cells marked: {markedText(img)}
            </p>
            <CandidateState image={img} onRerun={() => act(() => apiFetch(`/api/images/${img.id}/candidates`, { method: 'POST' }), `Finding cells again on ${img.fileName}.`)} />
            {canUpload && (
              <div className="flex flex-wrap gap-1">
                <button type="button" className="btn-secondary px-2 py-1 text-xs" disabled={i === 0} onClick={() => act(() => apiFetch(`/api/images/${img.id}`, { method: 'PATCH', body: JSON.stringify({ move: 'up' }) }), 'Order changed.')}>
                  Earlier<span className="sr-only"> {img.fileName}</span>
                </button>
                <button type="button" className="btn-secondary px-2 py-1 text-xs" disabled={i === images.length - 1} onClick={() => act(() => apiFetch(`/api/images/${img.id}`, { method: 'PATCH', body: JSON.stringify({ move: 'down' }) }), 'Order changed.')}>
                  Later<span className="sr-only"> {img.fileName}</span>
                </button>
                <button
                  type="button"
                  className="btn-secondary px-2 py-1 text-xs"
                  disabled={img.marked}
                  title={img.marked ? 'Cells are marked on this image in a read: its scale cannot change' : undefined}
                  onClick={() => setCalibrating(img)}
                >
                  Calibrate<span className="sr-only"> on {img.fileName}</span>
                </button>
                <button
                  type="button"
                  className="btn-secondary px-2 py-1 text-xs text-danger"
                  disabled={img.marked}
                  title={img.marked ? 'Cells are marked on this image in a read' : undefined}
                  onClick={() => window.confirm(`Delete ${img.fileName}? The original and its copies are removed.`) && act(() => apiFetch(`/api/images/${img.id}`, { method: 'DELETE' }), `${img.fileName} deleted.`)}
                >
                  Delete<span className="sr-only"> {img.fileName}</span>
                </button>
              </div>
            )}
          </li>
        ))}
      </ol>
      {calibrating && (
        <CalibrateDialog
          image={calibrating}
          onClose={() => setCalibrating(null)}
          onApply={async (scale, all) => {
            setCalibrating(null);
            await act(
              () =>
                all
                  ? apiFetch(`/api/collections/${collectionId}/images`, { method: 'PATCH', body: JSON.stringify({ micronsPerPixel: scale }) })
                  : apiFetch(`/api/images/${calibrating.id}`, { method: 'PATCH', body: JSON.stringify({ micronsPerPixel: scale }) }),
              `Scale set to ${fmt(scale, 4)} µm per pixel.`,
            );
          }}
        />
      )}
    </div>
  );
}

/** The cells marked in each read the viewer may see, e.g. "30 (first read), 29 (second read)". */
function markedText(img: FieldImage): string {
  const parts = READ_KINDS.filter((k) => img.marks[k] > 0).map((k) => `${img.marks[k]} (${READ_KIND_LABELS[k].toLowerCase()})`);
  return parts.length ? parts.join(', ') : 'none';
}

/** The search for candidate cells on one image: its state in words, and a button to search again. */
function CandidateState({ image, onRerun }: { image: FieldImage; onRerun: () => void }) {
  const c = image.candidates;
  const text =
    c.status === 'done' && c.skipped
      ? c.skipped
      : c.status === 'done'
      ? `Cells found: ${c.count} candidate${c.count === 1 ? '' : 's'}`
      : c.status === 'running'
        ? 'Finding cells…'
        : c.status === 'waiting'
          ? c.error
            ? `Finding cells: will try again (${c.error})`
            : 'Finding cells: waiting'
          : `Finding cells failed: ${c.error ?? 'no reason given'}`;
  return (
    <div className="flex items-start justify-between gap-2 text-xs">
      <p aria-live="polite" className={c.status === 'failed' ? 'text-danger' : 'text-ink-soft'}>
        {text}
      </p>
      {(c.status === 'done' || c.status === 'failed') && (
        <button type="button" className="btn-secondary shrink-0 px-2 py-1 text-xs" onClick={onRerun}>
          Find cells again<span className="sr-only"> on {image.fileName}</span>
        </button>
      )}
    </div>
  );
}
