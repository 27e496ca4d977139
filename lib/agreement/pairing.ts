/**
 * Pairing two readers' marks on one field image, cell by cell.
 *
 * Each mark of the first read is paired with at most one mark of the second read (and the
 * reverse) by an optimal assignment (the Hungarian method, from the `munkres` package), within
 * a maximum pairing distance. The assignment is chosen so that, in this order:
 *   1. as many marks as possible are paired within the pairing distance, then
 *   2. the summed distance of those pairs is as small as possible.
 * A greedy "closest pair first" rule fails (1): with first-read marks at x = 0 and x = −8 and
 * second-read marks at x = 1 and x = 9 (pairing distance 10), taking the closest pair 0–1 leaves
 * −8 and 9 apart, while 0–9 and −8–1 pair all four.
 *
 * How (1) comes before (2): munkres always assigns min(M, N) cells. An out-of-range cell costs
 * BIG = (min(M, N) + 1) × maxDistance, more than any sum of in-range distances (each ≤
 * maxDistance, at most min(M, N) of them), so trading one out-of-range cell for an in-range one
 * always lowers the total, and among assignments with the same number of in-range pairs the
 * total is the in-range distance sum plus a constant. Out-of-range cells are dropped after.
 *
 * A distance exactly equal to the pairing distance pairs. Marks that cannot reach any mark of
 * the other read are left out of the matrix before the assignment (they can pair with nothing).
 */
import munkres from 'munkres';

export interface Point {
  x: number;
  y: number;
}

/** A pair of indices into the two point lists, with their distance in pixels. */
export interface PointPair {
  first: number;
  second: number;
  distance: number;
}

export interface PointPairing {
  /** Ascending by `first`. */
  pairs: PointPair[];
  /** Indices of first-list points left unpaired, ascending. */
  onlyFirst: number[];
  /** Indices of second-list points left unpaired, ascending. */
  onlySecond: number[];
}

/**
 * Default pairing distance, µm: about half the length of a stallion sperm head (from memory).
 * Two readers' marks on one cell land within it; two different cells' heads rarely do.
 */
export const PAIRING_DISTANCE_UM_DEFAULT = 4;

/**
 * Pairing distance in pixels for an image with no scale (Fieldmark default: the 4 µm above at
 * 0.25 µm per pixel, the scale of Fieldmark's synthetic field images).
 */
export const PAIRING_DISTANCE_PX_DEFAULT = 16;

export interface PairingDistanceSettings {
  /** The lab's pairing distance, µm (default 4). */
  distanceUm?: number;
  /** The distance in pixels for an image with no scale (default 16). */
  fallbackPx?: number;
}

/**
 * The pairing distance in pixels for one image: the lab's distance in µm divided by the image's
 * scale (µm per pixel), or the pixel fallback when the image has no scale (null).
 */
export function pairingDistancePx(micronsPerPixel: number | null | undefined, settings: PairingDistanceSettings = {}): number {
  const { distanceUm = PAIRING_DISTANCE_UM_DEFAULT, fallbackPx = PAIRING_DISTANCE_PX_DEFAULT } = settings;
  if (!Number.isFinite(distanceUm) || distanceUm <= 0) throw new RangeError('the pairing distance must be above 0 µm');
  if (!Number.isFinite(fallbackPx) || fallbackPx <= 0) throw new RangeError('the pixel pairing distance must be above 0');
  if (micronsPerPixel === null || micronsPerPixel === undefined) return fallbackPx;
  if (!Number.isFinite(micronsPerPixel) || micronsPerPixel <= 0) throw new RangeError('the image scale must be above 0 µm per pixel');
  return distanceUm / micronsPerPixel;
}

function checkPoints(name: string, points: readonly Point[]): void {
  points.forEach((p, i) => {
    if (!Number.isFinite(p.x) || !Number.isFinite(p.y)) throw new RangeError(`${name}[${i}] has no finite position`);
  });
}

const range = (n: number) => Array.from({ length: n }, (_, i) => i);

