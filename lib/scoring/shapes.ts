import type { MarkerShape } from '@/lib/class-sets/schema';

/**
 * What the canvas draws for one marker. Polygons are flat [x1, y1, x2, y2, …] lists
 * for a closed Konva Line; crosses are stroke-only segments [x1, y1, x2, y2].
 * Every point lies within `radius` of the centre, so hit areas and selection rings
 * can use the same radius for every shape.
 */
export type MarkerGeometry =
  | { kind: 'circle'; x: number; y: number; radius: number; hollow: boolean }
  | { kind: 'polygon'; points: number[] }
  | { kind: 'cross'; segments: [number, number, number, number][] };

/** Inner/outer radius of the star: chunkier than a geometric pentagram so it stays legible small. */
export const STAR_INNER_RATIO = 0.45;
/** Half-width of the hourglass waist as a fraction of the radius. */
export const HOURGLASS_WAIST_RATIO = 0.15;

const TOP = -Math.PI / 2; // screen y grows downwards

function regularPolygon(n: number, cx: number, cy: number, r: number, startAngle: number): number[] {
  const pts: number[] = [];
  for (let i = 0; i < n; i++) {
    const a = startAngle + (2 * Math.PI * i) / n;
    pts.push(cx + r * Math.cos(a), cy + r * Math.sin(a));
  }
  return pts;
}

export function markerPoints(shape: MarkerShape, cx: number, cy: number, radius: number): MarkerGeometry {
  if (!(radius > 0) || !Number.isFinite(radius)) throw new RangeError(`Marker radius must be a positive number, got ${radius}`);
  const r = radius;
  const d = r / Math.SQRT2; // corner offset that puts a square's corners on the circle
  switch (shape) {
    case 'circle':
      return { kind: 'circle', x: cx, y: cy, radius: r, hollow: false };
    case 'ring':
      return { kind: 'circle', x: cx, y: cy, radius: r, hollow: true };
    case 'square':
      return { kind: 'polygon', points: regularPolygon(4, cx, cy, r, -3 * Math.PI / 4) };
    case 'diamond':
      return { kind: 'polygon', points: regularPolygon(4, cx, cy, r, TOP) };
    case 'triangle-up':
      return { kind: 'polygon', points: regularPolygon(3, cx, cy, r, TOP) };
    case 'triangle-down':
      return { kind: 'polygon', points: regularPolygon(3, cx, cy, r, Math.PI / 2) };
    case 'pentagon':
      return { kind: 'polygon', points: regularPolygon(5, cx, cy, r, TOP) };
    case 'hexagon':
      return { kind: 'polygon', points: regularPolygon(6, cx, cy, r, TOP) };
    case 'star': {
      const pts: number[] = [];
      for (let i = 0; i < 10; i++) {
        const rr = i % 2 === 0 ? r : r * STAR_INNER_RATIO;
        const a = TOP + (Math.PI * i) / 5;
        pts.push(cx + rr * Math.cos(a), cy + rr * Math.sin(a));
      }
      return { kind: 'polygon', points: pts };
    }
    case 'hourglass': {
      const w = r * HOURGLASS_WAIST_RATIO;
      return {
        kind: 'polygon',
        points: [cx - d, cy - d, cx + d, cy - d, cx + w, cy, cx + d, cy + d, cx - d, cy + d, cx - w, cy],
      };
    }
    case 'cross':
      return {
        kind: 'cross',
        segments: [
          [cx - d, cy - d, cx + d, cy + d],
          [cx + d, cy - d, cx - d, cy + d],
        ],
      };
    case 'plus':
      return {
        kind: 'cross',
        segments: [
          [cx, cy - r, cx, cy + r],
          [cx - r, cy, cx + r, cy],
        ],
      };
    default: {
      const never: never = shape;
      throw new Error(`Unknown marker shape: ${String(never)}`);
    }
  }
}
