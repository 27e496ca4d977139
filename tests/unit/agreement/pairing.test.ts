import { describe, expect, it } from 'vitest';
import {
  PAIRING_DISTANCE_PX_DEFAULT,
  PAIRING_DISTANCE_UM_DEFAULT,
  pairMarks,
  pairPoints,
  pairingDistancePx,
  type PairingMark,
  type Point,
  type PointPairing,
} from '@/lib/agreement/pairing';
import { mulberry32 } from '@/lib/synthetic/prng';

/**
 * The reference the assignment is checked against: every one-to-one matching of in-range
 * pairs, enumerated, and the best by (most pairs, then least summed distance). Exponential,
 * so only for a handful of points — an independent statement of the rule, not a copy of it.
 */
function bruteForce(first: Point[], second: Point[], max: number): { count: number; total: number } {
  const dist = (a: Point, b: Point) => Math.hypot(a.x - b.x, a.y - b.y);
  const used = new Array<boolean>(second.length).fill(false);
  let best = { count: -1, total: Infinity };
  const walk = (i: number, count: number, total: number) => {
    if (i === first.length) {
      if (count > best.count || (count === best.count && total < best.total - 1e-9)) best = { count, total };
      return;
    }
    walk(i + 1, count, total);
    for (let j = 0; j < second.length; j++) {
      const d = dist(first[i]!, second[j]!);
      if (!used[j] && d <= max) {
        used[j] = true;
        walk(i + 1, count + 1, total + d);
        used[j] = false;
      }
    }
  };
  walk(0, 0, 0);
  return best;
}

const total = (r: PointPairing) => r.pairs.reduce((s, p) => s + p.distance, 0);

/** Every index appears exactly once across pairs and the unpaired lists, and pairs are in range. */
function expectPartition(r: PointPairing, m: number, n: number, max: number) {
  const a = [...r.pairs.map((p) => p.first), ...r.onlyFirst].sort((x, y) => x - y);
  const b = [...r.pairs.map((p) => p.second), ...r.onlySecond].sort((x, y) => x - y);
  expect(a).toEqual(Array.from({ length: m }, (_, i) => i));
  expect(b).toEqual(Array.from({ length: n }, (_, i) => i));
  for (const p of r.pairs) expect(p.distance).toBeLessThanOrEqual(max);
}

