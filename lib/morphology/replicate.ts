/**
 * Do two readers' percentages for the same class differ by more than chance allows?
 *
 * We use the formula, not the WHO manual's printed table: two counts of N cells each
 * differ acceptably when |p1 − p2| ≤ 1.96 × √(2 × p(100 − p) / N), p their mean in %
 * (the normal approximation behind the table of acceptable differences for replicate
 * counts, WHO laboratory manual for the examination and processing of human semen,
 * 5th ed. 2010, section 2.11). The table rounds, so near its band edges the two can
 * disagree by a fraction of a point.
 */

export interface ReplicateDifference {
  /** Mean of the two percentages, %. */
  mean: number;
  /** |p1 − p2|, percentage points. */
  difference: number;
  /** Largest acceptable difference, percentage points. */
  limit: number;
  /** True when the difference exceeds the limit. */
  differ: boolean;
}

/**
 * `n` is the cells each reader counted; with two different counts pass [n1, n2] and the
 * variance becomes p(100 − p)(1/n1 + 1/n2), which equals the formula above when n1 = n2.
 */
export function acceptableDifference(
  p1Pct: number,
  p2Pct: number,
  n: number | readonly [number, number],
  z: number = 1.96,
): ReplicateDifference {
  for (const [name, v] of [['p1Pct', p1Pct], ['p2Pct', p2Pct]] as const) {
    if (!Number.isFinite(v) || v < 0 || v > 100) throw new RangeError(`${name} must be between 0 and 100 %`);
  }
  const [n1, n2] = typeof n === 'number' ? [n, n] : n;
  for (const v of [n1, n2]) {
    if (!Number.isFinite(v) || v <= 0) throw new RangeError('cells counted must be greater than zero');
  }
  if (!Number.isFinite(z) || z <= 0) throw new RangeError('z must be a positive number');

  const mean = (p1Pct + p2Pct) / 2;
  const difference = Math.abs(p1Pct - p2Pct);
  const limit = z * Math.sqrt(mean * (100 - mean) * (1 / n1 + 1 / n2));
  return { mean, difference, limit, differ: difference > limit };
}
