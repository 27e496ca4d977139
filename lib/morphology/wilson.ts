/**
 * Wilson score interval for a binomial proportion (Newcombe 1998, method 3), used for % normal.
 * Proportions are returned as fractions 0–1, not %.
 */

/** Two-sided 95 % normal quantile. */
export const Z_95 = 1.959964;

export interface WilsonInterval {
  /** Lower bound, fraction 0–1. */
  lower: number;
  /** Upper bound, fraction 0–1. */
  upper: number;
  /** Observed proportion successes / n, fraction 0–1. */
  point: number;
}

/**
 * Wilson score interval. Returns null when n = 0: with no cells counted there is no
 * proportion to bound, and a [0, 1] interval would look like a result.
 * Throws RangeError for negative, fractional or inconsistent counts, or z ≤ 0.
 */
export function wilsonInterval(successes: number, n: number, z: number = Z_95): WilsonInterval | null {
  if (!Number.isInteger(n) || n < 0) throw new RangeError('n must be a whole number ≥ 0');
  if (!Number.isInteger(successes) || successes < 0 || successes > n) {
    throw new RangeError('successes must be a whole number between 0 and n');
  }
  if (!Number.isFinite(z) || z <= 0) throw new RangeError('z must be a positive number');
  if (n === 0) return null;

  const p = successes / n;
  const z2 = z * z;
  const centre = 2 * n * p + z2;
  const spread = z * Math.sqrt(z2 + 4 * n * p * (1 - p));
  const denominator = 2 * (n + z2);
  // At p = 0 or 1 the formula gives the bound 0 or 1 only up to rounding; pin it exactly.
  const lower = successes === 0 ? 0 : Math.max(0, (centre - spread) / denominator);
  const upper = successes === n ? 1 : Math.min(1, (centre + spread) / denominator);
  return { lower, upper, point: p };
}
