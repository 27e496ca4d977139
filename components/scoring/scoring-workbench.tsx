'use client';

import dynamic from 'next/dynamic';
import Link from 'next/link';
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { useLabTimeZone } from '@/components/time/lab-clock';
import { fmtDateTime, formatPct } from '@/lib/format';
import type { MarkClass } from '@/lib/class-sets/schema';
import { useLatest } from '@/lib/hooks/use-latest';
import { useFillHeight } from '@/lib/hooks/use-fill-height';
import { syncStatusText } from '@/lib/hooks/use-mark-sync';
import { useCellWalk } from '@/lib/hooks/use-cell-walk';
import { useReadMarks, type MarkMapState } from '@/lib/hooks/use-read-marks';
import { useWorkbenchKeys } from '@/lib/hooks/use-workbench-keys';
import { morphologyClasses, summariseMorphology } from '@/lib/morphology/engine';
import { countMarks } from '@/lib/morphology/tally';
import { OPEN, READ_KIND_LABELS } from '@/lib/reads/kinds';
import { canRedo, canUndo } from '@/lib/scoring/history';
import { WALK_NAME, type WorkbenchCommand } from '@/lib/scoring/keys';
import { newId, type CandidateSkip, type FieldCanvasControl, type ReadPayload, type ScoringMark } from '@/lib/scoring/types';
import { headLengthPx, nextStop, walkScale } from '@/lib/scoring/walk';
import { ZOOM_STEP } from '@/lib/scoring/viewport';
import { CanvasToolbar } from './canvas-toolbar';
import { ClassPalette, ClassStrip } from './class-palette';
import { ImageStrip } from './image-strip';
import { KeysHelp } from './keys-help';
import { ReadBanners } from './read-banners';
import { SelectedMarkPanel } from './selected-mark-panel';
import { SubmitReadDialog } from './submit-read-dialog';
import { TallyPanel } from './tally-panel';
import { WalkBar } from './walk-bar';

// Konva needs a browser: the canvas never renders on the server.
const FieldCanvas = dynamic(() => import('./field-canvas').then((m) => m.FieldCanvas), {
  ssr: false,
  loading: () => <p className="flex h-full items-center justify-center text-sm text-white/80">Loading the canvas…</p>,
});

const round2 = (v: number) => Math.round(v * 100) / 100;

/** A repeated sentence must still change a live region's text to be read out again. */
function useAnnouncer() {
  const [announcement, setAnnouncement] = useState('');
  const announce = useCallback((text: string) => setAnnouncement((prev) => (prev === text ? `${text}\u00a0` : text)), []);
  return { announcement, announce };
}

