'use client';

import { ZOOM_STEP } from '@/lib/scoring/viewport';
import type { FieldCanvasControl } from '@/lib/scoring/types';

/** Undo, redo, marks on/off, fit and zoom, and stepping through the field images. */
export function CanvasToolbar({
  control,
  canEdit,
  canUndo,
  canRedo,
  marksVisible,
  imageIndex,
  imageCount,
  onUndo,
  onRedo,
  onToggleMarks,
  onGoToImage,
}: {
  control: () => FieldCanvasControl | null;
  canEdit: boolean;
  canUndo: boolean;
  canRedo: boolean;
  marksVisible: boolean;
  imageIndex: number;
  imageCount: number;
  onUndo(): void;
  onRedo(): void;
  onToggleMarks(): void;
  onGoToImage(index: number): void;
}) {
  return (
    <div role="toolbar" aria-label="Canvas tools" className="flex flex-wrap items-center gap-1.5">
      <button type="button" className="btn-secondary py-1" onClick={onUndo} disabled={!canEdit || !canUndo} aria-keyshortcuts="Control+Z">
        Undo
      </button>
      <button type="button" className="btn-secondary py-1" onClick={onRedo} disabled={!canEdit || !canRedo} aria-keyshortcuts="Control+Shift+Z">
        Redo
      </button>
      <button type="button" className="btn-secondary py-1" onClick={onToggleMarks} aria-pressed={!marksVisible} aria-keyshortcuts="H">
        {marksVisible ? 'Hide marks' : 'Show marks'}
      </button>
      <span className="mx-1 h-5 w-px bg-line" aria-hidden />
      <button type="button" className="btn-secondary py-1" onClick={() => control()?.fit()} aria-keyshortcuts="F">
        Fit to screen
      </button>
      <button type="button" className="btn-secondary py-1" aria-label="Zoom out" onClick={() => control()?.zoomBy(1 / ZOOM_STEP)} aria-keyshortcuts="-">
        −
      </button>
      <button type="button" className="btn-secondary py-1" aria-label="Zoom in" onClick={() => control()?.zoomBy(ZOOM_STEP)} aria-keyshortcuts="+">
        +
      </button>
      <span className="mx-1 h-5 w-px bg-line" aria-hidden />
      <button type="button" className="btn-secondary py-1" onClick={() => onGoToImage(imageIndex - 1)} disabled={imageIndex === 0} aria-label="Previous image">
        ‹ Previous
      </button>
      <span className="text-sm tabular-nums" data-testid="image-position">
        Image {imageCount ? imageIndex + 1 : 0} of {imageCount}
      </span>
      <button type="button" className="btn-secondary py-1" onClick={() => onGoToImage(imageIndex + 1)} disabled={imageIndex >= imageCount - 1} aria-label="Next image">
        Next ›
      </button>
    </div>
  );
}
