import type { MarkerShape } from '@/lib/class-sets/schema';
import { markerPoints } from '@/lib/scoring/shapes';

/** Dark outline under every marker so light and dark markers both read on any stain. */
export const MARKER_OUTLINE = '#111820';
/** Marker radius on screen, in CSS pixels, whatever the zoom. */
export const MARKER_SCREEN_RADIUS = 9;

/**
 * Marker size in image pixels for a viewport scale, in steps of √2 so zooming
 * re-renders the marks only when a step is crossed, not on every wheel notch.
 */
export function markerRadiusForScale(scale: number): number {
  const step = Math.round(Math.log2(scale) * 2) / 2;
  return MARKER_SCREEN_RADIUS / Math.pow(2, step);
}

type Draw = (c: CanvasRenderingContext2D) => void;
const cache = new Map<string, Draw>();

/**
 * A drawing function for one marker look, centred on (0, 0). Cached by look, so
 * thousands of marks share a handful of functions and Path2D objects.
 */
export function markerDrawer(shape: MarkerShape, colour: string, radius: number, tagged: boolean): Draw {
  const key = `${shape}|${colour}|${radius}|${tagged ? 1 : 0}`;
  const hit = cache.get(key);
  if (hit) return hit;
  const g = markerPoints(shape, 0, 0, radius);
  const lw = radius / 6;
  const path = new Path2D();
  if (g.kind === 'circle') path.arc(0, 0, g.hollow ? g.radius * 0.85 : g.radius, 0, Math.PI * 2);
  else if (g.kind === 'polygon') {
    path.moveTo(g.points[0]!, g.points[1]!);
    for (let i = 2; i < g.points.length; i += 2) path.lineTo(g.points[i]!, g.points[i + 1]!);
    path.closePath();
  } else for (const [x1, y1, x2, y2] of g.segments) {
    path.moveTo(x1, y1);
    path.lineTo(x2, y2);
  }
  const strokeOnly = g.kind === 'cross' || (g.kind === 'circle' && g.hollow);
  const badge = new Path2D();
  badge.arc(radius * 0.85, -radius * 0.85, radius * 0.32, 0, Math.PI * 2);
  const draw: Draw = (c) => {
    c.lineJoin = 'round';
    c.lineCap = 'round';
    if (strokeOnly) {
      c.strokeStyle = MARKER_OUTLINE;
      c.lineWidth = lw * 4;
      c.stroke(path);
      c.strokeStyle = colour;
      c.lineWidth = lw * 2.2;
      c.stroke(path);
    } else {
      c.fillStyle = colour;
      c.fill(path);
      c.strokeStyle = MARKER_OUTLINE;
      c.lineWidth = lw * 1.3;
      c.stroke(path);
    }
    if (tagged) {
      // extra defect tags: a small white dot at the top right
      c.fillStyle = '#ffffff';
      c.fill(badge);
      c.strokeStyle = MARKER_OUTLINE;
      c.lineWidth = lw;
      c.stroke(badge);
    }
  };
  cache.set(key, draw);
  return draw;
}
