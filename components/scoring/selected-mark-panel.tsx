'use client';

import type { MarkClass } from '@/lib/class-sets/schema';
import type { ScoringMark } from '@/lib/scoring/types';
import { MarkerSwatch } from './marker-swatch';

/** The selected mark: its class, extra defect tags (sperm cells only) and delete. */
export function SelectedMarkPanel({
  mark,
  markClass,
  classes,
  canEdit,
  tagsOpen,
  onToggleTags,
  onToggleTag,
  onDelete,
}: {
  mark: ScoringMark;
  markClass: MarkClass;
  classes: readonly MarkClass[];
  canEdit: boolean;
  tagsOpen: boolean;
  onToggleTags(): void;
  onToggleTag(tag: string): void;
  onDelete(): void;
}) {
  const tagChoices = classes.filter((c) => c.countsAsSperm && c.group !== 'normal' && c.key !== mark.classKey);
  return (
    <section aria-labelledby="selected-heading" className="space-y-2 rounded-md border border-line p-2">
      <h2 id="selected-heading" className="flex items-center gap-2 text-sm font-semibold">
        <span className="rounded bg-[#2a2630] p-0.5">
          <MarkerSwatch shape={markClass.shape} colour={markClass.colour} size={14} />
        </span>
        Selected mark: {markClass.name}
      </h2>
      {canEdit && (
        <>
          <div className="flex flex-wrap gap-1.5">
            <button type="button" className="btn-secondary py-1" aria-expanded={tagsOpen} onClick={onToggleTags} disabled={!markClass.countsAsSperm}>
              Extra defects{mark.tags.length ? ` (${mark.tags.length})` : ''}
            </button>
            <button type="button" className="btn-danger py-1" onClick={onDelete}>
              Delete mark
            </button>
          </div>
          {tagsOpen && markClass.countsAsSperm && (
            <fieldset className="space-y-1">
              <legend className="text-xs text-ink-soft">Further defects seen on this cell</legend>
              {tagChoices.map((c, i) => (
                <label key={c.key} className="flex items-center gap-2 text-sm">
                  <input type="checkbox" autoFocus={i === 0} checked={mark.tags.includes(c.key)} onChange={() => onToggleTag(c.key)} />
                  {c.name}
                </label>
              ))}
            </fieldset>
          )}
        </>
      )}
    </section>
  );
}
