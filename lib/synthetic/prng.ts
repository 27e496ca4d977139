// Written by us rather than taken from a package: the mulberry32 algorithm, a tiny
// public-domain 32-bit generator. Plenty for drawing test fields, and the same seed
// gives the same numbers on every platform (integer arithmetic only).
export type Random = () => number;

/** Uniform numbers in [0, 1) from a 32-bit seed. */
export function mulberry32(seed: number): Random {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Uniform in [min, max). */
export const between = (rnd: Random, min: number, max: number) => min + (max - min) * rnd();

/** Approximately normal (sum of three uniforms), mean 0 and standard deviation ~1. */
export const gaussish = (rnd: Random) => (rnd() + rnd() + rnd() - 1.5) * 2;

/** Picks a key with probability proportional to its weight. */
export function pickWeighted<K extends string>(rnd: Random, weights: ReadonlyArray<readonly [K, number]>): K {
  const total = weights.reduce((s, [, w]) => s + w, 0);
  let r = rnd() * total;
  for (const [k, w] of weights) {
    r -= w;
    if (r < 0) return k;
  }
  return weights[weights.length - 1][0];
}