describe('pairPoints', () => {
  it('pairs the same cells marked a little apart and reports the distance', () => {
    const r = pairPoints(
      [{ x: 100, y: 100 }, { x: 300, y: 100 }],
      [{ x: 303, y: 104 }, { x: 101, y: 100 }],
      10,
    );
    expect(r.pairs).toEqual([
      { first: 0, second: 1, distance: 1 },
      { first: 1, second: 0, distance: 5 }, // 3-4-5 triangle
    ]);
    expect(r.onlyFirst).toEqual([]);
    expect(r.onlySecond).toEqual([]);
  });

  it('never pairs marks farther apart than the pairing distance; exactly at it they pair', () => {
    const r = pairPoints([{ x: 0, y: 0 }, { x: 100, y: 0 }], [{ x: 10.0001, y: 0 }, { x: 110, y: 0 }], 10);
    expect(r.pairs).toEqual([{ first: 1, second: 1, distance: 10 }]);
    expect(r.onlyFirst).toEqual([0]);
    expect(r.onlySecond).toEqual([0]);
  });

  it('crowded cells closer than the pairing distance: pairs as many as possible, not the closest first', () => {
    // First read at x = 0 and −8, second at x = 1 and 9, pairing distance 10. Closest-first takes
    // 0–1 (distance 1) and strands −8 and 9 (17 apart); the optimal rule pairs 0–9 and −8–1.
    const first = [{ x: 0, y: 0 }, { x: -8, y: 0 }];
    const second = [{ x: 1, y: 0 }, { x: 9, y: 0 }];
    const r = pairPoints(first, second, 10);
    expect(r.pairs).toEqual([
      { first: 0, second: 1, distance: 9 },
      { first: 1, second: 0, distance: 9 },
    ]);
    expect(r.onlyFirst).toEqual([]);
    // A cost of "pairing distance + 1" for out-of-range cells would have kept 0–1 (1 + 11 < 18):
    // the out-of-range cost must outweigh every in-range sum, which this case proves it does.
    expect(bruteForce(first, second, 10)).toEqual({ count: 2, total: 18 });
  });

  it('among assignments with as many pairs, takes the least total distance', () => {
    // Three cells in a row 6 px apart, second read shifted 2 px: pairing shifted neighbours
    // (total 6) beats any crossing assignment.
    const first = [{ x: 0, y: 0 }, { x: 6, y: 0 }, { x: 12, y: 0 }];
    const second = [{ x: 14, y: 0 }, { x: 2, y: 0 }, { x: 8, y: 0 }];
    const r = pairPoints(first, second, 10);
    expect(r.pairs.map((p) => [p.first, p.second])).toEqual([[0, 1], [1, 2], [2, 0]]);
    expect(total(r)).toBeCloseTo(6, 12);
  });

  it('a tie: two equally good assignments give one of them, the same one every time', () => {
    // A square: first read on one diagonal, second on the other; every side is 10 px, so
    // 0–0 & 1–1 and 0–1 & 1–0 both total 20.
    const first = [{ x: 0, y: 0 }, { x: 10, y: 10 }];
    const second = [{ x: 10, y: 0 }, { x: 0, y: 10 }];
    const r = pairPoints(first, second, 12);
    expect(r.pairs).toHaveLength(2);
    expect(total(r)).toBeCloseTo(20, 12);
    expect(pairPoints(first, second, 12)).toEqual(r);
    // Two second-read marks on the same spot, equally near the one first-read mark: one pairs.
    const dup = pairPoints([{ x: 5, y: 5 }], [{ x: 6, y: 5 }, { x: 6, y: 5 }], 4);
    expect(dup.pairs).toHaveLength(1);
    expect(dup.onlySecond).toHaveLength(1);
    expect(pairPoints([{ x: 5, y: 5 }], [{ x: 6, y: 5 }, { x: 6, y: 5 }], 4)).toEqual(dup);
  });

  it('one reader missed cells: the other reader’s extra marks stay unpaired', () => {
    const cells = Array.from({ length: 10 }, (_, i) => ({ x: 50 + 100 * i, y: 200 }));
    const second = cells.filter((_, i) => i % 3 !== 0).map((c) => ({ x: c.x + 2, y: c.y - 1 }));
    const r = pairPoints(cells, second, 13);
    expect(r.pairs).toHaveLength(6);
    expect(r.onlyFirst).toEqual([0, 3, 6, 9]);
    expect(r.onlySecond).toEqual([]);
    expectPartition(r, 10, 6, 13);
  });

  it('very different counts: 3 marks against 40 pair at most 3', () => {
    const rnd = mulberry32(7);
    const second = Array.from({ length: 40 }, () => ({ x: rnd() * 400, y: rnd() * 300 }));
    const first = [second[5]!, second[17]!, second[33]!].map((p) => ({ x: p.x + 1, y: p.y + 1 }));
    const r = pairPoints(first, second, 5);
    expect(r.pairs.length).toBeLessThanOrEqual(3);
    expect(r.pairs.length).toBe(bruteForce(first, second, 5).count);
    expect(total(r)).toBeCloseTo(bruteForce(first, second, 5).total, 9);
    expectPartition(r, 3, 40, 5);
    // the other way round (many rows, few columns) gives the same count and total
    const back = pairPoints(second, first, 5);
    expect(back.pairs.length).toBe(r.pairs.length);
    expect(total(back)).toBeCloseTo(total(r), 9);
  });

  it('empty reads', () => {
    expect(pairPoints([], [], 5)).toEqual({ pairs: [], onlyFirst: [], onlySecond: [] });
    expect(pairPoints([{ x: 1, y: 1 }], [], 5)).toEqual({ pairs: [], onlyFirst: [0], onlySecond: [] });
    expect(pairPoints([], [{ x: 1, y: 1 }, { x: 2, y: 2 }], 5)).toEqual({ pairs: [], onlyFirst: [], onlySecond: [0, 1] });
  });

  it('matches the exhaustive optimum (most pairs, then least distance) on 300 random crowded layouts', () => {
    const rnd = mulberry32(20260101);
    for (let trial = 0; trial < 300; trial++) {
      const m = 1 + Math.floor(rnd() * 6);
      const n = 1 + Math.floor(rnd() * 6);
      // a 30 × 30 px patch with a 10 px pairing distance: most marks can reach several others
      const pts = (k: number) => Array.from({ length: k }, () => ({ x: rnd() * 30, y: rnd() * 30 }));
      const first = pts(m);
      const second = pts(n);
      const r = pairPoints(first, second, 10);
      const best = bruteForce(first, second, 10);
      expect(r.pairs.length, `trial ${trial}`).toBe(best.count);
      expect(total(r), `trial ${trial}`).toBeCloseTo(best.total, 9);
      expectPartition(r, m, n, 10);
    }
  });

  it('refuses a pairing distance that is not above 0 and positions that are not numbers', () => {
    expect(() => pairPoints([], [], 0)).toThrow(RangeError);
    expect(() => pairPoints([], [], Number.NaN)).toThrow(RangeError);
    expect(() => pairPoints([], [], Infinity)).toThrow(RangeError);
    expect(() => pairPoints([{ x: Number.NaN, y: 0 }], [], 5)).toThrow(/first\[0\]/);
  });
});

