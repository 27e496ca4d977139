'use client';

import type Konva from 'konva';
import { memo, useCallback, useEffect, useLayoutEffect, useRef, useState, type RefObject } from 'react';
import { Circle, Image as KonvaImage, Layer, Shape, Stage } from 'react-konva';
import type { MarkClass } from '@/lib/class-sets/schema';
import type { FieldCanvasControl, FieldImageRef, Point, ScoringMark } from '@/lib/scoring/types';
import type { CandidateState } from '@/lib/scoring/walk';
import {
  clampScale,
  fitToScreen,
  hitTest,
  isInsideImage,
  pan,
  panByKey,
  scaleBar,
  screenToImage,
  wheelZoomFactor,
  zoomAt,
  type Viewport,
} from '@/lib/scoring/viewport';
import { markerDrawer, markerRadiusForScale } from '@/lib/scoring/marker-draw';

export type { FieldCanvasControl };

export interface FieldCanvasProps {
  image: FieldImageRef;
  /** Marks on this image only. */
  marks: readonly ScoringMark[];
  classes: ReadonlyMap<string, MarkClass>;
  selectedId: string | null;
  marksVisible: boolean;
  readOnly: boolean;
  /** Class a click would place, for the cursor preview. */
  currentClass: MarkClass | null;
  onPlace(x: number, y: number): void;
  onSelect(id: string | null): void;
  onMove(id: string, x: number, y: number): void;
  onZoomChange?(scale: number): void;
  controlRef?: RefObject<FieldCanvasControl | null>;
  /** Machine candidates on this image with their state for this read (empty when hidden). */
  candidates?: readonly CanvasCandidate[];
  /** The candidate the cell walk stands on. */
  walkTarget?: Point | null;
  /**
   * A point to centre on at a scale, ringed (the settle view's disagreement, also where this read
   * has no mark). A new object centres again, instead of fitting the image when it is shown.
   */
  focus?: { x: number; y: number; scale: number } | null;
}

export interface CanvasCandidate extends Point {
  state: CandidateState;
}

const NO_CANDIDATES: readonly CanvasCandidate[] = [];

const CLICK_SLOP_PX = 4;
const FIT_PADDING = 12;
const FALLBACK_CLASS: Pick<MarkClass, 'shape' | 'colour'> = { shape: 'circle', colour: '#BBBBBB' };

type Source = HTMLImageElement | HTMLCanvasElement | ImageBitmap | CanvasImageSource;

/**
 * Halved copies of the display image. Drawing a 12-megapixel bitmap shrunk to
 * screen size on every pan frame is the slowest thing on the canvas; a copy near
 * the screen's resolution draws several times faster and looks the same.
 */
function buildPyramid(src: Source, w: number, h: number): Source[] {
  const levels: Source[] = [src];
  let prev = src;
  let lw = w;
  let lh = h;
  while (Math.max(lw, lh) > 1200) {
    lw = Math.ceil(lw / 2);
    lh = Math.ceil(lh / 2);
    const c = document.createElement('canvas');
    c.width = lw;
    c.height = lh;
    const ctx = c.getContext('2d');
    if (!ctx) break;
    ctx.imageSmoothingQuality = 'high';
    ctx.drawImage(prev as CanvasImageSource, 0, 0, lw, lh);
    levels.push(c);
    prev = c;
  }
  return levels;
}

function levelFor(levels: readonly Source[], scale: number): Source | undefined {
  const dpr = typeof window === 'undefined' ? 1 : window.devicePixelRatio || 1;
  const k = Math.floor(Math.log2(1 / Math.max(1e-6, scale * dpr)));
  return levels[Math.max(0, Math.min(levels.length - 1, k))];
}

/**
 * Draws every mark of the image in one pass. One Konva shape for all marks keeps a
 * placement to a constant amount of React work (no node per mark to reconcile or
 * allocate); hit testing is our own (hitTest), so the marks need no Konva hit graph.
 */
function drawMarks(
  c: CanvasRenderingContext2D,
  marks: readonly ScoringMark[],
  classes: ReadonlyMap<string, MarkClass>,
  radius: number,
  skipId: string | null,
) {
  for (const m of marks) {
    if (m.id === skipId) continue;
    const cls = classes.get(m.classKey) ?? FALLBACK_CLASS;
    const draw = markerDrawer(cls.shape, cls.colour, radius, m.tags.length > 0);
    c.translate(m.x, m.y);
    draw(c);
    c.translate(-m.x, -m.y);
  }
}

