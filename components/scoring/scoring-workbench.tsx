'use client';

import dynamic from 'next/dynamic';
import Link from 'next/link';
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { useLabTimeZone } from '@/components/time/lab-clock';
import { fmtDateTime } from '@/lib/format';
import { classForHotkey, type MarkClass } from '@/lib/class-sets/schema';
import { syncStatusText, useMarkSync } from '@/lib/hooks/use-mark-sync';
import { applyOp, canRedo, canUndo, createHistory, forgetMarks, push, redo, undo, type History, type MarkOp } from '@/lib/scoring/history';
import { mergeServerMarks, opToChange, type ChangeQueue } from '@/lib/scoring/queue';
import { newId, type ScoringMark } from '@/lib/scoring/types';
import { ZOOM_STEP } from '@/lib/scoring/viewport';
import type { FieldCanvasControl } from './field-canvas';
import { ClassPalette, ClassStrip } from './class-palette';
import { MarkerSwatch } from './marker-swatch';
import { formatPct, morphologyClasses, tallyScoringMarks } from './tally';
import { TallyPanel } from './tally-panel';
import type { ReadDetail, ReadPayload, ScoringWorkbenchProps } from './types';

// Konva needs a browser: the canvas never renders on the server.
const FieldCanvas = dynamic(() => import('./field-canvas').then((m) => m.FieldCanvas), {
  ssr: false,
  loading: () => <p className="flex h-full items-center justify-center text-sm text-white/80">Loading the canvas…</p>,
});

const KIND_LABEL: Record<ReadDetail['kind'], string> = { first: 'First read', second: 'Second read', settled: 'Settled read' };

type MarkMapState = Map<string, ScoringMark>;

const round2 = (v: number) => Math.round(v * 100) / 100;

function sameMark(a: ScoringMark, b: ScoringMark): boolean {
  return (
    a.imageId === b.imageId &&
    Number(a.x) === Number(b.x) &&
    Number(a.y) === Number(b.y) &&
    a.classKey === b.classKey &&
    a.version === b.version &&
    a.tags.length === b.tags.length &&
    a.tags.every((t, i) => t === b.tags[i])
  );
}

function isTextEntry(el: EventTarget | null): boolean {
  if (!(el instanceof HTMLElement)) return false;
  if (el.isContentEditable) return true;
  if (el instanceof HTMLTextAreaElement || el instanceof HTMLSelectElement) return true;
  if (el instanceof HTMLInputElement) return !['checkbox', 'radio', 'button', 'submit', 'range'].includes(el.type);
  return false;
}