describe('pairingDistancePx', () => {
  it('defaults to 4 µm (about half a stallion sperm head’s length, from memory)', () => {
    expect(PAIRING_DISTANCE_UM_DEFAULT).toBe(4);
    // 4 µm at 0.25 µm/px = 16 px; at the demo's 0.3 µm/px = 13.33 px (computed)
    expect(pairingDistancePx(0.25)).toBe(16);
    expect(pairingDistancePx(0.3)).toBeCloseTo(13.333, 3);
    expect(pairingDistancePx(0.1, { distanceUm: 3 })).toBeCloseTo(30, 12);
  });

  it('an image without scale uses the pixel fallback', () => {
    expect(pairingDistancePx(null)).toBe(PAIRING_DISTANCE_PX_DEFAULT);
    expect(pairingDistancePx(undefined, { fallbackPx: 25 })).toBe(25);
    // the µm setting does not apply without a scale
    expect(pairingDistancePx(null, { distanceUm: 10, fallbackPx: 12 })).toBe(12);
  });

  it('refuses a scale or distance that is not above 0', () => {
    expect(() => pairingDistancePx(0)).toThrow(RangeError);
    expect(() => pairingDistancePx(-0.3)).toThrow(RangeError);
    expect(() => pairingDistancePx(0.3, { distanceUm: 0 })).toThrow(RangeError);
    expect(() => pairingDistancePx(null, { fallbackPx: Number.NaN })).toThrow(RangeError);
  });
});

describe('pairMarks', () => {
  const mark = (id: string, x: number, y: number, classKey = 'normal', countsAsSperm = true): PairingMark => ({ id, x, y, classKey, countsAsSperm });

  it('keeps non-sperm marks apart: a round cell never takes a sperm cell’s partner', () => {
    // A sperm mark and a round-cell mark of the first read both sit near the second read's sperm
    // mark; the round cell is nearer, but only sperm may pair with sperm.
    const first = [mark('a1', 10, 10), mark('a2', 14, 10, 'round_cell', false)];
    const second = [mark('b1', 15, 10), mark('b2', 60, 60, 'round_cell', false)];
    const r = pairMarks(first, second, 8);
    expect(r.pairs.map((p) => [p.first.id, p.second.id])).toEqual([['a1', 'b1']]);
    expect(r.onlyFirst.map((m) => m.id)).toEqual(['a2']);
    expect(r.onlySecond.map((m) => m.id)).toEqual(['b2']);
    // pooled, the same positions would pair a2–b1 (distance 1) and strand a1
    expect(pairPoints(first, second, 8).pairs).toEqual([{ first: 1, second: 0, distance: 1 }]);
  });

  it('pairs non-sperm marks among themselves, whatever their class', () => {
    const r = pairMarks([mark('a', 0, 0, 'round_cell', false)], [mark('b', 2, 0, 'leukocyte', false)], 5);
    expect(r.pairs).toEqual([{ first: r.pairs[0]!.first, second: r.pairs[0]!.second, distance: 2 }]);
    expect(r.pairs[0]!.first.classKey).toBe('round_cell');
    expect(r.pairs[0]!.second.classKey).toBe('leukocyte');
  });

  it('pairs marks of different classes (the disagreement is in the classes, not the pairing)', () => {
    const r = pairMarks([mark('a', 0, 0, 'normal')], [mark('b', 1, 1, 'detached_head')], 5);
    expect(r.pairs).toHaveLength(1);
  });

  it('gives the same pairs whatever order the marks arrive in, even in a tie', () => {
    const first = [mark('f-1', 0, 0), mark('f-2', 10, 10)];
    const second = [mark('s-1', 10, 0), mark('s-2', 0, 10)];
    const ids = (r: ReturnType<typeof pairMarks>) => r.pairs.map((p) => `${p.first.id}:${p.second.id}`).sort();
    const a = ids(pairMarks(first, second, 12));
    expect(ids(pairMarks([...first].reverse(), [...second].reverse(), 12))).toEqual(a);
    expect(ids(pairMarks([...first].reverse(), second, 12))).toEqual(a);
  });

  it('returns the marks themselves, in the order given', () => {
    type M = PairingMark & { readId: number };
    const first: M[] = [{ ...mark('z', 100, 0), readId: 1 }, { ...mark('y', 0, 0), readId: 1 }, { ...mark('x', 500, 0), readId: 1 }];
    const second: M[] = [{ ...mark('q', 1, 0), readId: 2 }, { ...mark('p', 101, 0), readId: 2 }, { ...mark('o', 900, 0), readId: 2 }];
    const r = pairMarks(first, second, 5);
    expect(r.pairs.map((p) => [p.first.id, p.second.id])).toEqual([['z', 'p'], ['y', 'q']]);
    expect(r.pairs[0]!.first).toBe(first[0]);
    expect(r.onlyFirst).toEqual([first[2]]);
    expect(r.onlySecond).toEqual([second[2]]);
  });
});