/**
 * Candidates as faint rings (open) or a small faint cross (skipped); a marked candidate shows its
 * mark only. One shape for all, like the marks. Line widths are in screen pixels.
 */
function drawCandidates(c: CanvasRenderingContext2D, candidates: readonly CanvasCandidate[], radius: number, scale: number) {
  const ring = radius * 1.5;
  const cross = radius * 0.6;
  c.beginPath();
  for (const p of candidates) {
    if (p.state !== 'open') continue;
    c.moveTo(p.x + ring, p.y);
    c.arc(p.x, p.y, ring, 0, Math.PI * 2);
  }
  c.lineWidth = 3 / scale;
  c.strokeStyle = 'rgba(17, 24, 32, 0.35)';
  c.stroke();
  c.lineWidth = 1.25 / scale;
  c.strokeStyle = 'rgba(255, 255, 255, 0.7)';
  c.stroke();
  c.beginPath();
  for (const p of candidates) {
    if (p.state !== 'skipped') continue;
    c.moveTo(p.x - cross, p.y - cross);
    c.lineTo(p.x + cross, p.y + cross);
    c.moveTo(p.x + cross, p.y - cross);
    c.lineTo(p.x - cross, p.y + cross);
  }
  c.lineWidth = 1.25 / scale;
  c.strokeStyle = 'rgba(255, 255, 255, 0.55)';
  c.stroke();
}

/** The walk's "judge this one" ring: bold, with four ticks outside it, so it reads on light and dark fields. */
function drawWalkTarget(c: CanvasRenderingContext2D, p: Point, radius: number, scale: number) {
  const r = radius * 2.3;
  const tick = radius * 1.1;
  c.beginPath();
  c.moveTo(p.x + r, p.y);
  c.arc(p.x, p.y, r, 0, Math.PI * 2);
  for (const [dx, dy] of [[1, 0], [-1, 0], [0, 1], [0, -1]] as const) {
    c.moveTo(p.x + dx * r, p.y + dy * r);
    c.lineTo(p.x + dx * (r + tick), p.y + dy * (r + tick));
  }
  c.lineWidth = 5 / scale;
  c.strokeStyle = '#111820';
  c.stroke();
  c.lineWidth = 2.5 / scale;
  c.strokeStyle = '#ffffff';
  c.stroke();
}

