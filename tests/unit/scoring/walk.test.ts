import { describe, expect, it } from 'vitest';
import { DEFAULT_CLASS_SET } from '@/lib/class-sets/default-set';
import { commandForKey, KEY_TABLE, type KeyPress } from '@/lib/scoring/keys';
import type { Point } from '@/lib/scoring/types';
import { candidateStates, headLengthPx, nextStop, openCounts, readingOrder, walkScale, type WalkImage } from '@/lib/scoring/walk';

const BAND = 24;
const DIST = 16;

describe('reading order', () => {
  it('goes row by row from the top, each row left to right, rows a head length high', () => {
    // Two heads side by side at slightly different heights share a row, even across a multiple of the band.
    const pts: Point[] = [
      { x: 300, y: 30 },
      { x: 100, y: 23 },
      { x: 200, y: 25 },
      { x: 50, y: 200 },
      { x: 400, y: 10 },
      { x: 10, y: 60 },
    ];
    // The first row starts at y = 10 and takes every point with y < 34, left to right.
    expect(readingOrder(pts, BAND).map((i) => pts[i])).toEqual([
      { x: 100, y: 23 },
      { x: 200, y: 25 },
      { x: 300, y: 30 },
      { x: 400, y: 10 },
      { x: 10, y: 60 },
      { x: 50, y: 200 },
    ]);
  });

  it('keeps the input order on ties and handles no points', () => {
    const pts = [{ x: 5, y: 5 }, { x: 5, y: 5 }];
    expect(readingOrder(pts, BAND)).toEqual([0, 1]);
    expect(readingOrder([], BAND)).toEqual([]);
    expect(() => readingOrder(pts, 0)).toThrow(RangeError);
  });

  it('makes rows one head length high: 6 µm, from memory, or 24 px without a scale', () => {
    expect(headLengthPx(0.25)).toBe(24);
    expect(headLengthPx(0.3)).toBeCloseTo(20, 10);
    expect(headLengthPx(null)).toBe(24);
  });
});

describe('candidate states', () => {
  const cands: Point[] = [{ x: 100, y: 100 }, { x: 110, y: 100 }, { x: 300, y: 300 }];

  it('counts a candidate as classified by a mark or a skip of the read within the pairing distance', () => {
    expect(candidateStates(cands, [], [], DIST)).toEqual(['open', 'open', 'open']);
    expect(candidateStates(cands, [{ x: 305, y: 300 }], [], DIST)).toEqual(['open', 'open', 'marked']);
    expect(candidateStates(cands, [], [{ x: 300, y: 290 }], DIST)).toEqual(['open', 'open', 'skipped']);
    // Beyond the pairing distance a mark classifies nothing.
    expect(candidateStates(cands, [{ x: 300, y: 317 }], [], DIST)).toEqual(['open', 'open', 'open']);
  });

  it('pairs one to one: a mark on a candidate classifies that one, not its near neighbour', () => {
    // The mark sits exactly on the second candidate; the first is within reach too but stays open.
    expect(candidateStates(cands, [{ x: 110, y: 100 }], [], DIST)).toEqual(['open', 'marked', 'open']);
    expect(candidateStates(cands, [{ x: 110, y: 100 }, { x: 101, y: 100 }], [], DIST)).toEqual(['marked', 'marked', 'open']);
  });
});

/** A reader driving the walk through the pure functions, as the workbench does. */
function session(images: Point[][], marks: Point[][] = images.map(() => []), skips: Point[][] = images.map(() => [])) {
  const order = images.map((pts) => readingOrder(pts, BAND).map((i) => pts[i]!));
  const done: { image: number; kind: 'mark' | 'skip'; p: Point }[] = [];
  let imageIndex = 0;
  const walkImages = (): WalkImage[] => order.map((points, i) => ({ points, states: candidateStates(points, marks[i]!, skips[i]!, DIST) }));
  const stop = () => {
    const s = nextStop(walkImages(), imageIndex);
    if (s) imageIndex = s.imageIndex;
    return s;
  };
  return {
    stop,
    get imageIndex() {
      return imageIndex;
    },
    classify() {
      const s = stop()!;
      marks[s.imageIndex]!.push({ ...s.point });
      done.push({ image: s.imageIndex, kind: 'mark', p: s.point });
    },
    skip() {
      const s = stop()!;
      skips[s.imageIndex]!.push({ ...s.point });
      done.push({ image: s.imageIndex, kind: 'skip', p: s.point });
    },
    undo() {
      const last = done.pop()!;
      (last.kind === 'mark' ? marks : skips)[last.image]!.pop();
      imageIndex = last.image;
    },
    goTo(i: number) {
      imageIndex = i;
    },
    open: () => openCounts(walkImages()),
  };
}

