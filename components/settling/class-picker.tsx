'use client';

import { useEffect, useRef } from 'react';
import type { MarkClass } from '@/lib/class-sets/schema';
import { MarkerSwatch } from '@/components/scoring/marker-swatch';

/** "Another class": the class set as buttons with their keys (the settle view's key handler takes the keys while it is open). */
export function ClassPicker({ open, classes, onChoose, onClose }: { open: boolean; classes: readonly MarkClass[]; onChoose(key: string): void; onClose(): void }) {
  const ref = useRef<HTMLDialogElement>(null);
  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (open && !d.open) d.showModal();
    else if (!open && d.open) d.close();
  }, [open]);
  return (
    <dialog ref={ref} aria-labelledby="picker-heading" onClose={onClose} className="m-auto w-full max-w-md rounded-lg border border-line bg-paper-raised p-5 shadow-xl backdrop:bg-black/40">
      <h2 id="picker-heading">Another class</h2>
      <p className="mt-1 text-sm text-ink-soft">Press the class’s key or click it. Escape goes back without deciding.</p>
      <ul className="mt-3 space-y-0.5">
        {classes.map((c) => (
          <li key={c.key}>
            <button
              type="button"
              onClick={() => onChoose(c.key)}
              aria-keyshortcuts={c.hotkey ?? undefined}
              className="flex w-full items-center gap-2 rounded-md px-2 py-1 text-left text-sm hover:bg-paper-sunk"
            >
              <span className="rounded bg-[#2a2630] p-0.5">
                <MarkerSwatch shape={c.shape} colour={c.colour} />
              </span>
              <span className="flex-1">{c.name}</span>
              {c.hotkey && <kbd aria-hidden="true" className="rounded border border-line bg-paper px-1.5 font-mono text-xs text-ink-soft">{c.hotkey.toUpperCase()}</kbd>}
            </button>
          </li>
        ))}
      </ul>
      <div className="mt-4 flex justify-end">
        <button type="button" className="btn-secondary" onClick={onClose}>Cancel</button>
      </div>
    </dialog>
  );
}