/** Pair two lists of points one to one within `maxDistancePx` (see the module comment for the rule). */
export function pairPoints(first: readonly Point[], second: readonly Point[], maxDistancePx: number): PointPairing {
  if (!Number.isFinite(maxDistancePx) || maxDistancePx <= 0) throw new RangeError('the pairing distance must be a number above 0 pixels');
  checkPoints('first', first);
  checkPoints('second', second);

  const max2 = maxDistancePx * maxDistancePx;
  const d2 = (a: Point, b: Point) => (a.x - b.x) ** 2 + (a.y - b.y) ** 2;

  // Only marks with at least one partner in reach enter the assignment.
  const reachesSecond = new Uint8Array(second.length);
  const rows: number[] = [];
  for (let i = 0; i < first.length; i++) {
    let reaches = false;
    for (let j = 0; j < second.length; j++) {
      if (d2(first[i]!, second[j]!) <= max2) {
        reaches = true;
        reachesSecond[j] = 1;
      }
    }
    if (reaches) rows.push(i);
  }
  const cols = range(second.length).filter((j) => reachesSecond[j] === 1);

  const pairs: PointPair[] = [];
  if (rows.length > 0) {
    const big = (Math.min(rows.length, cols.length) + 1) * maxDistancePx;
    const matrix = rows.map((i) => {
      const row = new Float64Array(cols.length);
      for (let c = 0; c < cols.length; c++) {
        const dd = d2(first[i]!, second[cols[c]!]!);
        row[c] = dd <= max2 ? Math.sqrt(dd) : big;
      }
      return row;
    });
    for (const [r, c] of munkres(matrix)) {
      const i = rows[r]!;
      const j = cols[c]!;
      const dd = d2(first[i]!, second[j]!);
      if (dd <= max2) pairs.push({ first: i, second: j, distance: Math.sqrt(dd) });
    }
    pairs.sort((a, b) => a.first - b.first);
  }

  const pairedFirst = new Uint8Array(first.length);
  const pairedSecond = new Uint8Array(second.length);
  for (const p of pairs) {
    pairedFirst[p.first] = 1;
    pairedSecond[p.second] = 1;
  }
  return {
    pairs,
    onlyFirst: range(first.length).filter((i) => pairedFirst[i] === 0),
    onlySecond: range(second.length).filter((j) => pairedSecond[j] === 0),
  };
}

/** What pairing needs of a mark. */
export interface PairingMark extends Point {
  id: string;
  classKey: string;
  /** Non-sperm marks (round cells, leukocytes) pair only with non-sperm marks. */
  countsAsSperm: boolean;
}

export interface MarkPair<M extends PairingMark = PairingMark> {
  first: M;
  second: M;
  /** Pixels. */
  distance: number;
}

export interface MarkPairing<M extends PairingMark = PairingMark> {
  /** In the order of the first read's marks as given. */
  pairs: MarkPair<M>[];
  /** First-read marks with no partner, in the order given. */
  onlyFirst: M[];
  /** Second-read marks with no partner, in the order given. */
  onlySecond: M[];
}

/**
 * Pair two reads' marks on ONE image. Sperm and non-sperm marks are paired in two separate
 * assignments, so a round cell never takes a sperm cell's partner. Within each, marks are taken
 * in order of id, so the same marks always give the same pairs (even where two assignments tie)
 * whatever order a query returns them in.
 */
export function pairMarks<M extends PairingMark>(first: readonly M[], second: readonly M[], maxDistancePx: number): MarkPairing<M> {
  const firstIndex = new Map<M, number>(first.map((m, i) => [m, i]));
  const secondIndex = new Map<M, number>(second.map((m, i) => [m, i]));
  const byId = (a: M, b: M) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);

  const pairs: MarkPair<M>[] = [];
  const onlyFirst: M[] = [];
  const onlySecond: M[] = [];
  for (const sperm of [true, false]) {
    const a = first.filter((m) => m.countsAsSperm === sperm).sort(byId);
    const b = second.filter((m) => m.countsAsSperm === sperm).sort(byId);
    const r = pairPoints(a, b, maxDistancePx);
    for (const p of r.pairs) pairs.push({ first: a[p.first]!, second: b[p.second]!, distance: p.distance });
    for (const i of r.onlyFirst) onlyFirst.push(a[i]!);
    for (const j of r.onlySecond) onlySecond.push(b[j]!);
  }
  pairs.sort((p, q) => firstIndex.get(p.first)! - firstIndex.get(q.first)!);
  onlyFirst.sort((p, q) => firstIndex.get(p)! - firstIndex.get(q)!);
  onlySecond.sort((p, q) => secondIndex.get(p)! - secondIndex.get(q)!);
  return { pairs, onlyFirst, onlySecond };
}
