import { describe, expect, it } from 'vitest';
import {
  clampScale,
  fitToScreen,
  hitTest,
  imageToScreen,
  isInsideImage,
  KEYBOARD_PAN_STEP,
  niceFloor,
  pan,
  panByKey,
  scaleBar,
  screenToImage,
  wheelZoomFactor,
  zoomAt,
  ZOOM_LIMITS,
  type Viewport,
} from '@/lib/scoring/viewport';

describe('fitToScreen', () => {
  it('fits the limiting side and centres the image (computed: min(960/2000, 760/1500) = 0.48)', () => {
    const vp = fitToScreen(2000, 1500, 1000, 800, 20);
    expect(vp.scale).toBeCloseTo(0.48, 12);
    expect(vp.x).toBeCloseTo(20, 9); // (1000 − 960) / 2
    expect(vp.y).toBeCloseTo(40, 9); // (800 − 720) / 2
    const centre = imageToScreen(vp, { x: 1000, y: 750 });
    expect(centre.x).toBeCloseTo(500, 9);
    expect(centre.y).toBeCloseTo(400, 9);
  });

  it('fits a tall image by its height (computed: 600/1200 = 0.5)', () => {
    const vp = fitToScreen(400, 1200, 1000, 600);
    expect(vp.scale).toBeCloseTo(0.5, 12);
    expect(vp.x).toBeCloseTo(400, 9); // (1000 − 200) / 2
    expect(vp.y).toBeCloseTo(0, 9);
  });

  it('clamps to the zoom limits for tiny and huge images', () => {
    expect(fitToScreen(2, 2, 1000, 1000).scale).toBe(ZOOM_LIMITS.max);
    expect(fitToScreen(1e6, 1e6, 1000, 1000).scale).toBe(ZOOM_LIMITS.min);
  });
});

describe('screen ↔ image', () => {
  it('round-trips a point', () => {
    const vp: Viewport = { scale: 2.5, x: -130, y: 47 };
    const p = { x: 321.5, y: 77.25 };
    const back = screenToImage(vp, imageToScreen(vp, p));
    expect(back.x).toBeCloseTo(p.x, 9);
    expect(back.y).toBeCloseTo(p.y, 9);
    // computed: 321.5 × 2.5 − 130 = 673.75
    expect(imageToScreen(vp, p).x).toBeCloseTo(673.75, 9);
  });
});

describe('zoomAt', () => {
  it('doubles the scale about the pointer (computed: x = 200 − 200 × 2)', () => {
    const vp = zoomAt({ scale: 1, x: 0, y: 0 }, { x: 200, y: 100 }, 2);
    expect(vp).toEqual({ scale: 2, x: -200, y: -100 });
  });

  it('keeps the image point under the pointer fixed, also when clamped', () => {
    const start: Viewport = { scale: 0.7, x: 35, y: -12 };
    for (const [factor, px, py] of [
      [1.25, 10, 10],
      [0.8, 640, 360],
      [1000, 300, 200],
      [1e-6, 5, 700],
    ] as const) {
      const pointer = { x: px, y: py };
      const before = screenToImage(start, pointer);
      const vp = zoomAt(start, pointer, factor);
      const after = screenToImage(vp, pointer);
      expect(after.x).toBeCloseTo(before.x, 9);
      expect(after.y).toBeCloseTo(before.y, 9);
      expect(vp.scale).toBeGreaterThanOrEqual(ZOOM_LIMITS.min);
      expect(vp.scale).toBeLessThanOrEqual(ZOOM_LIMITS.max);
    }
  });

  it('clamps to 0.05–20 and to custom limits, and ignores a bad factor', () => {
    expect(zoomAt({ scale: 10, x: 0, y: 0 }, { x: 0, y: 0 }, 5).scale).toBe(20);
    expect(zoomAt({ scale: 0.1, x: 0, y: 0 }, { x: 0, y: 0 }, 0.1).scale).toBe(0.05);
    expect(zoomAt({ scale: 1, x: 0, y: 0 }, { x: 0, y: 0 }, 8, { min: 0.5, max: 4 }).scale).toBe(4);
    const vp = { scale: 1, x: 3, y: 4 };
    expect(zoomAt(vp, { x: 0, y: 0 }, 0)).toBe(vp);
    expect(clampScale(100)).toBe(20);
  });

  it('turns one wheel notch into one zoom step (computed: 1.25^(∓1))', () => {
    expect(wheelZoomFactor(-100)).toBeCloseTo(1.25, 12);
    expect(wheelZoomFactor(100)).toBeCloseTo(0.8, 12);
    expect(wheelZoomFactor(0)).toBe(1);
  });
});