export function ScoringWorkbench({ initial }: ScoringWorkbenchProps) {
  const timeZone = useLabTimeZone();
  const readId = String(initial.read.id);
  const images = initial.images;
  const [read, setRead] = useState<ReadDetail>(initial.read);
  const classList = read.classSet.classes;
  const classes = useMemo(() => new Map(classList.map((c) => [c.key, c])), [classList]);
  const tallyClasses = useMemo(() => morphologyClasses(read.classSet), [read.classSet]);

  const [marks, setMarksState] = useState<MarkMapState>(() => new Map(initial.marks.map((m) => [m.id, m])));
  const marksRef = useRef(marks);
  const setMarks = useCallback((next: MarkMapState) => {
    marksRef.current = next;
    setMarksState(next);
  }, []);
  const historyRef = useRef<History<ScoringMark>>(createHistory<ScoringMark>());
  const [history, setHistoryState] = useState(historyRef.current);
  const setHistory = useCallback((h: History<ScoringMark>) => {
    historyRef.current = h;
    setHistoryState(h);
  }, []);

  const [imageIndex, setImageIndex] = useState(0);
  const defaultKey = classList.find((c) => c.group === 'normal')?.key ?? classList[0]?.key ?? '';
  const [currentKey, setCurrentKey] = useState(defaultKey);
  const [keepClass, setKeepClass] = useState(true);
  const [selectedId, setSelectedId] = useState<string | null>(null);
  const [marksVisible, setMarksVisible] = useState(true);
  const [tagsOpen, setTagsOpen] = useState(false);
  const [announcement, setAnnouncement] = useState('');
  const [notice, setNotice] = useState<string | null>(null);
  const [dialogOpen, setDialogOpen] = useState(false);
  const [submitting, setSubmitting] = useState(false);
  const [submitError, setSubmitError] = useState<string | null>(null);
  const controlRef = useRef<FieldCanvasControl | null>(null);
  const dialogRef = useRef<HTMLDialogElement>(null);

  const announce = useCallback((text: string) => {
    // A repeated sentence must still change the region's text to be read out again.
    setAnnouncement((prev) => (prev === text ? `${text}\u00a0` : text));
  }, []);

  const sync = useMarkSync<ReadPayload>(
    readId,
    { enabled: true },
    {
      onRestore(queue: ChangeQueue) {
        if (queue.size === 0) return;
        const server = [...marksRef.current.values()];
        const local = new Map(server.map((m) => [m.id, m]));
        for (const e of queue.all()) {
          if (e.kind === 'upsert' && e.payload) local.set(e.markId, { ...e.payload, tags: [...e.payload.tags] });
          else local.delete(e.markId);
        }
        const merged = mergeServerMarks([...local.values()], server, queue.pendingMarkIds());
        setMarks(new Map(merged.map((m) => [m.id, m])));
      },
      onAcked(acks) {
        let next: MarkMapState | null = null;
        for (const a of acks) {
          if (a.version === undefined) continue;
          const m = (next ?? marksRef.current).get(a.markId);
          if (!m || m.version === a.version) continue;
          next ??= new Map(marksRef.current);
          next.set(a.markId, { ...m, version: a.version });
        }
        if (next) setMarks(next);
      },
      onConflicts(conflicts) {
        const next = new Map(marksRef.current);
        for (const c of conflicts) {
          if (c.server) next.set(c.markId, c.server);
          else next.delete(c.markId);
        }
        setMarks(next);
        setHistory(forgetMarks(historyRef.current, new Set(conflicts.map((c) => c.markId))));
        setNotice(
          `${conflicts.length} mark${conflicts.length === 1 ? ' was' : 's were'} changed elsewhere (another tab?) at the same time; the saved version is shown.`,
        );
      },
      onRejected(rejected) {
        setHistory(forgetMarks(historyRef.current, new Set(rejected.map((r) => r.markId))));
      },
      onServerState(state) {
        setRead((r) => ({ ...r, ...state.read, classSet: state.read.classSet ?? r.classSet }));
        const queue = sync.getQueue();
        const pending = queue.pendingMarkIds();
        const current = marksRef.current;
        const merged = mergeServerMarks([...current.values()], state.marks, pending);
        const next: MarkMapState = new Map();
        const stale = new Set<string>();
        let changed = merged.length !== current.size;
        for (const m of merged) {
          const mine = current.get(m.id);
          // Keep our map when nothing changed, so the canvas and tally do not redraw.
          if (mine && (mine === m || sameMark(mine, m))) next.set(m.id, mine);
          else {
            next.set(m.id, m);
            changed = true;
            if (mine) stale.add(m.id);
          }
        }
        for (const id of current.keys()) if (!next.has(id)) stale.add(id);
        if (changed) setMarks(next);
        if (stale.size) setHistory(forgetMarks(historyRef.current, stale));
      },
    },
  );

  const canEdit = read.canEdit && read.status === 'open' && !sync.status.locked;
  const image = images[imageIndex];
  const imageLabel = image ? `Field image ${imageIndex + 1} of ${images.length}` : 'No field image';

  const imageMarks = useMemo(() => {
    const out: ScoringMark[] = [];
    if (!image) return out;
    for (const m of marks.values()) if (m.imageId === image.id) out.push(m);
    return out;
  }, [marks, image]);

  const readTally = useMemo(() => tallyScoringMarks(tallyClasses, marks.values(), read.targetCells), [tallyClasses, marks, read.targetCells]);
  const imageTally = image ? readTally.perImage.find((p) => p.imageId === image.id) : undefined;
  const marksPerImage = useMemo(() => {
    const counts = new Map<string, number>();
    for (const m of marks.values()) counts.set(m.imageId, (counts.get(m.imageId) ?? 0) + 1);
    return counts;
  }, [marks]);

  // Target reached: say so once when it happens, not on every later mark.
  const reachedRef = useRef(readTally.targetReached);
  useEffect(() => {
    if (readTally.targetReached && !reachedRef.current && read.status === 'open') {
      announce(`Target reached: ${readTally.cellsCounted} of ${readTally.target} cells counted.`);
    }
    reachedRef.current = readTally.targetReached;
  }, [readTally.targetReached, readTally.cellsCounted, readTally.target, read.status, announce]);

  const selected = selectedId ? marks.get(selectedId) : undefined;
  useEffect(() => {
    if (selectedId && !marks.has(selectedId)) setSelectedId(null);
  }, [marks, selectedId]);

  /** Apply an op locally and queue it for the server. */
  const apply = useCallback(
    (op: MarkOp<ScoringMark>) => {
      const next = applyOp(marksRef.current, op);
      setMarks(next);
      const change = opToChange(op, next, { opId: newId(), now: Date.now() });
      if (change) sync.enqueue(change);
      return next;
    },
    [setMarks, sync],
  );

  const perform = useCallback(
    (op: MarkOp<ScoringMark>) => {
      setHistory(push(historyRef.current, op));
      return apply(op);
    },
    [apply, setHistory],
  );

  const spermCount = (m: MarkMapState) => {
    let n = 0;
    for (const mk of m.values()) if (classes.get(mk.classKey)?.countsAsSperm) n++;
    return n;
  };

  const place = (x: number, y: number) => {
    const cls = classes.get(currentKey);
    if (!canEdit || !image || !cls) return;
    const mark: ScoringMark = { id: newId(), imageId: image.id, x: round2(x), y: round2(y), classKey: cls.key, tags: [] };
    const next = perform({ type: 'create', mark });
    setSelectedId(keepClass ? null : mark.id);
    setTagsOpen(false);
    const n = spermCount(next);
    announce(
      cls.countsAsSperm
        ? `Marked cell as ${cls.name} (${n} of ${read.targetCells})`
        : `Marked ${cls.name}, not counted as sperm (${n} of ${read.targetCells} cells)`,
    );
  };

  const reclassify = (id: string, key: string) => {
    const m = marksRef.current.get(id);
    const cls = classes.get(key);
    if (!canEdit || !m || !cls || m.classKey === key) return;
    const tags = cls.countsAsSperm ? m.tags.filter((t) => t !== key) : [];
    perform({ type: 'update', id, before: { classKey: m.classKey, tags: m.tags }, after: { classKey: key, tags } });
    announce(`Changed mark to ${cls.name} (${spermCount(marksRef.current)} of ${read.targetCells})`);
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
    announce(`Deleted ${classes.get(m.classKey)?.name ?? ''} mark (${spermCount(next)} of ${read.targetCells})`);
  };

  const toggleTag = (id: string, tag: string) => {
    const m = marksRef.current.get(id);
    if (!canEdit || !m) return;
    const tags = m.tags.includes(tag) ? m.tags.filter((t) => t !== tag) : [...m.tags, tag];
    perform({ type: 'update', id, before: { tags: m.tags }, after: { tags } });
  };

  const travel = (way: typeof undo | typeof redo, done: string) => {
    if (!canEdit) return;
    const step = way(historyRef.current);
    if (!step) return;
    setHistory(step.history);
    apply(step.op);
    announce(`${done} (${spermCount(marksRef.current)} of ${read.targetCells})`);
  };
  const doUndo = () => travel(undo, 'Undone');
  const doRedo = () => travel(redo, 'Redone');

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
    setMarksVisible((v) => {
      announce(v ? 'Marks hidden' : 'Marks shown');
      return !v;
    });
  };

  // Stable callbacks for the memoised canvas and palette, calling this render's handlers.
  const handlers = useRef({ place, move, chooseClass });
  handlers.current = { place, move, chooseClass };
  const onPlace = useCallback((x: number, y: number) => handlers.current.place(x, y), []);
  const onMove = useCallback((id: string, x: number, y: number) => handlers.current.move(id, x, y), []);
  const onChoose = useCallback((key: string) => handlers.current.chooseClass(key), []);
  const onSelect = useCallback((id: string | null) => {
    setSelectedId(id);
    if (!id) setTagsOpen(false);
  }, []);

  // One keyboard handler for the whole workbench; see the "Keys and mouse" help.
  const keyHandler = useRef<(e: KeyboardEvent) => void>(() => {});
  keyHandler.current = (e: KeyboardEvent) => {
    if (e.defaultPrevented || dialogOpen || isTextEntry(e.target)) return;
    const control = controlRef.current;
    const mod = e.ctrlKey || e.metaKey;
    const key = e.key;
    if (mod) {
      const k = key.toLowerCase();
      if (k === 'z') {
        e.preventDefault();
        if (e.shiftKey) doRedo();
        else doUndo();
      } else if (k === 'y') {
        e.preventDefault();
        doRedo();
      }
      return;
    }
    if (e.altKey) return;
    const onControl = e.target instanceof HTMLButtonElement || (e.target instanceof HTMLInputElement && e.target.type !== 'text');
    if (key === ' ') {
      if (onControl) return;
      e.preventDefault();
      if (!e.repeat) control?.setSpacePan(true);
      return;
    }
    if (key.startsWith('Arrow')) {
      if (control?.panKey(key, e.shiftKey)) e.preventDefault();
      return;
    }
    if (key === 'Escape') {
      setSelectedId(null);
      setTagsOpen(false);
      return;
    }
    if ((key === 'Delete' || key === 'Backspace') && selectedId) {
      e.preventDefault();
      remove(selectedId);
      return;
    }
    // Class hotkeys come before letter commands, so a lab may give any letter to a class.
    const cls = key.length === 1 ? classForHotkey(read.classSet, key) : null;
    if (cls) {
      e.preventDefault();
      if (selectedId && canEdit) reclassify(selectedId, cls.key);
      else chooseClass(cls.key);
      return;
    }
    switch (key) {
      case '+':
      case '=':
        e.preventDefault();
        control?.zoomBy(ZOOM_STEP);
        return;
      case '-':
      case '_':
        e.preventDefault();
        control?.zoomBy(1 / ZOOM_STEP);
        return;
      case 'Enter':
        // Only on the canvas itself: Enter on a button or link keeps its usual meaning.
        if (control?.hasFocus()) {
          e.preventDefault();
          if (control.pressAtCentre() === 'off-image') announce('The centre cross is off the image: pan the image under it first.');
        }
        return;
      case 'f':
      case 'F':
        control?.fit();
        return;
      case 'h':
      case 'H':
        toggleMarks();
        return;
      case 't':
      case 'T':
        if (selectedId && canEdit) setTagsOpen((o) => !o);
        return;
      case '[':
        goToImage(imageIndex - 1);
        return;
      case ']':
        goToImage(imageIndex + 1);
        return;
    }
  };
  useEffect(() => {
    const down = (e: KeyboardEvent) => keyHandler.current(e);
    const up = (e: KeyboardEvent) => {
      if (e.key === ' ') controlRef.current?.setSpacePan(false);
    };
    const blur = () => controlRef.current?.setSpacePan(false);
    window.addEventListener('keydown', down);
    window.addEventListener('keyup', up);
    window.addEventListener('blur', blur);
    return () => {
      window.removeEventListener('keydown', down);
      window.removeEventListener('keyup', up);
      window.removeEventListener('blur', blur);
    };
  }, []);

  const openSubmit = () => {
    setSubmitError(null);
    setDialogOpen(true);
    dialogRef.current?.showModal();
  };
  const closeSubmit = () => {
    setDialogOpen(false);
    dialogRef.current?.close();
  };
  const submit = async () => {
    setSubmitting(true);
    setSubmitError(null);
    try {
      const saved = await sync.flush();
      if (!saved) {
        setSubmitError('Some changes are not saved yet. Submit once the status says “All changes saved”.');
        return;
      }
      const res = await fetch(`/api/reads/${encodeURIComponent(readId)}/submit`, { method: 'POST', headers: { 'content-type': 'application/json' } });
      const body = (await res.json().catch(() => null)) as { read?: Partial<ReadDetail>; error?: { message?: string } } | null;
      if (res.ok || res.status === 409) {
        setRead((r) => ({ ...r, ...(body?.read ?? {}), classSet: body?.read?.classSet ?? r.classSet, status: 'submitted', canEdit: false }));
        setSelectedId(null);
        closeSubmit();
        announce('Read submitted and locked.');
        void sync.refresh();
      } else {
        setSubmitError(body?.error?.message ?? `The server answered ${res.status}.`);
      }
    } catch {
      setSubmitError('The server could not be reached. Try again when the connection is back.');
    } finally {
      setSubmitting(false);
    }
  };

  const statusText = syncStatusText(sync.status);
  const statusTone = !sync.status.online || sync.status.lastError ? 'text-warn' : sync.status.waiting > 0 ? 'text-ink-soft' : 'text-ok';
  const tagChoices = selected ? classList.filter((c) => c.countsAsSperm && c.group !== 'normal' && c.key !== selected.classKey) : [];
  const selectedClass = selected ? classes.get(selected.classKey) : undefined;
  const currentClass: MarkClass | null = classes.get(currentKey) ?? null;

  return (
    <div className="space-y-3">
      <header className="flex flex-wrap items-end justify-between gap-2">
        <div>
          <h1>
            {KIND_LABEL[read.kind]} — {read.stallion}
          </h1>
          <p className="text-sm text-ink-soft">
            <Link href={`/collections/${read.collectionId}`}>Collection of {fmtDateTime(read.collectedAt, timeZone)}</Link> · target {read.targetCells} cells
          </p>
        </div>
        <p role="status" aria-live="polite" className={`text-sm font-medium ${statusTone}`} data-testid="sync-status">
          {statusText}
        </p>
      </header>

      {read.status === 'submitted' && (
        <p className="rounded-md border border-line bg-paper-sunk px-3 py-2 text-sm font-medium" data-testid="locked-banner">
          Submitted — locked. This read can no longer be changed.
        </p>
      )}
      {read.status === 'open' && !read.canEdit && (
        <p className="rounded-md border border-line bg-paper-sunk px-3 py-2 text-sm">You can look at this read; only its reader can change it.</p>
      )}
      {readTally.targetReached && read.status === 'open' && (
        <p className="rounded-md border border-ok bg-ok-bg px-3 py-2 text-sm font-medium text-ok" data-testid="target-banner">
          Target reached — {readTally.cellsCounted} of {readTally.target} cells counted. Submit the read, or keep counting.
        </p>
      )}
      {sync.status.rejections.length > 0 && (
        <div className="rounded-md border border-danger bg-danger-bg px-3 py-2 text-sm text-danger">
          <p className="font-medium">The server refused {sync.status.rejections.length === 1 ? 'a change' : 'some changes'}:</p>
          <ul className="list-disc pl-5">
            {sync.status.rejections.map((m, i) => (
              <li key={i}>{m}</li>
            ))}
          </ul>
        </div>
      )}
      {notice && (
        <p className="flex items-center justify-between gap-2 rounded-md border border-warn bg-warn-bg px-3 py-2 text-sm text-warn">
          {notice}
          <button type="button" className="btn-secondary py-1" onClick={() => setNotice(null)}>
            Dismiss
          </button>
        </p>
      )}
      {sync.status.storageProblem && (
        <p className="rounded-md border border-warn bg-warn-bg px-3 py-2 text-sm text-warn">
          This browser will not keep unsent changes (storage full or disabled): do not close the tab until the status says “All changes saved”.
        </p>
      )}

      <div className="grid gap-3 lg:grid-cols-[minmax(0,1fr)_19rem]">
        <div className="min-w-0 space-y-2">
          <div role="toolbar" aria-label="Canvas tools" className="flex flex-wrap items-center gap-1.5">
            <button type="button" className="btn-secondary py-1" onClick={doUndo} disabled={!canEdit || !canUndo(history)} aria-keyshortcuts="Control+Z">
              Undo
            </button>
            <button type="button" className="btn-secondary py-1" onClick={doRedo} disabled={!canEdit || !canRedo(history)} aria-keyshortcuts="Control+Shift+Z">
              Redo
            </button>
            <button type="button" className="btn-secondary py-1" onClick={toggleMarks} aria-pressed={!marksVisible} aria-keyshortcuts="H">
              {marksVisible ? 'Hide marks' : 'Show marks'}
            </button>
            <span className="mx-1 h-5 w-px bg-line" aria-hidden />
            <button type="button" className="btn-secondary py-1" onClick={() => controlRef.current?.fit()} aria-keyshortcuts="F">
              Fit to screen
            </button>
            <button type="button" className="btn-secondary py-1" aria-label="Zoom out" onClick={() => controlRef.current?.zoomBy(1 / ZOOM_STEP)} aria-keyshortcuts="-">
              −
            </button>
            <button type="button" className="btn-secondary py-1" aria-label="Zoom in" onClick={() => controlRef.current?.zoomBy(ZOOM_STEP)} aria-keyshortcuts="+">
              +
            </button>
            <span className="mx-1 h-5 w-px bg-line" aria-hidden />
            <button type="button" className="btn-secondary py-1" onClick={() => goToImage(imageIndex - 1)} disabled={imageIndex === 0} aria-label="Previous image">
              ‹ Previous
            </button>
            <span className="text-sm tabular-nums" data-testid="image-position">
              Image {images.length ? imageIndex + 1 : 0} of {images.length}
            </span>
            <button
              type="button"
              className="btn-secondary py-1"
              onClick={() => goToImage(imageIndex + 1)}
              disabled={imageIndex >= images.length - 1}
              aria-label="Next image"
            >
              Next ›
            </button>
          </div>

          {canEdit && <ClassStrip classes={classList} currentKey={currentKey} onChoose={onChoose} />}
          {/* The tally panel sits below the canvas on narrow screens: its headline stays in view here. */}
          <p className="text-sm tabular-nums lg:hidden" data-testid="tally-headline">
            Cells {readTally.cellsCounted}/{readTally.target} · {formatPct(readTally.pctNormal)} normal
            {readTally.targetReached ? ' · target reached' : ''}
          </p>

          <section
            role="region"
            aria-label={imageLabel}
            aria-roledescription="scoring canvas"
            className="h-[58vh] min-h-[340px] overflow-hidden rounded-lg border border-line lg:h-[calc(100vh-15rem)]"
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

          {images.length > 1 && (
            <nav aria-label="Field images">
              <ol className="flex gap-2 overflow-x-auto pb-1">
                {images.map((img, i) => (
                  <li key={img.id} className="shrink-0">
                    <button
                      type="button"
                      onClick={() => goToImage(i)}
                      aria-current={i === imageIndex ? 'true' : undefined}
                      aria-label={`Image ${i + 1} of ${images.length}: ${img.fileName}, ${marksPerImage.get(img.id) ?? 0} marks`}
                      className="relative block rounded border-2 border-transparent aria-[current=true]:border-brand"
                    >
                      {/* eslint-disable-next-line @next/next/no-img-element */}
                      <img src={img.thumbUrl} alt="" loading="lazy" className="h-14 w-auto rounded-sm bg-paper-sunk" />
                      <span className="absolute bottom-0.5 right-0.5 rounded bg-black/70 px-1 text-[10px] text-white">{marksPerImage.get(img.id) ?? 0}</span>
                    </button>
                  </li>
                ))}
              </ol>
            </nav>
          )}
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
            <section aria-labelledby="selected-heading" className="space-y-2 rounded-md border border-line p-2">
              <h2 id="selected-heading" className="flex items-center gap-2 text-sm font-semibold">
                <span className="rounded bg-[#2a2630] p-0.5">
                  <MarkerSwatch shape={selectedClass.shape} colour={selectedClass.colour} size={14} />
                </span>
                Selected mark: {selectedClass.name}
              </h2>
              {canEdit && (
                <>
                  <div className="flex flex-wrap gap-1.5">
                    <button type="button" className="btn-secondary py-1" aria-expanded={tagsOpen} onClick={() => setTagsOpen((o) => !o)} disabled={!selectedClass.countsAsSperm}>
                      Extra defects{selected.tags.length ? ` (${selected.tags.length})` : ''}
                    </button>
                    <button type="button" className="btn-danger py-1" onClick={() => remove(selected.id)}>
                      Delete mark
                    </button>
                  </div>
                  {tagsOpen && selectedClass.countsAsSperm && (
                    <fieldset className="space-y-1">
                      <legend className="text-xs text-ink-soft">Further defects seen on this cell</legend>
                      {tagChoices.map((c, i) => (
                        <label key={c.key} className="flex items-center gap-2 text-sm">
                          <input type="checkbox" autoFocus={i === 0} checked={selected.tags.includes(c.key)} onChange={() => toggleTag(selected.id, c.key)} />
                          {c.name}
                        </label>
                      ))}
                    </fieldset>
                  )}
                </>
              )}
            </section>
          )}

          <TallyPanel classes={classList} read={readTally} image={imageTally} imageLabel={imageLabel} />

          {canEdit && (
            <div className="space-y-1">
              <button type="button" className="btn w-full" onClick={openSubmit}>
                Submit read
              </button>
              {!readTally.targetReached && <p className="text-xs text-ink-faint">{readTally.remainingToTarget} cells to go before the target.</p>}
            </div>
          )}

          <details className="text-xs text-ink-soft">
            <summary className="cursor-pointer text-sm font-medium text-ink">Keys and mouse</summary>
            <ul id="scoring-canvas-help" className="mt-1 list-disc space-y-0.5 pl-4">
              <li>Press a class key (digits; letters for non-sperm cells), then click a cell to mark it.</li>
              <li>“Keep this class” on: every click uses the chosen class. Off: the new mark is selected and the next key sets its class.</li>
              <li>Click a mark to select it; a class key then changes its class. Drag a mark to move it.</li>
              <li>Without a mouse: Tab to the image, pan a cell under the centre cross with the arrow keys, and press Enter to mark it (or to select the mark already there).</li>
              <li>Delete or Backspace removes the selected mark; Escape deselects.</li>
              <li>t opens the extra-defect checklist of the selected mark.</li>
              <li>Ctrl+Z undo; Ctrl+Shift+Z or Ctrl+Y redo (⌘ on a Mac).</li>
              <li>Drag empty space, Space+drag or the arrow keys (Shift: faster) pan; the wheel or + and − zoom; f fits the image.</li>
              <li>h hides or shows the marks; [ and ] go to the previous or next image.</li>
              <li>Class keys win over the letter commands if a class set uses the same letter.</li>
              <li>Marks save as you go and are kept in this browser while offline.</li>
            </ul>
          </details>
        </aside>
      </div>

      <div className="sr-only" aria-live="polite" aria-atomic="true" data-testid="announcer">
        {announcement}
      </div>

      <dialog
        ref={dialogRef}
        aria-labelledby="submit-heading"
        onClose={() => setDialogOpen(false)}
        className="m-auto max-w-md rounded-lg border border-line bg-paper-raised p-5 shadow-xl backdrop:bg-black/40"
      >
        <h2 id="submit-heading">Submit this read?</h2>
        <p className="mt-2 text-sm">
          {readTally.cellsCounted} of {read.targetCells} cells counted
          {readTally.nonSpermCounted ? `, ${readTally.nonSpermCounted} non-sperm cells tallied apart` : ''}.{' '}
          {!readTally.targetReached && <strong>The target is not reached yet. </strong>}
          After submitting, the read is locked and its marks can no longer be changed.
        </p>
        {submitError && (
          <p className="mt-2 text-sm text-danger" role="alert">
            {submitError}
          </p>
        )}
        <div className="mt-4 flex justify-end gap-2">
          <button type="button" className="btn-secondary" onClick={closeSubmit} disabled={submitting}>
            Keep scoring
          </button>
          <button type="button" className="btn" onClick={() => void submit()} disabled={submitting}>
            {submitting ? 'Submitting…' : 'Submit and lock'}
          </button>
        </div>
      </dialog>
    </div>
  );
}

export default ScoringWorkbench;
