import { pairPoints } from '@/lib/agreement/pairing';
import type { Point } from './types';

/*
 * The cell walk: the scoring canvas takes the reader from one machine candidate to the next in
 * reading order, the reader judges each one with one key (a class, or "not a cell"), and the view
 * moves on by itself. Candidates are suggestions: a candidate is classified only by the reader —
 * a mark of this read, or a skip, within the pairing distance — and clicking still marks any cell.
 *
 * Pure: the workbench derives every candidate's state from the marks and skips it already holds,
 * so undo, another tab's changes and a re-run of the search need no walk state of their own. The
 * walk's only state is "on", and where it stands follows from the states: the first open
 * candidate in reading order on the current image, else on the images after it, else before it.
 */

/** A stallion sperm head's length, µm (about 6 × 3 µm; from memory): the height of one row of the walk. */
export const HEAD_LENGTH_UM = 6;
/** A head's length in pixels on an image with no scale (6 µm at 0.25 µm per pixel, the synthetic fields' scale). */
export const HEAD_LENGTH_PX_FALLBACK = 24;
/**
 * The walk's zoom shows about this many head lengths across the view's short side: 24 × 6 µm =
 * 144 µm, about twice a whole stallion sperm cell (~60 µm, from memory), so the reader sees the
 * cell in the ring with its tail and a little of what lies around it.
 */
export const WALK_VIEW_HEADS = 24;

export function headLengthPx(micronsPerPixel: number | null | undefined): number {
  return micronsPerPixel && micronsPerPixel > 0 ? HEAD_LENGTH_UM / micronsPerPixel : HEAD_LENGTH_PX_FALLBACK;
}

/**
 * Reading order, like a stage scan: rows from the top, each row left to right. A row starts at
 * the topmost point not yet placed and takes every point less than `bandPx` below that start, so
 * two heads side by side at slightly different heights are in one row. Returns indices into
 * `points`; ties keep the input order.
 */
export function readingOrder(points: readonly Point[], bandPx: number): number[] {
  if (!(bandPx > 0)) throw new RangeError('the row band must be above 0 pixels');
  const byY = points.map((_, i) => i).sort((a, b) => points[a]!.y - points[b]!.y || a - b);
  const out: number[] = [];
  let row: number[] = [];
  let rowTop = -Infinity;
  const flush = () => {
    row.sort((a, b) => points[a]!.x - points[b]!.x || a - b);
    out.push(...row);
    row = [];
  };
  for (const i of byY) {
    const y = points[i]!.y;
    if (row.length && y - rowTop >= bandPx) flush();
    if (!row.length) rowTop = y;
    row.push(i);
  }
  if (row.length) flush();
  return out;
}

export type CandidateState = 'open' | 'marked' | 'skipped';

/**
 * Each candidate's state: 'marked' when a mark of the read pairs with it, else 'skipped' when a
 * skip does, else 'open'. Pairing is one to one within `distancePx` (the second read's pairing,
 * lib/agreement/pairing.ts): one mark never classifies two candidates, and a mark placed on a
 * candidate pairs with that candidate rather than a neighbour.
 */
export function candidateStates(candidates: readonly Point[], marks: readonly Point[], skips: readonly Point[], distancePx: number): CandidateState[] {
  const states: CandidateState[] = candidates.map(() => 'open');
  if (!candidates.length) return states;
  if (marks.length) for (const p of pairPoints(candidates, marks, distancePx).pairs) states[p.first] = 'marked';
  const open = states.flatMap((s, i) => (s === 'open' ? [i] : []));
  if (skips.length && open.length) {
    for (const p of pairPoints(open.map((i) => candidates[i]!), skips, distancePx).pairs) states[open[p.first]!] = 'skipped';
  }
  return states;
}

/** One image as the walk sees it: its candidates in reading order and their states, index for index. */
export interface WalkImage {
  points: readonly Point[];
  states: readonly CandidateState[];
}

export interface WalkStop {
  imageIndex: number;
  /** Index into the image's reading order. */
  index: number;
  point: Point;
}

/** Where the walk stands: the first open candidate on `fromImage`, else on the images after it, else before it; null when none is open. */
export function nextStop(images: readonly WalkImage[], fromImage: number): WalkStop | null {
  const n = images.length;
  for (let k = 0; k < n; k++) {
    const imageIndex = (fromImage + k) % n;
    const img = images[imageIndex]!;
    const index = img.states.indexOf('open');
    if (index >= 0) return { imageIndex, index, point: img.points[index]! };
  }
  return null;
}

/** Open candidates per image and in all. */
export function openCounts(images: readonly WalkImage[]): { perImage: number[]; total: number } {
  const perImage = images.map((img) => img.states.reduce((n, s) => n + (s === 'open' ? 1 : 0), 0));
  return { perImage, total: perImage.reduce((a, b) => a + b, 0) };
}

/** The walk's zoom for a view: about WALK_VIEW_HEADS head lengths across its short side. */
export function walkScale(viewW: number, viewH: number, headPx: number): number {
  return Math.max(0.05, Math.min(viewW, viewH) / (WALK_VIEW_HEADS * headPx));
}
