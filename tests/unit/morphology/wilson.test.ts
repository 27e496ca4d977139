import { describe, expect, it } from 'vitest';
import { Z_95, wilsonInterval } from '@/lib/morphology/wilson';

describe('wilsonInterval', () => {
  it('81/263 → 0.2553–0.3662', () => {
    // Newcombe 1998, Stat Med 17:857–872, method 3 (Wilson score); check value in docs/references.md
    const r = wilsonInterval(81, 263)!;
    expect(r.lower).toBeCloseTo(0.2553, 4);
    expect(r.upper).toBeCloseTo(0.3662, 4);
    expect(r.point).toBeCloseTo(81 / 263, 12);
  });

  it('0/20 → 0.0000–0.1611', () => {
    // Newcombe 1998, Stat Med 17:857–872, method 3; check value in docs/references.md
    const r = wilsonInterval(0, 20)!;
    expect(r.lower).toBe(0);
    expect(r.upper).toBeCloseTo(0.1611, 4);
    expect(r.point).toBe(0);
  });

  it('20/20 mirrors 0/20', () => {
    // symmetry of the Wilson interval: 1 − 0.1611 = 0.8389 (computed from Newcombe 1998, method 3)
    const r = wilsonInterval(20, 20)!;
    expect(r.upper).toBe(1);
    expect(r.lower).toBeCloseTo(0.8389, 4);
  });

  it('150/200 → 0.6857–0.8049', () => {
    // computed with the Wilson formula of Newcombe 1998, method 3
    const r = wilsonInterval(150, 200)!;
    expect(r.lower).toBeCloseTo(0.6857, 4);
    expect(r.upper).toBeCloseTo(0.8049, 4);
  });

  it('uses z = 1.959964 by default and narrows with a smaller z', () => {
    expect(Z_95).toBe(1.959964);
    const wide = wilsonInterval(81, 263)!;
    const narrow = wilsonInterval(81, 263, 1.644854)!;
    expect(narrow.lower).toBeGreaterThan(wide.lower);
    expect(narrow.upper).toBeLessThan(wide.upper);
  });

  it('returns null when nothing was counted', () => {
    expect(wilsonInterval(0, 0)).toBeNull();
  });

  it('refuses impossible counts', () => {
    expect(() => wilsonInterval(5, 4)).toThrow(RangeError);
    expect(() => wilsonInterval(-1, 4)).toThrow(RangeError);
    expect(() => wilsonInterval(1.5, 4)).toThrow(RangeError);
    expect(() => wilsonInterval(1, -4)).toThrow(RangeError);
    expect(() => wilsonInterval(1, 4, 0)).toThrow(RangeError);
  });
});
