'use client';

import { useCallback, useRef, useState } from 'react';
import { useDropzone } from 'react-dropzone';
import { fmt } from '@/lib/format';

type Item = { key: string; name: string; size: number; progress: number; state: 'waiting' | 'uploading' | 'done' | 'duplicate' | 'error'; message?: string };

const PARALLEL = 2;

/** Sends one file as the raw request body, reporting upload progress (fetch cannot). */
type UploadAnswer = { duplicate?: boolean; error?: { message?: string } } | null;

function sendFile(url: string, file: File, onProgress: (p: number) => void): Promise<{ status: number; body: UploadAnswer }> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', url);
    xhr.setRequestHeader('content-type', 'application/octet-stream');
    xhr.upload.onprogress = (e) => e.lengthComputable && onProgress(e.loaded / e.total);
    xhr.onload = () => {
      let body: UploadAnswer = null;
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        /* not JSON */
      }
      resolve({ status: xhr.status, body });
    };
    xhr.onerror = () => reject(new Error('The connection failed during the upload.'));
    xhr.send(file);
  });
}

export function UploadZone({ collectionId, defaults, onUploaded }: { collectionId: number; defaults: { magnification: number; optics: string }; onUploaded: () => void }) {
  const [items, setItems] = useState<Item[]>([]);
  const [scale, setScale] = useState('');
  const [magnification, setMagnification] = useState(String(defaults.magnification));
  const [optics, setOptics] = useState(defaults.optics);
  const queue = useRef<{ key: string; file: File }[]>([]);
  const active = useRef(0);

  const update = (key: string, patch: Partial<Item>) => setItems((list) => list.map((i) => (i.key === key ? { ...i, ...patch } : i)));

  const pump = useCallback(() => {
    const start = () => {
      while (active.current < PARALLEL && queue.current.length) {
        const { key, file } = queue.current.shift()!;
        active.current++;
        update(key, { state: 'uploading' });
        const qs = new URLSearchParams({ name: file.name, magnification, optics });
        if (scale.trim()) qs.set('micronsPerPixel', scale.trim());
        sendFile(`/api/collections/${collectionId}/images?${qs}`, file, (p) => update(key, { progress: p }))
          .then(({ status, body }) => {
            if (status === 201) update(key, { state: 'done', progress: 1 });
            else if (status === 200 && body?.duplicate) update(key, { state: 'duplicate', progress: 1, message: 'Already in this collection (same checksum); not stored twice.' });
            else update(key, { state: 'error', message: body?.error?.message ?? `The server answered ${status}.` });
          })
          .catch((err: Error) => update(key, { state: 'error', message: err.message }))
          .finally(() => {
            active.current--;
            onUploaded();
            start();
          });
      }
    };
    start();
  }, [collectionId, magnification, optics, scale, onUploaded]);

  const onDrop = useCallback(
    (files: File[]) => {
      const added = files.map((file) => ({ key: `${file.name}-${file.size}-${crypto.randomUUID()}`, file }));
      setItems((list) => [...added.map(({ key, file }) => ({ key, name: file.name, size: file.size, progress: 0, state: 'waiting' as const })), ...list]);
      queue.current.push(...added);
      pump();
    },
    [pump],
  );
  // Every file is sent: the server checks content, so a wrong extension still gets a clear answer.
  const { getRootProps, getInputProps, isDragActive } = useDropzone({ onDrop, multiple: true });

  const busy = items.some((i) => i.state === 'uploading' || i.state === 'waiting');
  return (
    <div className="space-y-3">
      <div className="grid gap-3 sm:grid-cols-3">
        <div>
          <label htmlFor="upload-magnification" className="label">Magnification (×)</label>
          <input id="upload-magnification" type="number" className="input" value={magnification} onChange={(e) => setMagnification(e.target.value)} />
        </div>
        <div>
          <label htmlFor="upload-optics" className="label">Optics</label>
          <select id="upload-optics" className="input" value={optics} onChange={(e) => setOptics(e.target.value)}>
            <option value="bright_field">Bright field</option>
            <option value="dic">DIC</option>
            <option value="phase_contrast">Phase contrast</option>
          </select>
        </div>
        <div>
          <label htmlFor="upload-scale" className="label">Scale (µm per pixel)</label>
          <input id="upload-scale" type="number" step="any" className="input" placeholder="optional" value={scale} onChange={(e) => setScale(e.target.value)} />
          <p className="mt-1 text-xs text-ink-faint">From the camera’s calibration, or calibrate later on a stage-micrometer image.</p>
        </div>
      </div>
      <div
        {...getRootProps({ role: 'button', 'aria-label': 'Add field images: drop files here or press to choose' })}
        className={`flex cursor-pointer flex-col items-center justify-center rounded-lg border-2 border-dashed px-4 py-8 text-center ${isDragActive ? 'border-brand bg-brand-light' : 'border-line bg-paper-raised hover:border-brand'}`}
      >
        <input {...getInputProps({ 'aria-label': 'Field image files' })} />
        <p className="font-medium">{isDragActive ? 'Drop the images here' : 'Drop microscope images here, or click to choose'}</p>
        <p className="text-sm text-ink-soft">JPEG, PNG, TIFF (8- or 16-bit, greyscale or colour) and WebP, up to 200 MB each. Many at once.</p>
      </div>
      {items.length > 0 && (
        <ul aria-label="Uploads" aria-busy={busy} className="divide-y divide-line rounded-lg border border-line bg-paper-raised text-sm">
          {items.map((i) => (
            <li key={i.key} className="flex flex-wrap items-center gap-3 px-3 py-2">
              <span className="min-w-40 flex-1 truncate font-medium">{i.name}</span>
              <span className="text-ink-faint">{fmt(i.size / 1048576)} MB</span>
              <progress className="w-32" max={1} value={i.progress} aria-label={`Upload of ${i.name}`} />
              <span
                className={i.state === 'error' ? 'text-danger' : i.state === 'done' ? 'text-ok' : 'text-ink-soft'}
                role={i.state === 'error' ? 'alert' : undefined}
              >
                {i.state === 'waiting' && 'Waiting'}
                {i.state === 'uploading' && `Uploading ${Math.round(i.progress * 100)} %`}
                {i.state === 'done' && 'Stored'}
                {i.state === 'duplicate' && i.message}
                {i.state === 'error' && `Refused: ${i.message}`}
              </span>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
