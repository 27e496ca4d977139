'use client';

import { useRef, useState } from 'react';
import { fmt } from '@/lib/format';

type Img = { id: number; fileName: string; width: number; height: number; displayUrl: string };

/**
 * Stage-micrometer calibration: two clicks on the ends of a known length on the image,
 * the length in micrometres, and the scale follows as µm ÷ pixel distance.
 */
export function CalibrateDialog({ image, onApply, onClose }: { image: Img; onApply: (micronsPerPixel: number, allImages: boolean) => Promise<void>; onClose: () => void }) {
  const [points, setPoints] = useState<{ x: number; y: number }[]>([]);
  const [micrometres, setMicrometres] = useState('100');
  const [all, setAll] = useState(true);
  const [error, setError] = useState<string | null>(null);
  const imgRef = useRef<HTMLImageElement>(null);

  function onClick(e: React.MouseEvent<HTMLImageElement>) {
    const el = imgRef.current!;
    const rect = el.getBoundingClientRect();
    // Clicks are taken in the image's own pixels, whatever size it is shown at.
    const x = ((e.clientX - rect.left) / rect.width) * image.width;
    const y = ((e.clientY - rect.top) / rect.height) * image.height;
    setPoints((p) => (p.length >= 2 ? [{ x, y }] : [...p, { x, y }]));
  }

  const distance = points.length === 2 ? Math.hypot(points[1].x - points[0].x, points[1].y - points[0].y) : null;
  const length = Number(micrometres);
  const scale = distance && distance > 0 && length > 0 ? length / distance : null;

  async function apply() {
    if (!scale) {
      setError('Click both ends of the known length and give it in micrometres.');
      return;
    }
    await onApply(scale, all);
  }

  return (
    <div role="dialog" aria-modal="true" aria-labelledby="calibrate-title" className="fixed inset-0 z-40 flex items-center justify-center bg-ink/50 p-4">
      <div className="card max-h-full w-full max-w-4xl space-y-3 overflow-auto">
        <h2 id="calibrate-title">Calibrate the scale on {image.fileName}</h2>
        <p className="text-sm text-ink-soft">Click the two ends of a known length on the stage micrometer, then give that length.</p>
        <div className="relative">
          {/* eslint-disable-next-line @next/next/no-img-element -- our own image route serves sized copies (thumb, display); next/image would resize them again */}
          <img ref={imgRef} src={image.displayUrl} alt={`Field image ${image.fileName} for calibration`} className="w-full cursor-crosshair select-none" onClick={onClick} draggable={false} />
          <svg className="pointer-events-none absolute inset-0 h-full w-full" viewBox={`0 0 ${image.width} ${image.height}`} preserveAspectRatio="none" aria-hidden>
            {points.map((p, i) => <circle key={i} cx={p.x} cy={p.y} r={image.width / 150} fill="none" stroke="#E69F00" strokeWidth={image.width / 500} />)}
            {points.length === 2 && <line x1={points[0].x} y1={points[0].y} x2={points[1].x} y2={points[1].y} stroke="#E69F00" strokeWidth={image.width / 600} />}
          </svg>
        </div>
        <div className="flex flex-wrap items-end gap-3">
          <div>
            <label htmlFor="calibrate-length" className="label">Known length (µm)</label>
            <input id="calibrate-length" type="number" step="any" className="input w-32" value={micrometres} onChange={(e) => setMicrometres(e.target.value)} />
          </div>
          <p className="text-sm" aria-live="polite">
            {distance ? `${fmt(distance)} px → ${scale ? `${fmt(scale, 4)} µm per pixel` : '—'}` : `${points.length} of 2 points chosen`}
          </p>
          <label className="flex items-center gap-2 text-sm">
            <input type="checkbox" checked={all} onChange={(e) => setAll(e.target.checked)} /> Apply to every image of this collection
          </label>
        </div>
        {error && <p className="text-sm text-danger">{error}</p>}
        <div className="flex gap-3">
          <button type="button" className="btn" onClick={apply} disabled={!scale}>Apply scale</button>
          <button type="button" className="btn-secondary" onClick={onClose}>Cancel</button>
        </div>
      </div>
    </div>
  );
}
