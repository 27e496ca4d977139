'use client';

import type { FieldImageRef } from '@/lib/scoring/types';

/** Thumbnails of the collection's field images with their mark counts; the current one is marked. */
export function ImageStrip({
  images,
  current,
  marksPerImage,
  onGoTo,
}: {
  images: readonly FieldImageRef[];
  current: number;
  marksPerImage: ReadonlyMap<string, number>;
  onGoTo(index: number): void;
}) {
  if (images.length <= 1) return null;
  return (
    <nav aria-label="Field images">
      <ol className="flex gap-2 overflow-x-auto pb-1">
        {images.map((img, i) => (
          <li key={img.id} className="shrink-0">
            <button
              type="button"
              onClick={() => onGoTo(i)}
              aria-current={i === current ? 'true' : undefined}
              aria-label={`Image ${i + 1} of ${images.length}: ${img.fileName}, ${marksPerImage.get(img.id) ?? 0} marks`}
              className="relative block rounded border-2 border-transparent aria-[current=true]:border-brand"
            >
              {/* eslint-disable-next-line @next/next/no-img-element -- a thumbnail from our own image route, already sized; next/image would only add a second resize */}
              <img src={img.thumbUrl} alt="" loading="lazy" className="h-14 w-auto rounded-sm bg-paper-sunk" />
              <span className="absolute bottom-0.5 right-0.5 rounded bg-black/70 px-1 text-[10px] text-white">{marksPerImage.get(img.id) ?? 0}</span>
            </button>
          </li>
        ))}
      </ol>
    </nav>
  );
}
