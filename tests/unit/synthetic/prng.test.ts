import { describe, expect, it } from 'vitest';
import { between, mulberry32, pickWeighted } from '@/lib/synthetic/prng';

// The one test of the demo data's and synthetic images' random numbers (lib/synthetic/prng.ts).
describe('mulberry32', () => {
  it('is deterministic, depends on the seed and stays in [0, 1)', () => {
    const a = mulberry32(42);
    const b = mulberry32(42);
    const xs = Array.from({ length: 1000 }, () => a());
    expect(Array.from({ length: 1000 }, () => b())).toEqual(xs);
    expect(xs.every((x) => x >= 0 && x < 1)).toBe(true);
    expect(mulberry32(43)()).not.toBe(mulberry32(42)());
    // A seed is taken as an unsigned 32-bit integer: -1 and 2^32 − 1 are the same seed.
    expect(mulberry32(-1)()).toBe(mulberry32(0xffffffff)());
  });

  it('is close to uniform', () => {
    const rnd = mulberry32(7);
    const n = 10_000;
    const bins = new Array(10).fill(0);
    let sum = 0;
    for (let i = 0; i < n; i++) {
      const x = rnd();
      sum += x;
      bins[Math.floor(x * 10)]++;
    }
    // Mean of n uniforms: 0.5 ± 3 × 0.2887/√n ≈ ±0.0087 (computed: sd of U(0,1) = 1/√12).
    expect(Math.abs(sum / n - 0.5)).toBeLessThan(0.0087);
    // χ² over 10 equal bins, 9 degrees of freedom: below 27.88 at p = 0.001 (χ² table, common practice).
    const expected = n / 10;
    const chi2 = bins.reduce((s, o) => s + (o - expected) ** 2 / expected, 0);
    expect(chi2).toBeLessThan(27.88);
  });
});

describe('between and pickWeighted', () => {
  it('scale into a range and pick in proportion to the weights', () => {
    const rnd = mulberry32(3);
    const xs = Array.from({ length: 2000 }, () => between(rnd, 5, 7));
    expect(Math.min(...xs)).toBeGreaterThanOrEqual(5);
    expect(Math.max(...xs)).toBeLessThan(7);
    const picks = { a: 0, b: 0, c: 0 };
    for (let i = 0; i < 9000; i++) picks[pickWeighted(rnd, [['a', 1], ['b', 2], ['c', 0]] as const)]++;
    expect(picks.c).toBe(0);
    // b is chosen 2/3 of the time: 6000 ± 3 × √(9000 × 2/3 × 1/3) ≈ ±134 (binomial, computed).
    expect(Math.abs(picks.b - 6000)).toBeLessThan(134);
  });
});
