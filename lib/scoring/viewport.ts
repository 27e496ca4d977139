import type { Point } from './types';

/**
 * The stage transform: screen = image × scale + (x, y). The canvas applies it to the
 * stage, so panning and zooming never re-render the marks.
 */
export interface Viewport {
  scale: number;
  x: number;
  y: number;
}

export interface ZoomLimits {
  min: number;
  max: number;
}

export const ZOOM_LIMITS: Readonly<ZoomLimits> = Object.freeze({ min: 0.05, max: 20 });
/** Screen pixels moved per arrow key press; Shift multiplies it. */
export const KEYBOARD_PAN_STEP = 60;
export const KEYBOARD_PAN_FAST = 4;
/** Factor for one zoom key press (+ / −) or one wheel notch. */
export const ZOOM_STEP = 1.25;

export function clampScale(scale: number, limits: ZoomLimits = ZOOM_LIMITS): number {
  return Math.min(limits.max, Math.max(limits.min, scale));
}

/** Largest scale at which the whole image fits inside the view less `padding` on every side, centred. */
export function fitToScreen(
  imageW: number,
  imageH: number,
  viewW: number,
  viewH: number,
  padding = 0,
  limits: ZoomLimits = ZOOM_LIMITS,
): Viewport {
  if (!(imageW > 0 && imageH > 0)) throw new RangeError('Image size must be positive');
  const availW = Math.max(1, viewW - 2 * padding);
  const availH = Math.max(1, viewH - 2 * padding);
  const scale = clampScale(Math.min(availW / imageW, availH / imageH), limits);
  return { scale, x: (viewW - imageW * scale) / 2, y: (viewH - imageH * scale) / 2 };
}

export function screenToImage(vp: Viewport, p: Point): Point {
  return { x: (p.x - vp.x) / vp.scale, y: (p.y - vp.y) / vp.scale };
}

export function imageToScreen(vp: Viewport, p: Point): Point {
  return { x: p.x * vp.scale + vp.x, y: p.y * vp.scale + vp.y };
}

/** Zoom by `factor` about a screen point; the image point under it stays under it. */
export function zoomAt(vp: Viewport, pointerScreen: Point, factor: number, limits: ZoomLimits = ZOOM_LIMITS): Viewport {
  if (!(factor > 0) || !Number.isFinite(factor)) return vp;
  const scale = clampScale(vp.scale * factor, limits);
  const anchor = screenToImage(vp, pointerScreen);
  return { scale, x: pointerScreen.x - anchor.x * scale, y: pointerScreen.y - anchor.y * scale };
}

/** Zoom factor for a wheel event: smooth for trackpads, about one ZOOM_STEP per mouse notch (deltaY ≈ 100). */
export function wheelZoomFactor(deltaY: number): number {
  return Math.pow(ZOOM_STEP, -deltaY / 100);
}

export function pan(vp: Viewport, dx: number, dy: number): Viewport {
  return { scale: vp.scale, x: vp.x + dx, y: vp.y + dy };
}

/**
 * Arrow keys move the view over the image (ArrowRight shows more of the right side,
 * so the image moves left). Returns null for any other key so the caller can pass it on.
 */
export function panByKey(vp: Viewport, key: string, shift = false, step = KEYBOARD_PAN_STEP): Viewport | null {
  const s = shift ? step * KEYBOARD_PAN_FAST : step;
  switch (key) {
    case 'ArrowLeft':
      return pan(vp, s, 0);
    case 'ArrowRight':
      return pan(vp, -s, 0);
    case 'ArrowUp':
      return pan(vp, 0, s);
    case 'ArrowDown':
      return pan(vp, 0, -s);
    default:
      return null;
  }
}

export interface ScaleBar {
  /** Bar length in micrometres: 1, 2 or 5 × 10^n. */
  microns: number;
  /** Bar length in screen pixels (≤ target). */
  px: number;
}

/** Largest 1/2/5 × 10^n not above `value`. */
export function niceFloor(value: number): number {
  if (!(value > 0) || !Number.isFinite(value)) throw new RangeError(`niceFloor needs a positive number, got ${value}`);
  let exp = Math.floor(Math.log10(value));
  // toPrecision removes float noise such as 0.30000000000000004 before comparing
  let mant = Number((value / Math.pow(10, exp)).toPrecision(12));
  // log10 may land a hair off an exact power of ten
  if (mant >= 10) {
    exp += 1;
    mant /= 10;
  } else if (mant < 1) {
    exp -= 1;
    mant *= 10;
  }
  const base = Math.pow(10, exp);
  const m = mant >= 5 ? 5 : mant >= 2 ? 2 : 1;
  return Number((m * base).toPrecision(12));
}

/** Scale bar no longer than `targetScreenPx`, with a round length in µm. */
export function scaleBar(micronsPerPixel: number, viewportScale: number, targetScreenPx = 120): ScaleBar {
  if (!(micronsPerPixel > 0) || !(viewportScale > 0) || !(targetScreenPx > 0)) {
    throw new RangeError('scaleBar needs positive calibration, scale and target');
  }
  const micronsPerScreenPx = micronsPerPixel / viewportScale;
  const microns = niceFloor(targetScreenPx * micronsPerScreenPx);
  return { microns, px: microns / micronsPerScreenPx };
}

/**
 * The mark nearest to `point` within `radiusImagePx` (inclusive), or null. On a tie
 * the later mark wins: it is drawn on top, so it is the one the user sees.
 */
export function hitTest<M extends Point>(marks: Iterable<M>, point: Point, radiusImagePx: number): M | null {
  let best: M | null = null;
  let bestD2 = radiusImagePx * radiusImagePx;
  for (const m of marks) {
    const dx = m.x - point.x;
    const dy = m.y - point.y;
    const d2 = dx * dx + dy * dy;
    if (d2 <= bestD2) {
      best = m;
      bestD2 = d2;
    }
  }
  return best;
}

/** Whether an image-pixel point lies on the image (edges included). */
export function isInsideImage(x: number, y: number, w: number, h: number): boolean {
  return x >= 0 && y >= 0 && x <= w && y <= h;
}
