import { describe, expect, it } from 'vitest';
import { MARKER_SHAPES, type MarkerShape } from '@/lib/class-sets/schema';
import { markerPoints, type MarkerGeometry } from '@/lib/scoring/shapes';

const CX = 100;
const CY = 50;
const R = 8;
const EPS = 1e-9;

function pointsOf(g: MarkerGeometry): [number, number][] {
  const flat = g.kind === 'polygon' ? g.points : g.kind === 'cross' ? g.segments.flat() : [g.x, g.y];
  const out: [number, number][] = [];
  for (let i = 0; i < flat.length; i += 2) out.push([flat[i]!, flat[i + 1]!]);
  return out;
}

function polygon(shape: MarkerShape): number[] {
  const g = markerPoints(shape, CX, CY, R);
  if (g.kind !== 'polygon') throw new Error(`${shape} is not a polygon`);
  return g.points;
}

describe('marker shapes', () => {
  it('has the expected vertex count per polygon (computed from each shape definition)', () => {
    const expected: Partial<Record<MarkerShape, number>> = {
      square: 4,
      diamond: 4,
      'triangle-up': 3,
      'triangle-down': 3,
      pentagon: 5,
      hexagon: 6,
      star: 10,
      hourglass: 6,
    };
    for (const [shape, n] of Object.entries(expected)) {
      expect(polygon(shape as MarkerShape).length / 2, shape).toBe(n);
    }
  });

  it('draws circle and ring as circles, cross and plus as two segments', () => {
    expect(markerPoints('circle', CX, CY, R)).toEqual({ kind: 'circle', x: CX, y: CY, radius: R, hollow: false });
    expect(markerPoints('ring', CX, CY, R)).toEqual({ kind: 'circle', x: CX, y: CY, radius: R, hollow: true });
    const cross = markerPoints('cross', CX, CY, R);
    const plus = markerPoints('plus', CX, CY, R);
    expect(cross.kind === 'cross' && cross.segments.length).toBe(2);
    expect(plus.kind === 'cross' && plus.segments).toEqual([
      [CX, CY - R, CX, CY + R],
      [CX - R, CY, CX + R, CY],
    ]);
  });

  it('keeps every point within the radius for every shape', () => {
    for (const shape of MARKER_SHAPES) {
      for (const [x, y] of pointsOf(markerPoints(shape, CX, CY, R))) {
        expect(Math.hypot(x - CX, y - CY), shape).toBeLessThanOrEqual(R + EPS);
      }
    }
  });

  it('is mirror-symmetric about the vertical axis through the centre', () => {
    for (const shape of MARKER_SHAPES) {
      const pts = pointsOf(markerPoints(shape, CX, CY, R));
      for (const [x, y] of pts) {
        const mx = 2 * CX - x;
        const hasMirror = pts.some(([px, py]) => Math.abs(px - mx) < 1e-6 && Math.abs(py - y) < 1e-6);
        expect(hasMirror, `${shape} (${x}, ${y})`).toBe(true);
      }
    }
  });

  it('points the triangles the way their names say (screen y grows down)', () => {
    const up = polygon('triangle-up');
    expect(up[0]).toBeCloseTo(CX, 9);
    expect(up[1]).toBeCloseTo(CY - R, 9);
    const down = polygon('triangle-down');
    expect(down[0]).toBeCloseTo(CX, 9);
    expect(down[1]).toBeCloseTo(CY + R, 9);
  });

  it('makes squares axis-aligned and diamonds stand on a corner', () => {
    const sq = polygon('square');
    const d = R / Math.SQRT2; // computed: corner on the circle at 45°
    expect(sq[0]).toBeCloseTo(CX - d, 9);
    expect(sq[1]).toBeCloseTo(CY - d, 9);
    const di = polygon('diamond');
    expect(di[0]).toBeCloseTo(CX, 9);
    expect(di[1]).toBeCloseTo(CY - R, 9);
  });

  it('alternates outer and inner star radii', () => {
    const st = polygon('star');
    const radii = [];
    for (let i = 0; i < st.length; i += 2) radii.push(Math.hypot(st[i]! - CX, st[i + 1]! - CY));
    radii.forEach((r, i) => expect(r).toBeCloseTo(i % 2 === 0 ? R : R * 0.45, 9));
  });

  it('refuses a non-positive radius', () => {
    expect(() => markerPoints('circle', 0, 0, 0)).toThrow(RangeError);
    expect(() => markerPoints('star', 0, 0, Number.NaN)).toThrow(RangeError);
  });
});