/** Memoised: the workbench re-renders for save status and dialogs; the canvas only when its props change. */
export const FieldCanvas = memo(function FieldCanvas(props: FieldCanvasProps) {
  const { image, marks, classes, selectedId, marksVisible, readOnly, currentClass, controlRef, candidates = NO_CANDIDATES, walkTarget = null, focus } = props;
  const containerRef = useRef<HTMLDivElement>(null);
  const stageRef = useRef<Konva.Stage>(null);
  const overlayRef = useRef<Konva.Layer>(null);
  const cursorRef = useRef<Konva.Shape>(null);
  const ghostRef = useRef<Konva.Shape>(null);
  const [size, setSize] = useState<{ w: number; h: number } | null>(null);
  const [levels, setLevels] = useState<Source[] | null>(null);
  const [loadError, setLoadError] = useState<string | null>(null);
  const [scale, setScale] = useState(1);
  const [draggingId, setDraggingId] = useState<string | null>(null);
  const [cursor, setCursor] = useState<'crosshair' | 'grab' | 'grabbing' | 'pointer' | 'default'>('crosshair');
  const vpRef = useRef<Viewport>({ scale: 1, x: 0, y: 0 });
  const spaceRef = useRef(false);
  const fittedFor = useRef<string | null>(null);

  // Latest props for the pointer handlers, which are bound once.
  const live = useRef(props);
  live.current = props;

  // Image: decode once per image, then build the pyramid.
  useEffect(() => {
    setLevels(null);
    setLoadError(null);
    let cancelled = false;
    const img = new window.Image();
    img.decoding = 'async';
    img.onload = () => {
      if (!cancelled) setLevels(buildPyramid(img, image.width, image.height));
    };
    img.onerror = () => {
      if (!cancelled) setLoadError('The field image could not be loaded. Check the connection and reload the page.');
    };
    img.src = image.displayUrl;
    return () => {
      cancelled = true;
      img.onload = null;
      img.onerror = null;
    };
  }, [image.displayUrl, image.width, image.height]);

  useLayoutEffect(() => {
    const el = containerRef.current;
    if (!el) return;
    const measure = () => {
      const r = el.getBoundingClientRect();
      setSize((s) => (s && s.w === Math.round(r.width) && s.h === Math.round(r.height) ? s : { w: Math.round(r.width), h: Math.round(r.height) }));
    };
    measure();
    const ro = new ResizeObserver(measure);
    ro.observe(el);
    return () => ro.disconnect();
  }, []);

  const applyViewport = useCallback((vp: Viewport) => {
    vpRef.current = vp;
    const stage = stageRef.current;
    if (stage) {
      stage.scale({ x: vp.scale, y: vp.scale });
      stage.position({ x: vp.x, y: vp.y });
      stage.batchDraw();
    }
    setScale((s) => (s === vp.scale ? s : vp.scale));
    live.current.onZoomChange?.(vp.scale);
  }, []);

  const fit = useCallback(() => {
    const el = containerRef.current;
    if (!el) return;
    const r = el.getBoundingClientRect();
    if (r.width < 2 || r.height < 2) return;
    applyViewport(fitToScreen(live.current.image.width, live.current.image.height, r.width, r.height, FIT_PADDING));
  }, [applyViewport]);

  // Fit when a new image is shown or the canvas first gets a size (or centre on the focus, when given).
  useEffect(() => {
    if (!size) return;
    if (fittedFor.current !== image.id) {
      fittedFor.current = image.id;
      if (!live.current.focus) fit();
    }
  }, [size, image.id, fit]);
  useEffect(() => {
    const el = containerRef.current;
    if (!size || !focus || !el) return;
    const r = el.getBoundingClientRect();
    const scale = clampScale(focus.scale);
    applyViewport({ scale, x: r.width / 2 - focus.x * scale, y: r.height / 2 - focus.y * scale });
  }, [size, focus, applyViewport]);

  const viewSize = useCallback(() => {
    const r = containerRef.current?.getBoundingClientRect();
    return { w: r?.width ?? 0, h: r?.height ?? 0 };
  }, []);
  const centre = useCallback(() => {
    const { w, h } = viewSize();
    return { x: w / 2, y: h / 2 };
  }, [viewSize]);

  useEffect(() => {
    if (!controlRef) return;
    controlRef.current = {
      fit,
      zoomBy: (f) => applyViewport(zoomAt(vpRef.current, centre(), f)),
      panKey: (key, shift) => {
        const vp = panByKey(vpRef.current, key, shift);
        if (!vp) return false;
        applyViewport(vp);
        return true;
      },
      panBy: (dx, dy) => applyViewport(pan(vpRef.current, dx, dy)),
      centreOn: (p, to) => {
        const { w, h } = viewSize();
        const s = clampScale(to ?? vpRef.current.scale);
        applyViewport({ scale: s, x: w / 2 - p.x * s, y: h / 2 - p.y * s });
      },
      viewSize,
      setSpacePan: (on) => {
        spaceRef.current = on;
        setCursor(on ? 'grab' : 'crosshair');
      },
      pressAtCentre: () => {
        const { image: img, readOnly: ro, marks: mks, marksVisible: visible } = live.current;
        const ip = screenToImage(vpRef.current, centre());
        const hit = visible ? hitTest(mks, ip, hitRadiusRef.current) : null;
        if (hit) {
          live.current.onSelect(hit.id);
          return 'selected';
        }
        if (!isInsideImage(ip.x, ip.y, img.width, img.height)) return 'off-image';
        if (ro) live.current.onSelect(null);
        else live.current.onPlace(ip.x, ip.y);
        return 'placed';
      },
      hasFocus: () => containerRef.current !== null && containerRef.current === document.activeElement,
      getStage: () => stageRef.current,
    };
    return () => {
      controlRef.current = null;
    };
  }, [controlRef, fit, applyViewport, viewSize, centre]);

  // Wheel zoom needs a non-passive listener to keep the page from scrolling.
  useEffect(() => {
    const el = containerRef.current;
    if (!el) return;
    const onWheel = (e: WheelEvent) => {
      e.preventDefault();
      const r = el.getBoundingClientRect();
      const dy = e.deltaMode === 1 ? e.deltaY * 33 : e.deltaY;
      applyViewport(zoomAt(vpRef.current, { x: e.clientX - r.left, y: e.clientY - r.top }, wheelZoomFactor(dy)));
    };
    el.addEventListener('wheel', onWheel, { passive: false });
    return () => el.removeEventListener('wheel', onWheel);
  }, [applyViewport]);

  const radius = markerRadiusForScale(scale);
  const hitRadius = radius * 1.4;
  const hitRadiusRef = useRef(hitRadius);
  hitRadiusRef.current = hitRadius;

  // Pointer gestures: tap/click places or selects, drag pans or moves a mark, two fingers pinch.
  const gesture = useRef<
    | null
    | { kind: 'press'; sx: number; sy: number; markId: string | null; pointerId: number; moved: boolean }
    | { kind: 'pan'; lastX: number; lastY: number; pointerId: number }
    | { kind: 'drag'; markId: string; pointerId: number; x: number; y: number }
    | { kind: 'pinch' }
  >(null);
  const pointers = useRef(new Map<number, { x: number; y: number }>());
  const pinchRef = useRef<{ dist: number; mid: { x: number; y: number } } | null>(null);

  const local = (e: React.PointerEvent) => {
    const r = containerRef.current!.getBoundingClientRect();
    return { x: e.clientX - r.left, y: e.clientY - r.top };
  };

  const moveCursor = (p: { x: number; y: number } | null) => {
    const c = cursorRef.current;
    if (!c) return;
    if (!p || readOnly) c.visible(false);
    else {
      const ip = screenToImage(vpRef.current, p);
      c.visible(isInsideImage(ip.x, ip.y, image.width, image.height));
      c.position(ip);
    }
    overlayRef.current?.batchDraw();
  };

  const onPointerDown = (e: React.PointerEvent<HTMLDivElement>) => {
    if (e.button !== 0 && e.button !== 1) return;
    containerRef.current?.focus({ preventScroll: true });
    const p = local(e);
    pointers.current.set(e.pointerId, p);
    e.currentTarget.setPointerCapture(e.pointerId);
    if (pointers.current.size === 2) {
      const [a, b] = [...pointers.current.values()] as [{ x: number; y: number }, { x: number; y: number }];
      pinchRef.current = { dist: Math.hypot(a.x - b.x, a.y - b.y), mid: { x: (a.x + b.x) / 2, y: (a.y + b.y) / 2 } };
      gesture.current = { kind: 'pinch' };
      return;
    }
    if (e.button === 1 || spaceRef.current) {
      gesture.current = { kind: 'pan', lastX: p.x, lastY: p.y, pointerId: e.pointerId };
      setCursor('grabbing');
      return;
    }
    const ip = screenToImage(vpRef.current, p);
    const hit = live.current.marksVisible ? hitTest(live.current.marks, ip, hitRadius) : null;
    gesture.current = { kind: 'press', sx: p.x, sy: p.y, markId: hit?.id ?? null, pointerId: e.pointerId, moved: false };
  };

  const onPointerMove = (e: React.PointerEvent<HTMLDivElement>) => {
    const p = local(e);
    if (pointers.current.has(e.pointerId)) pointers.current.set(e.pointerId, p);
    const g = gesture.current;
    if (g?.kind === 'pinch' && pointers.current.size === 2 && pinchRef.current) {
      const [a, b] = [...pointers.current.values()] as [{ x: number; y: number }, { x: number; y: number }];
      const dist = Math.hypot(a.x - b.x, a.y - b.y);
      const mid = { x: (a.x + b.x) / 2, y: (a.y + b.y) / 2 };
      const prev = pinchRef.current;
      let vp = pan(vpRef.current, mid.x - prev.mid.x, mid.y - prev.mid.y);
      if (prev.dist > 0) vp = zoomAt(vp, mid, dist / prev.dist);
      pinchRef.current = { dist, mid };
      applyViewport(vp);
      return;
    }
    if (!g) {
      moveCursor(p);
      if (!spaceRef.current) {
        const ip = screenToImage(vpRef.current, p);
        const over = live.current.marksVisible && !readOnly ? hitTest(live.current.marks, ip, hitRadius) : null;
        const want = over ? 'pointer' : readOnly ? 'default' : 'crosshair';
        if (want !== cursor) setCursor(want);
      }
      return;
    }
    if (g.kind === 'pan' && g.pointerId === e.pointerId) {
      applyViewport(pan(vpRef.current, p.x - g.lastX, p.y - g.lastY));
      g.lastX = p.x;
      g.lastY = p.y;
      return;
    }
    if (g.kind === 'press' && g.pointerId === e.pointerId) {
      if (Math.hypot(p.x - g.sx, p.y - g.sy) < CLICK_SLOP_PX) return;
      if (g.markId && !readOnly) {
        const ip = screenToImage(vpRef.current, p);
        gesture.current = { kind: 'drag', markId: g.markId, pointerId: g.pointerId, x: ip.x, y: ip.y };
        live.current.onSelect(g.markId);
        setDraggingId(g.markId);
        moveCursor(null);
        setCursor('grabbing');
      } else {
        gesture.current = { kind: 'pan', lastX: p.x, lastY: p.y, pointerId: g.pointerId };
        applyViewport(pan(vpRef.current, p.x - g.sx, p.y - g.sy));
        setCursor('grabbing');
      }
      return;
    }
    if (g.kind === 'drag' && g.pointerId === e.pointerId) {
      const ip = screenToImage(vpRef.current, p);
      g.x = ip.x;
      g.y = ip.y;
      ghostRef.current?.position(ip);
      overlayRef.current?.batchDraw();
    }
  };

  const endGesture = (e: React.PointerEvent<HTMLDivElement>, cancelled: boolean) => {
    pointers.current.delete(e.pointerId);
    const g = gesture.current;
    if (g?.kind === 'pinch') {
      if (pointers.current.size === 0) gesture.current = null;
      pinchRef.current = null;
      return;
    }
    if (!g || ('pointerId' in g && g.pointerId !== e.pointerId)) return;
    gesture.current = null;
    setCursor(spaceRef.current ? 'grab' : readOnly ? 'default' : 'crosshair');
    if (cancelled) {
      setDraggingId(null);
      return;
    }
    const { image: img } = live.current;
    if (g.kind === 'drag') {
      setDraggingId(null);
      // A mark dropped off the image goes back where it was.
      if (isInsideImage(g.x, g.y, img.width, img.height)) live.current.onMove(g.markId, g.x, g.y);
      return;
    }
    if (g.kind === 'press') {
      if (g.markId) {
        live.current.onSelect(g.markId);
        return;
      }
      const ip = screenToImage(vpRef.current, local(e));
      if (!readOnly && isInsideImage(ip.x, ip.y, img.width, img.height)) live.current.onPlace(ip.x, ip.y);
      else live.current.onSelect(null);
    }
  };

  // A new function when the marks, their size or the dragged mark change: react-konva then redraws the layer.
  const marksScene = useCallback((ctx: Konva.Context) => drawMarks(ctx._context, marks, classes, radius, draggingId), [marks, classes, radius, draggingId]);
  const candidatesScene = useCallback((ctx: Konva.Context) => drawCandidates(ctx._context, candidates, radius, scale), [candidates, radius, scale]);
  const walkScene = useCallback((ctx: Konva.Context) => walkTarget && drawWalkTarget(ctx._context, walkTarget, radius, scale), [walkTarget, radius, scale]);
  const selected = selectedId ? marks.find((m) => m.id === selectedId) : undefined;
  const dragged = draggingId ? marks.find((m) => m.id === draggingId) : undefined;
  const draggedClass = dragged ? (classes.get(dragged.classKey) ?? FALLBACK_CLASS) : null;
  const cursorClass = currentClass ?? FALLBACK_CLASS;
  const cursorDraw = markerDrawer(cursorClass.shape, cursorClass.colour, radius, false);
  const ghostDraw = dragged && draggedClass ? markerDrawer(draggedClass.shape, draggedClass.colour, radius, dragged.tags.length > 0) : null;

  const source = levels ? levelFor(levels, scale) : undefined;
  const bar = image.micronsPerPixel ? scaleBar(image.micronsPerPixel, scale) : null;

  return (
    <div
      ref={containerRef}
      tabIndex={0}
      aria-describedby="scoring-canvas-help"
      className="group relative h-full w-full touch-none select-none overflow-hidden bg-[#2a2630] outline-none focus-visible:ring-2 focus-visible:ring-brand"
      style={{ cursor }}
      onPointerDown={onPointerDown}
      onPointerMove={onPointerMove}
      onPointerUp={(e) => endGesture(e, false)}
      onPointerCancel={(e) => endGesture(e, true)}
      onPointerLeave={() => moveCursor(null)}
      data-testid="field-canvas"
      data-scale={scale.toFixed(4)}
      data-walk-target={walkTarget ? `${walkTarget.x},${walkTarget.y}` : undefined}
    >
      {size && (
        <Stage ref={stageRef} width={size.w} height={size.h} listening={false}>
          <Layer listening={false} imageSmoothingEnabled>
            {source && <KonvaImage image={source as CanvasImageSource} width={image.width} height={image.height} listening={false} perfectDrawEnabled={false} />}
          </Layer>
          <Layer listening={false} visible={marksVisible}>
            {candidates.length > 0 && <Shape listening={false} perfectDrawEnabled={false} shadowForStrokeEnabled={false} sceneFunc={candidatesScene} />}
            <Shape listening={false} perfectDrawEnabled={false} shadowForStrokeEnabled={false} sceneFunc={marksScene} />
            {walkTarget && <Shape listening={false} perfectDrawEnabled={false} shadowForStrokeEnabled={false} sceneFunc={walkScene} />}
          </Layer>
          <Layer ref={overlayRef} listening={false}>
            {selected && marksVisible && !dragged && (
              <>
                <Circle x={selected.x} y={selected.y} radius={radius * 1.75} stroke="#111820" strokeWidth={4} strokeScaleEnabled={false} listening={false} perfectDrawEnabled={false} />
                <Circle x={selected.x} y={selected.y} radius={radius * 1.75} stroke="#ffffff" strokeWidth={2} dash={[5, 3]} strokeScaleEnabled={false} listening={false} perfectDrawEnabled={false} />
              </>
            )}
            {focus && (
              <>
                <Circle x={focus.x} y={focus.y} radius={radius * 3} stroke="#111820" strokeWidth={4} strokeScaleEnabled={false} listening={false} perfectDrawEnabled={false} />
                <Circle x={focus.x} y={focus.y} radius={radius * 3} stroke="#ffd54a" strokeWidth={2} dash={[6, 4]} strokeScaleEnabled={false} listening={false} perfectDrawEnabled={false} />
              </>
            )}
            {ghostDraw && dragged && (
              <Shape ref={ghostRef} x={dragged.x} y={dragged.y} listening={false} perfectDrawEnabled={false} sceneFunc={(ctx) => ghostDraw(ctx._context)} />
            )}
            {!readOnly && (
              <Shape
                ref={cursorRef}
                visible={false}
                opacity={0.45}
                listening={false}
                perfectDrawEnabled={false}
                sceneFunc={(ctx) => cursorDraw(ctx._context)}
              />
            )}
          </Layer>
        </Stage>
      )}
      {/* The centre cross, shown while the canvas has keyboard focus: Enter acts as a click under it. */}
      <div aria-hidden data-testid="centre-cross" className="pointer-events-none absolute left-1/2 top-1/2 hidden h-7 w-7 -translate-x-1/2 -translate-y-1/2 group-focus-visible:block">
        <span className="absolute left-1/2 top-0 h-full w-0.5 -translate-x-1/2 bg-white/90 shadow-[0_0_0_1px_rgba(0,0,0,0.6)]" />
        <span className="absolute left-0 top-1/2 h-0.5 w-full -translate-y-1/2 bg-white/90 shadow-[0_0_0_1px_rgba(0,0,0,0.6)]" />
      </div>
      {!levels && !loadError && (
        <p className="pointer-events-none absolute inset-0 flex items-center justify-center text-sm text-white/80">Loading image…</p>
      )}
      {loadError && (
        <p role="alert" className="absolute inset-x-4 top-4 rounded bg-danger-bg px-3 py-2 text-sm text-danger">
          {loadError}
        </p>
      )}
      <div className="pointer-events-none absolute bottom-2 left-2 rounded bg-black/60 px-2 py-1 text-xs text-white" data-testid="scale-bar">
        {bar ? (
          <span className="flex flex-col items-start gap-1">
            <span aria-hidden className="block h-1.5 border-x-2 border-b-2 border-white" style={{ width: `${bar.px}px` }} />
            <span>{bar.microns} µm</span>
          </span>
        ) : (
          <span>No scale set</span>
        )}
      </div>
      <div className="pointer-events-none absolute bottom-2 right-2 rounded bg-black/60 px-2 py-1 text-xs text-white">
        {Math.round(scale * 100)} %
      </div>
    </div>
  );
});

export default FieldCanvas;
