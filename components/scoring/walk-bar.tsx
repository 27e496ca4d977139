'use client';

import { memo } from 'react';
import { WALK_NAME } from '@/lib/scoring/keys';

/**
 * The found cells' switch, the cell walk's button and the honest count of what is still to judge.
 * Candidates are suggestions: the words say so wherever they are counted.
 */
export const WalkBar = memo(function WalkBar({
  shown,
  walking,
  canEdit,
  openOnImage,
  openInRead,
  imageStatus,
  imageSkipped,
  searching,
  onToggleShown,
  onToggleWalk,
  onSkip,
}: {
  shown: boolean;
  walking: boolean;
  canEdit: boolean;
  openOnImage: number;
  openInRead: number;
  /** The search's state on this image. */
  imageStatus: 'waiting' | 'running' | 'done' | 'failed' | null;
  /** Why a done search gave no candidates on this image (scale too coarse…), in words. */
  imageSkipped?: string;
  /** Images of the read whose search is not done yet. */
  searching: number;
  onToggleShown(): void;
  onToggleWalk(): void;
  onSkip(): void;
}) {
  const imageText =
    imageStatus === 'waiting' || imageStatus === 'running'
      ? 'Finding cells on this image…'
      : imageStatus === 'failed'
        ? 'No found cells on this image (the search failed; see the collection’s images).'
        : `${openOnImage} found cell${openOnImage === 1 ? '' : 's'} not yet judged on this image`;
  return (
    <div className="space-y-1 text-sm" role="group" aria-label="Found cells">
      <div className="flex flex-wrap items-center gap-x-3 gap-y-1.5">
        <label className="flex items-center gap-1.5">
          <input type="checkbox" checked={shown} onChange={onToggleShown} />
          Show found cells
        </label>
        {shown && canEdit && (
          <>
            <button
              type="button"
              className={walking ? 'btn py-1' : 'btn-secondary py-1'}
              aria-pressed={walking}
              aria-keyshortcuts="W"
              onClick={onToggleWalk}
              // Nothing found anywhere in the read (yet): no walk to start.
              disabled={!walking && openInRead === 0 && searching === 0}
            >
              {walking ? `Stop ${WALK_NAME.toLowerCase()}` : WALK_NAME}
            </button>
            {walking && (
              <button type="button" className="btn-secondary py-1" aria-keyshortcuts="X" onClick={onSkip}>
                Not a cell
              </button>
            )}
          </>
        )}
      </div>
      {/* Its own line, so the canvas does not move when the walk's buttons come and go. */}
      {shown && canEdit && (
        <p className="text-ink-soft tabular-nums" data-testid="candidate-status">
          {imageStatus === 'done' && imageSkipped
            ? [
                imageSkipped,
                openInRead > 0 && ` Elsewhere in the read: ${openInRead} found cell${openInRead === 1 ? '' : 's'} not yet judged.`,
                searching > 0 && ` Finding cells on ${searching} other image${searching === 1 ? '' : 's'}.`,
              ]
                .filter(Boolean)
                .join('')
            : `${imageText} · ${openInRead} in the read${searching ? ` · finding cells on ${searching} image${searching === 1 ? '' : 's'}` : ''}. Suggestions only: you decide every cell.`}
        </p>
      )}
      {/* Someone else's read, or a submitted one: its skips are its reader's alone, so no count of what is left. */}
      {shown && !canEdit && <p className="text-ink-soft">Rings are the cells Fieldmark found on this image: suggestions, not counted.</p>}
    </div>
  );
});
