import { describe, expect, it } from 'vitest';
import { acceptableDifference } from '@/lib/morphology/replicate';

describe('acceptableDifference', () => {
  it('p = 50 %, N = 200 → limit 9.8 points', () => {
    // computed from 1.96 × √(2 × p(100 − p) / N), the normal approximation behind the table in
    // WHO laboratory manual 5th ed. 2010, section 2.11 (the printed table says 10, from memory)
    const r = acceptableDifference(45, 55, 200);
    expect(r.mean).toBe(50);
    expect(r.limit).toBeCloseTo(9.8, 9);
    expect(r.difference).toBe(10);
    expect(r.differ).toBe(true);
  });

  it('accepts a difference within the limit', () => {
    // 46 vs 54: difference 8 < 9.8 (computed, same formula)
    expect(acceptableDifference(46, 54, 200).differ).toBe(false);
  });

  it('the limit shrinks towards 0 % or 100 %', () => {
    // p = 10 %, N = 200: 1.96 × √(2 × 10 × 90 / 200) = 1.96 × 3 = 5.88 (computed, same formula)
    const r = acceptableDifference(8, 12, 200);
    expect(r.limit).toBeCloseTo(5.88, 9);
    expect(r.differ).toBe(false);
    expect(acceptableDifference(4, 16, 200).differ).toBe(true);
  });

  it('both readers at 0 % or 100 % agree', () => {
    expect(acceptableDifference(0, 0, 200)).toMatchObject({ limit: 0, differ: false });
    expect(acceptableDifference(100, 100, 100)).toMatchObject({ limit: 0, differ: false });
  });

  it('accepts two different cell counts and matches the equal-N formula when they are equal', () => {
    const equal = acceptableDifference(40, 50, [200, 200]);
    expect(equal.limit).toBeCloseTo(acceptableDifference(40, 50, 200).limit, 12);
    // p = 50, N1 = 100, N2 = 300: 1.96 × √(2500 × (1/100 + 1/300)) = 1.96 × √33.33 = 11.316 (computed)
    expect(acceptableDifference(45, 55, [100, 300]).limit).toBeCloseTo(11.316, 3);
  });

  it('refuses impossible input', () => {
    expect(() => acceptableDifference(-1, 50, 200)).toThrow(RangeError);
    expect(() => acceptableDifference(50, 101, 200)).toThrow(RangeError);
    expect(() => acceptableDifference(50, 50, 0)).toThrow(RangeError);
    expect(() => acceptableDifference(50, 50, [200, 0])).toThrow(RangeError);
  });
});