export function ScoringWorkbench({ initial }: { initial: ReadPayload }) {
  const timeZone = useLabTimeZone();
  const images = initial.images;
  const { read, marks, marksRef, skips, candidates, history, sync, canEdit, notice, dismissNotice, perform, travel, submit } = useReadMarks(initial);
  const classList = read.classSet.classes;
  const classes = useMemo(() => new Map(classList.map((c) => [c.key, c])), [classList]);
  const tallyClasses = useMemo(() => morphologyClasses(read.classSet), [read.classSet]);
  const { announcement, announce } = useAnnouncer();

  const [imageIndex, setImageIndex] = useState(0);
  const [currentKey, setCurrentKey] = useState(() => classList.find((c) => c.group === 'normal')?.key ?? classList[0]?.key ?? '');
  const [keepClass, setKeepClass] = useState(true);
  const [selectedId, setSelectedId] = useState<string | null>(null);
  const [marksVisible, setMarksVisible] = useState(true);
  const [tagsOpen, setTagsOpen] = useState(false);
  const [dialogOpen, setDialogOpen] = useState(false);
  const controlRef = useRef<FieldCanvasControl | null>(null);
  // Found cells: shown to begin with as the lab setting says; a read may hide them (kept in this browser).
  const shownKey = `fieldmark:candidates-shown:${read.id}`;
  const [candidatesShown, setCandidatesShown] = useState(initial.candidatesShown);
  useEffect(() => {
    const stored = window.localStorage.getItem(shownKey);
    // The browser's stored choice is known only after hydration (the server renders the setting's).
    // eslint-disable-next-line react-hooks/set-state-in-effect
    if (stored !== null) setCandidatesShown(stored === '1');
  }, [shownKey]);
  const [walkOn, setWalkOn] = useState(false);
  const { walkImages, counts } = useCellWalk(images, candidates, marks, skips);

  // A selected mark that went away (deleted in another tab, refused) is no longer selected.
  if (selectedId && !marks.has(selectedId)) setSelectedId(null);
  const selected = selectedId ? marks.get(selectedId) : undefined;
  const selectedClass = selected ? classes.get(selected.classKey) : undefined;
  const currentClass: MarkClass | null = classes.get(currentKey) ?? null;

  const image = images[imageIndex];
  const imageLabel = image ? `Field image ${imageIndex + 1} of ${images.length}` : 'No field image';
  const imageMarks = useMemo(() => (image ? [...marks.values()].filter((m) => m.imageId === image.id) : []), [marks, image]);
  const imageWalk = walkImages[imageIndex];
  const walking = walkOn && candidatesShown && canEdit;
  const stop = walking ? nextStop(walkImages, imageIndex) : null;
  const walkTarget = stop && stop.imageIndex === imageIndex ? stop.point : null;
  const searching = walkImages.filter((w) => w.status === 'waiting' || w.status === 'running').length;
  // The walk moves on by itself: to the next image with a found cell to judge when this one is done,
  // and it ends when none is left (state adjusted while rendering, like the selection above).
  if (walking && stop && stop.imageIndex !== imageIndex) {
    setImageIndex(stop.imageIndex);
    setSelectedId(null);
    announce(`Field image ${stop.imageIndex + 1} of ${images.length}: its first found cell.`);
  }
  if (walking && !stop) {
    setWalkOn(false);
    announce(`${WALK_NAME} done: every found cell in this read is judged. Click to mark any cell it missed.`);
  }
  // The same engine as the server's totals, fed the marks in memory.
  const readTally = useMemo(() => summariseMorphology(tallyClasses, countMarks(marks.values()), { target: Math.max(1, Math.round(read.targetCells)) }), [tallyClasses, marks, read.targetCells]);
  const imageTally = image ? readTally.perImage.find((p) => p.imageId === image.id) : undefined;
  const marksPerImage = useMemo(() => {
    const counts = new Map<string, number>();
    for (const m of marks.values()) counts.set(m.imageId, (counts.get(m.imageId) ?? 0) + 1);
    return counts;
  }, [marks]);

  // Target reached: say so once when it happens, not on every later mark.
  const reachedRef = useRef(readTally.targetReached);
  useEffect(() => {
    if (readTally.targetReached && !reachedRef.current && read.status === OPEN) announce(`Target reached: ${readTally.cellsCounted} of ${readTally.target} cells counted.`);
    reachedRef.current = readTally.targetReached;
  }, [readTally.targetReached, readTally.cellsCounted, readTally.target, read.status, announce]);

  const spermCount = (m: MarkMapState) => {
    let n = 0;
    for (const mk of m.values()) if (classes.get(mk.classKey)?.countsAsSperm) n++;
    return n;
  };
  const ofTarget = (m: MarkMapState) => `${spermCount(m)} of ${read.targetCells}`;

  const place = (x: number, y: number, classKey = currentKey, fromWalk = false) => {
    const cls = classes.get(classKey);
    if (!canEdit || !image || !cls) return;
    const mark: ScoringMark = { id: newId(), imageId: image.id, x: round2(x), y: round2(y), classKey: cls.key, tags: [] };
    const next = perform({ type: 'create', mark });
    setSelectedId(keepClass || fromWalk ? null : mark.id);
    setTagsOpen(false);
    const n = spermCount(next);
    announce(cls.countsAsSperm ? `Marked cell as ${cls.name} (${n} of ${read.targetCells})` : `Marked ${cls.name}, not counted as sperm (${n} of ${read.targetCells} cells)`);
  };

  /** The cell walk: the candidate in the ring becomes a mark of the class, or a skip; the view then moves on by itself. */
  const walkClassify = (classKey: string) => {
    if (walkTarget) place(walkTarget.x, walkTarget.y, classKey, true);
  };
  const walkSkip = () => {
    if (!canEdit || !image || !walkTarget) return;
    const skip: CandidateSkip = { id: newId(), imageId: image.id, x: walkTarget.x, y: walkTarget.y, skip: true };
    perform({ type: 'create', mark: skip });
    announce('Skipped: not a cell (never counted).');
  };
  const toggleWalk = () => {
    if (walkOn) {
      setWalkOn(false);
      announce(`${WALK_NAME} stopped.`);
      return;
    }
    if (!canEdit) return;
    if (!candidatesShown) return announce(`Show found cells first, then start the ${WALK_NAME.toLowerCase()}.`);
    if (!nextStop(walkImages, imageIndex)) {
      return announce(searching ? 'Fieldmark is still finding cells on this read’s images; try again in a moment.' : 'No found cell is left to judge in this read.');
    }
    setSelectedId(null);
    setTagsOpen(false);
    walkScaledFor.current = null;
    setWalkOn(true);
    announce(`${WALK_NAME}: press a class key for the cell in the ring, x if it is not a cell.`);
  };
  const toggleCandidates = () => {
    const next = !candidatesShown;
    setCandidatesShown(next);
    if (!next) setWalkOn(false);
    try {
      window.localStorage.setItem(shownKey, next ? '1' : '0');
    } catch {
      // storage unusable: the choice lasts for this page only
    }
    announce(next ? 'Found cells shown' : 'Found cells hidden');
  };

  const reclassify = (id: string, key: string) => {
    const m = marksRef.current.get(id);
    const cls = classes.get(key);
    if (!canEdit || !m || !cls || m.classKey === key) return;
    const tags = cls.countsAsSperm ? m.tags.filter((t) => t !== key) : [];
    perform({ type: 'update', id, before: { classKey: m.classKey, tags: m.tags }, after: { classKey: key, tags } });
    announce(`Changed mark to ${cls.name} (${ofTarget(marksRef.current)})`);
  };

  const move = (id: string, x: number, y: number) => {
    const m = marksRef.current.get(id);
    if (!canEdit || !m) return;
    perform({ type: 'update', id, before: { x: m.x, y: m.y }, after: { x: round2(x), y: round2(y) } });
    announce('Moved mark');
  };

  const remove = (id: string) => {
    const m = marksRef.current.get(id);
    if (!canEdit || !m) return;
    const next = perform({ type: 'delete', mark: m });
    setSelectedId(null);
    setTagsOpen(false);
    announce(`Deleted ${classes.get(m.classKey)?.name ?? ''} mark (${ofTarget(next)})`);
  };

  const toggleTag = (id: string, tag: string) => {
    const m = marksRef.current.get(id);
    if (!canEdit || !m) return;
    const tags = m.tags.includes(tag) ? m.tags.filter((t) => t !== tag) : [...m.tags, tag];
    perform({ type: 'update', id, before: { tags: m.tags }, after: { tags } });
  };

  const step = (way: 'undo' | 'redo') => {
    const op = travel(way);
    if (!op) return;
    announce(`${way === 'undo' ? 'Undone' : 'Redone'} (${ofTarget(marksRef.current)})`);
    // In the walk, undo goes back to the candidate it opened again, on its own image.
    const imageId = op.type === 'update' ? marksRef.current.get(op.id)?.imageId : op.mark.imageId;
    const i = imageId ? images.findIndex((im) => im.id === imageId) : -1;
    if (walking && i >= 0 && i !== imageIndex) setImageIndex(i);
  };

  const goToImage = (i: number) => {
    if (i < 0 || i >= images.length) return;
    setImageIndex(i);
    setSelectedId(null);
    setTagsOpen(false);
    announce(`Field image ${i + 1} of ${images.length}`);
  };

  const chooseClass = (key: string) => {
    setCurrentKey(key);
    const c = classes.get(key);
    if (c) announce(`New marks: ${c.name}`);
  };

  const toggleMarks = () => {
    announce(marksVisible ? 'Marks hidden' : 'Marks shown');
    setMarksVisible((v) => !v);
  };

  const run = (command: WorkbenchCommand): boolean => {
    const control = controlRef.current;
    switch (command.type) {
      case 'undo':
      case 'redo':
        step(command.type);
        return true;
      case 'space-pan':
        control?.setSpacePan(true);
        return true;
      case 'pan':
        return control?.panKey(command.key, command.shift) ?? false;
      case 'deselect':
        setSelectedId(null);
        setTagsOpen(false);
        return true;
      case 'delete-selected':
        if (selectedId) remove(selectedId);
        return true;
      case 'reclassify-selected':
        if (selectedId) reclassify(selectedId, command.classKey);
        return true;
      case 'choose-class':
        chooseClass(command.classKey);
        return true;
      case 'zoom':
        control?.zoomBy(command.direction === 'in' ? ZOOM_STEP : 1 / ZOOM_STEP);
        return true;
      case 'press-centre':
        if (control?.pressAtCentre() === 'off-image') announce('The centre cross is off the image: pan the image under it first.');
        return true;
      case 'fit':
        control?.fit();
        return true;
      case 'toggle-marks':
        toggleMarks();
        return true;
      case 'toggle-tags':
        setTagsOpen((o) => !o);
        return true;
      case 'image':
        goToImage(imageIndex + command.step);
        return true;
      case 'toggle-walk':
        toggleWalk();
        return true;
      case 'walk-classify':
        walkClassify(command.classKey);
        return true;
      case 'walk-skip':
        walkSkip();
        return true;
    }
  };

  // Centred on the ring, zoomed in when the walk starts or reaches a new image (the reader's own
  // zoom is kept after that).
  const walkScaledFor = useRef<string | null>(null);
  const stopKey = stop ? `${stop.imageIndex}:${stop.point.x},${stop.point.y}` : null;
  useEffect(() => {
    if (!stop || stop.imageIndex !== imageIndex) return;
    const control = controlRef.current;
    const img = images[stop.imageIndex];
    if (!control || !img) return;
    let scale: number | undefined;
    if (walkScaledFor.current !== img.id) {
      const v = control.viewSize();
      if (v.w > 0 && v.h > 0) scale = walkScale(v.w, v.h, headLengthPx(img.micronsPerPixel));
      walkScaledFor.current = img.id;
    }
    control.centreOn(stop.point, scale);
    // stopKey stands for stop (a new object every render).
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [stopKey, imageIndex, images]);

  useWorkbenchKeys({
    enabled: !dialogOpen,
    context: { classSet: read.classSet, hasSelection: selectedId !== null, canEdit, walking: walkTarget !== null },
    canvasFocused: () => controlRef.current?.hasFocus() ?? false,
    run,
    endSpacePan: () => controlRef.current?.setSpacePan(false),
  });

  // Stable callbacks for the memoised canvas and palette, calling this render's handlers.
  const handlersRef = useLatest({ place, move, chooseClass, toggleCandidates, toggleWalk, walkSkip });
  const onPlace = useCallback((x: number, y: number) => handlersRef.current.place(x, y), [handlersRef]);
  const onToggleCandidates = useCallback(() => handlersRef.current.toggleCandidates(), [handlersRef]);
  const onToggleWalk = useCallback(() => handlersRef.current.toggleWalk(), [handlersRef]);
  const onSkip = useCallback(() => handlersRef.current.walkSkip(), [handlersRef]);
  const onMove = useCallback((id: string, x: number, y: number) => handlersRef.current.move(id, x, y), [handlersRef]);
  const onChoose = useCallback((key: string) => handlersRef.current.chooseClass(key), [handlersRef]);
  const onSelect = useCallback((id: string | null) => {
    setSelectedId(id);
    if (!id) setTagsOpen(false);
  }, []);

  // On a laptop the canvas takes the window's height left below the banners and bars.
  const fillHeight = useFillHeight<HTMLElement>();

  const statusTone = !sync.status.online || sync.status.lastError ? 'text-warn' : sync.status.waiting > 0 ? 'text-ink-soft' : 'text-ok';

  return (
    <div className="space-y-3">
      <header className="flex flex-wrap items-end justify-between gap-2">
        <div>
          <h1>
            {READ_KIND_LABELS[read.kind]} — {read.stallion}
          </h1>
          <p className="text-sm text-ink-soft">
            <Link href={`/collections/${read.collectionId}`}>Collection of {fmtDateTime(read.collectedAt, timeZone)}</Link> · target {read.targetCells} cells
          </p>
        </div>
        <p role="status" aria-live="polite" className={`text-sm font-medium ${statusTone}`} data-testid="sync-status">
          {syncStatusText(sync.status)}
        </p>
      </header>

      <ReadBanners
        status={read.status}
        canEditRead={read.canEdit}
        targetReached={readTally.targetReached}
        cellsCounted={readTally.cellsCounted}
        target={readTally.target}
        sync={sync.status}
        notice={notice}
        onDismissNotice={dismissNotice}
      />

      <div className="grid gap-3 lg:grid-cols-[minmax(0,1fr)_19rem]">
        <div className="min-w-0 space-y-2">
          <CanvasToolbar
            control={() => controlRef.current}
            canEdit={canEdit}
            canUndo={canUndo(history)}
            canRedo={canRedo(history)}
            marksVisible={marksVisible}
            imageIndex={imageIndex}
            imageCount={images.length}
            onUndo={() => step('undo')}
            onRedo={() => step('redo')}
            onToggleMarks={toggleMarks}
            onGoToImage={goToImage}
          />

          {canEdit && <ClassStrip classes={classList} currentKey={currentKey} onChoose={onChoose} />}
          <WalkBar
            shown={candidatesShown}
            walking={walking}
            canEdit={canEdit}
            openOnImage={counts.perImage[imageIndex] ?? 0}
            openInRead={counts.total}
            imageStatus={imageWalk?.status ?? null}
            imageSkipped={image ? candidates[String(image.id)]?.skipped : undefined}
            searching={searching}
            onToggleShown={onToggleCandidates}
            onToggleWalk={onToggleWalk}
            onSkip={onSkip}
          />
          {/* The tally panel sits below the canvas on narrow screens: its headline stays in view here. */}
          <p className="text-sm tabular-nums lg:hidden" data-testid="tally-headline">
            Cells {readTally.cellsCounted}/{readTally.target} · {formatPct(readTally.pctNormal)} normal
            {readTally.targetReached ? ' · target reached' : ''}
          </p>

          <section
            role="region"
            aria-label={imageLabel}
            aria-roledescription="scoring canvas"
            ref={fillHeight}
            className="h-[58vh] min-h-[340px] overflow-hidden rounded-lg border border-line"
          >
            {image ? (
              <FieldCanvas
                image={image}
                marks={imageMarks}
                classes={classes}
                selectedId={selectedId}
                marksVisible={marksVisible}
                readOnly={!canEdit}
                currentClass={currentClass}
                onPlace={onPlace}
                onSelect={onSelect}
                onMove={onMove}
                controlRef={controlRef}
                candidates={candidatesShown ? imageWalk?.rings : undefined}
                walkTarget={walkTarget}
              />
            ) : (
              <p className="p-6 text-sm">This collection has no field images yet. Upload images on the collection page first.</p>
            )}
          </section>
          {image && (
            <p className="text-xs text-ink-faint">
              {image.fileName} · {image.width} × {image.height} px · {image.micronsPerPixel ? `${image.micronsPerPixel} µm per pixel` : 'no scale set'} ·{' '}
              {imageMarks.length} marks on this image
            </p>
          )}
          <ImageStrip images={images} current={imageIndex} marksPerImage={marksPerImage} onGoTo={goToImage} />
        </div>

        <aside aria-label="Scoring panel" className="space-y-4 rounded-lg border border-line bg-paper-raised p-3">
          <fieldset disabled={!canEdit} className="space-y-2 disabled:opacity-60">
            <ClassPalette classes={classList} currentKey={currentKey} disabled={!canEdit} onChoose={onChoose} />
            <label className="flex items-start gap-2 text-sm">
              <input type="checkbox" className="mt-0.5" checked={keepClass} onChange={(e) => setKeepClass(e.target.checked)} />
              <span>
                Keep this class
                <span className="block text-xs text-ink-faint">
                  {keepClass ? 'Each click places a mark of the chosen class.' : 'Each new mark is selected: press its key right after clicking.'}
                </span>
              </span>
            </label>
          </fieldset>

          {selected && selectedClass && (
            <SelectedMarkPanel
              mark={selected}
              markClass={selectedClass}
              classes={classList}
              canEdit={canEdit}
              tagsOpen={tagsOpen}
              onToggleTags={() => setTagsOpen((o) => !o)}
              onToggleTag={(tag) => toggleTag(selected.id, tag)}
              onDelete={() => remove(selected.id)}
            />
          )}

          <TallyPanel classes={classList} read={readTally} image={imageTally} imageLabel={imageLabel} />

          {canEdit && (
            <div className="space-y-1">
              <button type="button" className="btn w-full" onClick={() => setDialogOpen(true)}>
                Submit read
              </button>
              {!readTally.targetReached && <p className="text-xs text-ink-faint">{readTally.remainingToTarget} cells to go before the target.</p>}
            </div>
          )}
          <KeysHelp />
        </aside>
      </div>

      <div className="sr-only" aria-live="polite" aria-atomic="true" data-testid="announcer">
        {announcement}
      </div>

      <SubmitReadDialog
        open={dialogOpen}
        onClose={() => setDialogOpen(false)}
        cellsCounted={readTally.cellsCounted}
        target={read.targetCells}
        nonSpermCounted={readTally.nonSpermCounted}
        targetReached={readTally.targetReached}
        openCandidates={candidatesShown ? counts.total : 0}
        onSubmit={submit}
        onSubmitted={() => {
          setSelectedId(null);
          setDialogOpen(false);
          announce('Read submitted and locked.');
        }}
      />
    </div>
  );
}

export default ScoringWorkbench;