describe('the walk', () => {
  const img0 = [{ x: 500, y: 40 }, { x: 100, y: 45 }, { x: 300, y: 400 }];
  const img1 = [{ x: 50, y: 50 }, { x: 900, y: 60 }];

  it('stops at each open candidate in reading order, moving on after a class key or a skip', () => {
    const w = session([img0, img1]);
    expect(w.stop()).toEqual({ imageIndex: 0, index: 0, point: { x: 100, y: 45 } });
    w.classify();
    expect(w.stop()!.point).toEqual({ x: 500, y: 40 });
    w.skip();
    expect(w.stop()!.point).toEqual({ x: 300, y: 400 });
    expect(w.open()).toEqual({ perImage: [1, 2], total: 3 });
  });

  it('goes on to the next image’s first candidate at the end of an image, and ends when none is left', () => {
    const w = session([img0, img1]);
    w.classify();
    w.classify();
    w.classify();
    expect(w.stop()).toEqual({ imageIndex: 1, index: 0, point: { x: 50, y: 50 } });
    w.classify();
    w.skip();
    expect(w.stop()).toBeNull();
    expect(w.open().total).toBe(0);
  });

  it('undo returns to the candidate it opened again, on its own image', () => {
    const w = session([img0, img1]);
    w.classify();
    w.classify();
    w.skip(); // last of image 0
    expect(w.stop()!.imageIndex).toBe(1);
    w.undo();
    expect(w.stop()).toEqual({ imageIndex: 0, index: 2, point: { x: 300, y: 400 } });
    w.undo();
    expect(w.stop()!.point).toEqual({ x: 500, y: 40 });
  });

  it('passes over candidates already classified (a mark clicked before, a skip of earlier work)', () => {
    const w = session([img0, img1], [[{ x: 103, y: 44 }], []], [[], [{ x: 50, y: 52 }]]);
    expect(w.stop()!.point).toEqual({ x: 500, y: 40 });
    w.classify();
    w.classify();
    expect(w.stop()).toEqual({ imageIndex: 1, index: 1, point: { x: 900, y: 60 } });
  });

  it('starts from the image in view and wraps round to earlier images', () => {
    const w = session([img0, img1]);
    w.goTo(1);
    w.classify();
    w.classify();
    expect(w.stop()).toEqual({ imageIndex: 0, index: 0, point: { x: 100, y: 45 } });
  });

  it('passes over images whose search found nothing or is not done', () => {
    const w = session([[], img1]);
    expect(w.stop()!.imageIndex).toBe(1);
    expect(nextStop([], 0)).toBeNull();
  });

  it('zooms so that about 24 head lengths span the view’s short side', () => {
    expect(walkScale(1200, 576, 24)).toBeCloseTo(1, 10);
  });
});

describe('walk keys', () => {
  const press = (key: string): KeyPress => ({ key, ctrlKey: false, metaKey: false, shiftKey: false, altKey: false, repeat: false });
  const base = { classSet: DEFAULT_CLASS_SET, hasSelection: false, canEdit: true, onControl: false, canvasFocused: false };

  it('w starts the walk; in it a class key classifies the candidate and x skips it', () => {
    expect(commandForKey(press('w'), base)!.command).toEqual({ type: 'toggle-walk' });
    expect(commandForKey(press('2'), { ...base, walking: true })!.command).toEqual({ type: 'walk-classify', classKey: 'abnormal_head' });
    expect(commandForKey(press('r'), { ...base, walking: true })!.command).toEqual({ type: 'walk-classify', classKey: 'round_cell' });
    expect(commandForKey(press('x'), { ...base, walking: true })!.command).toEqual({ type: 'walk-skip' });
    // Outside the walk, x does nothing and a class key chooses the class as before.
    expect(commandForKey(press('x'), base)).toBeNull();
    expect(commandForKey(press('2'), base)!.command).toEqual({ type: 'choose-class', classKey: 'abnormal_head' });
    // A selected mark still takes the class key; a locked read never classifies.
    expect(commandForKey(press('2'), { ...base, walking: true, hasSelection: true })!.command).toEqual({ type: 'reclassify-selected', classKey: 'abnormal_head' });
    expect(commandForKey(press('2'), { ...base, walking: true, canEdit: false })!.command).toEqual({ type: 'choose-class', classKey: 'abnormal_head' });
  });

  it('lists every letter command once in the help table', () => {
    const keys = KEY_TABLE.flatMap((k) => k.keys);
    expect(new Set(keys).size).toBe(keys.length);
    expect(KEY_TABLE.map((k) => k.label)).toEqual(expect.arrayContaining(['w', 'x', 'f', 'h', 't', '[', ']']));
  });
});