describe('pan', () => {
  it('moves the stage by screen pixels', () => {
    expect(pan({ scale: 3, x: 10, y: 20 }, -5, 7)).toEqual({ scale: 3, x: 5, y: 27 });
  });

  it('moves the view with the arrow keys and ignores other keys', () => {
    const vp = { scale: 1, x: 0, y: 0 };
    expect(panByKey(vp, 'ArrowRight')).toEqual({ scale: 1, x: -KEYBOARD_PAN_STEP, y: 0 });
    expect(panByKey(vp, 'ArrowUp')).toEqual({ scale: 1, x: 0, y: KEYBOARD_PAN_STEP });
    expect(panByKey(vp, 'ArrowLeft', true)).toEqual({ scale: 1, x: KEYBOARD_PAN_STEP * 4, y: 0 });
    expect(panByKey(vp, 'ArrowDown', false, 10)).toEqual({ scale: 1, x: 0, y: -10 });
    expect(panByKey(vp, '5')).toBeNull();
  });
});

describe('scale bar', () => {
  it('0.25 µm/px at scale 1, 120 px target → 20 µm over 80 px (computed: 120 × 0.25 = 30 µm, floored to 20)', () => {
    expect(scaleBar(0.25, 1, 120)).toEqual({ microns: 20, px: 80 });
    expect(scaleBar(0.25, 1)).toEqual({ microns: 20, px: 80 });
  });

  it('follows the zoom (computed: 120 × 0.25 / 4 = 7.5 → 5 µm = 80 px)', () => {
    const bar = scaleBar(0.25, 4);
    expect(bar.microns).toBe(5);
    expect(bar.px).toBeCloseTo(80, 9);
  });

  it('other calibrations (computed from microns = niceFloor(target × µm/px ÷ scale))', () => {
    // 120 × 0.1 / 0.5 = 24 → 20 µm; 20 / 0.2 = 100 px
    expect(scaleBar(0.1, 0.5).microns).toBe(20);
    expect(scaleBar(0.1, 0.5).px).toBeCloseTo(100, 9);
    // 120 × 0.08 / 2 = 4.8 → 2 µm; 2 / 0.04 = 50 px
    expect(scaleBar(0.08, 2).microns).toBe(2);
    expect(scaleBar(0.08, 2).px).toBeCloseTo(50, 9);
    // exact nice value is kept: 100 × 1 / 1 = 100 µm
    expect(scaleBar(1, 1, 100)).toEqual({ microns: 100, px: 100 });
    // 120 × 0.05 / 20 = 0.3 → 0.2 µm at 80 px
    expect(scaleBar(0.05, 20).microns).toBe(0.2);
    expect(scaleBar(0.05, 20).px).toBeCloseTo(80, 9);
  });

  it('never exceeds the target width and is at least 40 % of it (computed: worst case 4.99…→2 is > 0.4)', () => {
    for (const mpp of [0.013, 0.07, 0.19, 0.33, 0.5, 1.7]) {
      for (const s of [0.05, 0.3, 1, 2.2, 7, 20]) {
        const { px } = scaleBar(mpp, s);
        expect(px).toBeLessThanOrEqual(120 + 1e-9);
        expect(px).toBeGreaterThan(120 * 0.4);
      }
    }
  });

  it('niceFloor picks 1, 2 or 5 × 10^n (computed)', () => {
    expect(niceFloor(30)).toBe(20);
    expect(niceFloor(0.1 + 0.2)).toBe(0.2);
    expect(niceFloor(1000)).toBe(1000);
    expect(niceFloor(0.001)).toBe(0.001);
    expect(niceFloor(9.99)).toBe(5);
    expect(niceFloor(0.00073)).toBe(0.0005);
    expect(niceFloor(1.999)).toBe(1);
    expect(() => niceFloor(0)).toThrow(RangeError);
    expect(() => scaleBar(0, 1)).toThrow(RangeError);
  });
});

describe('hitTest', () => {
  const marks = [
    { id: 'a', x: 10, y: 10 },
    { id: 'b', x: 14, y: 10 },
    { id: 'c', x: 30, y: 30 },
  ];

  it('returns the nearest mark within the radius', () => {
    expect(hitTest(marks, { x: 11, y: 10 }, 5)?.id).toBe('a');
    expect(hitTest(marks, { x: 13.5, y: 11 }, 5)?.id).toBe('b');
  });

  it('prefers the later (top-most) mark on a tie', () => {
    expect(hitTest(marks, { x: 12, y: 10 }, 5)?.id).toBe('b');
  });

  it('counts the radius as inside and returns null when nothing is near', () => {
    expect(hitTest(marks, { x: 30, y: 35 }, 5)?.id).toBe('c');
    expect(hitTest(marks, { x: 30, y: 35.01 }, 5)).toBeNull();
    expect(hitTest([], { x: 0, y: 0 }, 5)).toBeNull();
  });
});

describe('isInsideImage', () => {
  it('includes edges and excludes outside points', () => {
    expect(isInsideImage(0, 0, 100, 50)).toBe(true);
    expect(isInsideImage(100, 50, 100, 50)).toBe(true);
    expect(isInsideImage(-0.1, 10, 100, 50)).toBe(false);
    expect(isInsideImage(10, 50.1, 100, 50)).toBe(false);
  });
});
