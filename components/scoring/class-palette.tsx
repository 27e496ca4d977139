'use client';

import { memo } from 'react';
import type { MarkClass } from '@/lib/class-sets/schema';
import { MarkerSwatch } from './marker-swatch';

/** The classes as buttons: the pressed one is the class the next click places. */
export const ClassPalette = memo(function ClassPalette({
  classes,
  currentKey,
  disabled,
  onChoose,
}: {
  classes: readonly MarkClass[];
  currentKey: string;
  disabled: boolean;
  onChoose(key: string): void;
}) {
  const sperm = classes.filter((c) => c.countsAsSperm);
  const other = classes.filter((c) => !c.countsAsSperm);
  const item = (c: MarkClass) => (
    <li key={c.key}>
      <button
        type="button"
        disabled={disabled}
        aria-pressed={c.key === currentKey}
        aria-label={c.hotkey ? `${c.name} (key ${c.hotkey})` : c.name}
        onClick={() => onChoose(c.key)}
        className="flex w-full items-center gap-2 rounded-md border border-transparent px-2 py-1 text-left text-sm hover:bg-paper-sunk disabled:opacity-50 aria-pressed:border-brand aria-pressed:bg-brand-light"
      >
        <span className="rounded bg-[#2a2630] p-0.5">
          <MarkerSwatch shape={c.shape} colour={c.colour} />
        </span>
        <span className="flex-1 leading-tight">{c.name}</span>
        {c.hotkey && (
          // Key caps show letters in capitals, as keyboards do: "L" cannot be misread as "1".
          <kbd className="rounded border border-line bg-paper px-1.5 font-mono text-xs text-ink-soft">{c.hotkey.toUpperCase()}</kbd>
        )}
      </button>
    </li>
  );
  return (
    <section aria-labelledby="palette-heading" className="space-y-1">
      <h2 id="palette-heading" className="text-sm font-semibold">
        Class for new marks
      </h2>
      <ul className="space-y-0.5" aria-label="Sperm classes">
        {sperm.map(item)}
      </ul>
      {other.length > 0 && (
        <>
          <p className="pt-1 text-xs text-ink-faint">Not sperm (tallied apart)</p>
          <ul className="space-y-0.5" aria-label="Non-sperm classes">
            {other.map(item)}
          </ul>
        </>
      )}
    </section>
  );
});

/**
 * The same choice as a strip above the canvas, for narrow screens (a tablet upright), where
 * the palette beside the canvas moves below it and out of reach while scoring.
 */
export const ClassStrip = memo(function ClassStrip({
  classes,
  currentKey,
  onChoose,
}: {
  classes: readonly MarkClass[];
  currentKey: string;
  onChoose(key: string): void;
}) {
  return (
    <div role="group" aria-label="Class for new marks (strip)" className="flex gap-1 overflow-x-auto pb-1 lg:hidden">
      {classes.map((c) => (
        <button
          key={c.key}
          type="button"
          aria-pressed={c.key === currentKey}
          onClick={() => onChoose(c.key)}
          className="flex shrink-0 items-center gap-1.5 rounded-md border border-line bg-paper-raised px-2 py-1.5 text-xs aria-pressed:border-brand aria-pressed:bg-brand-light"
        >
          <span className="rounded bg-[#2a2630] p-0.5">
            <MarkerSwatch shape={c.shape} colour={c.colour} size={14} />
          </span>
          <span className="max-w-40 truncate">{c.name}</span>
        </button>
      ))}
    </div>
  );
});
