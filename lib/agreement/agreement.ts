/**
 * Agreement between two reads of one collection, from the pairing of every field image.
 *
 * - Counts: pairs, and marks only one reader made (sperm and non-sperm alike).
 * - `confusion`: first reader's class × second reader's class over every pair, keyed by class key.
 * - Observed agreement and Cohen's kappa over the paired SPERM cells only (non-sperm marks are
 *   tallied apart everywhere else, so they stay out of the agreement on sperm classes too):
 *   κ = (po − pe) / (1 − pe) (Cohen 1960, Educ Psychol Meas 20:37–46), with its Landis & Koch band.
 * - Each read's % normal from the one morphology engine (lib/morphology/tally.ts) over all of its
 *   sperm cells, paired or not, and whether the two differ by more than the acceptable difference
 *   for duplicate counts (lib/morphology/replicate.ts, the formula, not the printed table).
 * - Every disagreement (a pair whose classes differ, or a mark only one reader made), in image
 *   order and top-to-bottom within an image, for the settle view to walk.
 */
import { acceptableDifference, type ReplicateDifference } from '@/lib/morphology/replicate';
import { tallyMarks, type MorphologyClass } from '@/lib/morphology/tally';
import { pairMarks, type MarkPairing, type PairingMark } from './pairing';

/** Landis & Koch 1977 (Biometrics 33:159–174) strength-of-agreement bands. */
export const KAPPA_BANDS = ['poor', 'slight', 'fair', 'moderate', 'substantial', 'almost perfect'] as const;
export type KappaBand = (typeof KAPPA_BANDS)[number];

/**
 * The band for a kappa. The table is printed to two decimals (< 0.00 poor, 0.00–0.20 slight,
 * 0.21–0.40 fair, 0.41–0.60 moderate, 0.61–0.80 substantial, 0.81–1.00 almost perfect), so the
 * kappa is rounded to two decimals first: 0.404 is fair, 0.405 moderate, and a computed
 * 0.39999999999 is the 0.40 it stands for.
 */
export function landisKochBand(kappa: number): KappaBand {
  if (!Number.isFinite(kappa) || kappa < -1 - 1e-9 || kappa > 1 + 1e-9) throw new RangeError('kappa must be between −1 and 1');
  const k = Math.round(kappa * 100) / 100;
  if (k < 0) return 'poor';
  if (k <= 0.2) return 'slight';
  if (k <= 0.4) return 'fair';
  if (k <= 0.6) return 'moderate';
  if (k <= 0.8) return 'substantial';
  return 'almost perfect';
}

export interface KappaResult {
  /** Items both readers rated. */
  n: number;
  /** po: share of items on the diagonal; null when n = 0. */
  observedAgreement: number | null;
  /** pe: Σ (row share × column share); null when n = 0. */
  expectedAgreement: number | null;
  /**
   * κ = (po − pe) / (1 − pe); null when n = 0, or when pe = 1 (both readers gave every item the
   * same single class: chance alone explains the agreement and κ is 0 / 0).
   */
  kappa: number | null;
}

/** Cohen's kappa from a square table of counts (rows: first reader's class, columns: second's). */
export function cohensKappa(table: readonly (readonly number[])[]): KappaResult {
  const k = table.length;
  for (const row of table) {
    if (row.length !== k) throw new RangeError('the agreement table must be square');
    for (const v of row) if (!Number.isInteger(v) || v < 0) throw new RangeError('the agreement table holds whole counts ≥ 0');
  }
  const rowSums = table.map((row) => row.reduce((s, v) => s + v, 0));
  const colSums = Array.from({ length: k }, (_, j) => table.reduce((s, row) => s + row[j]!, 0));
  const n = rowSums.reduce((s, v) => s + v, 0);
  if (n === 0) return { n, observedAgreement: null, expectedAgreement: null, kappa: null };
  const diagonal = table.reduce((s, row, i) => s + row[i]!, 0);
  // Whole numbers until the last division: κ = (n·Σ diagonal − Σ row·column) / (n² − Σ row·column).
  const chance = rowSums.reduce((s, r, i) => s + r * colSums[i]!, 0);
  const observedAgreement = diagonal / n;
  const expectedAgreement = chance / (n * n);
  const kappa = n * n === chance ? null : (n * diagonal - chance) / (n * n - chance);
  return { n, observedAgreement, expectedAgreement, kappa };
}

/** first class key → second class key → pairs; only cells with at least one pair appear. */
export type ConfusionMatrix = Record<string, Record<string, number>>;

export interface ImagePairing<M extends PairingMark = PairingMark> {
  imageId: string;
  pairing: MarkPairing<M>;
}

export interface ImageReads<M extends PairingMark = PairingMark> {
  imageId: string;
  first: readonly M[];
  second: readonly M[];
  /** This image's pairing distance (pairingDistancePx with its scale). */
  maxDistancePx: number;
}

/** Pair every image of a collection, each with its own pairing distance. */
export function pairCollection<M extends PairingMark>(images: readonly ImageReads<M>[]): ImagePairing<M>[] {
  return images.map((im) => ({ imageId: im.imageId, pairing: pairMarks(im.first, im.second, im.maxDistancePx) }));
}

export interface DisagreementMark {
  id: string;
  x: number;
  y: number;
  classKey: string;
}

export type DisagreementKind = 'class' | 'only-first' | 'only-second';

export interface Disagreement {
  /** Stable across recomputation of the same marks: `imageId:firstMarkId:secondMarkId` (an absent side empty). */
  key: string;
  imageId: string;
  kind: DisagreementKind;
  /** The first reader's mark (null when only the second reader marked the cell). */
  first: DisagreementMark | null;
  /** The second reader's mark (null when only the first reader marked the cell). */
  second: DisagreementMark | null;
  /** Pixels between the two marks of a pair; null for a mark only one reader made. */
  distance: number | null;
  countsAsSperm: boolean;
}

export interface ImageAgreementCounts {
  imageId: string;
  pairs: number;
  onlyFirst: number;
  onlySecond: number;
  disagreements: number;
}

export interface CollectionAgreement {
  /** Pairs over all images, sperm and non-sperm. */
  pairs: number;
  /** Pairs of sperm cells: the items behind observedAgreement and kappa. */
  spermPairs: number;
  /** Marks only the first reader made (sperm and non-sperm). */
  onlyFirst: number;
  /** Marks only the second reader made (sperm and non-sperm). */
  onlySecond: number;
  /** Class keys seen in any pair, class-set order first, then any others alphabetically. */
  classKeys: string[];
  confusion: ConfusionMatrix;
  /** Share of paired sperm cells given the same class, 0–1; null with no sperm pairs. */
  observedAgreement: number | null;
  /** Chance agreement pe over the paired sperm cells, 0–1; null with no sperm pairs. */
  expectedAgreement: number | null;
  kappa: number | null;
  band: KappaBand | null;
  /** Each read's % normal over all its sperm cells (the morphology engine); null with none counted. */
  percentNormal: { first: number | null; second: number | null };
  /** Sperm cells each read counted. */
  cellsCounted: { first: number; second: number };
  /** The two % normal values against the acceptable difference for duplicate counts; null unless both reads counted sperm. */
  acceptableDifference: Pick<ReplicateDifference, 'difference' | 'limit' | 'differ'> | null;
  disagreements: Disagreement[];
  perImage: ImageAgreementCounts[];
}

export interface AgreementOptions {
  /** z for the acceptable difference (default 1.96, 95 %). */
  z?: number;
}

const brief = (m: PairingMark): DisagreementMark => ({ id: m.id, x: m.x, y: m.y, classKey: m.classKey });

/**
 * Agreement figures for a collection. `classSet` is the reads' class set in the tally's terms
 * (`id` = class key, as toMorphologyClasses gives it); it decides what is normal and orders the
 * class keys.
 */
export function collectionAgreement<M extends PairingMark>(
  images: readonly ImagePairing<M>[],
  classSet: readonly MorphologyClass[],
  options: AgreementOptions = {},
): CollectionAgreement {
  const seenImages = new Set<string>();
  for (const im of images) {
    if (seenImages.has(im.imageId)) throw new RangeError(`image ${im.imageId} appears twice`);
    seenImages.add(im.imageId);
  }

  const confusion: ConfusionMatrix = {};
  const keysInPairs = new Set<string>();
  const spermPairList: { first: string; second: string }[] = [];
  const disagreements: Disagreement[] = [];
  const perImage: ImageAgreementCounts[] = [];
  const firstMarks: { classId: string; imageId: string }[] = [];
  const secondMarks: { classId: string; imageId: string }[] = [];
  let pairs = 0;
  let onlyFirst = 0;
  let onlySecond = 0;

  for (const { imageId, pairing } of images) {
    const here: Disagreement[] = [];
    for (const p of pairing.pairs) {
      const a = p.first.classKey;
      const b = p.second.classKey;
      (confusion[a] ??= {})[b] = (confusion[a]![b] ?? 0) + 1;
      keysInPairs.add(a).add(b);
      if (p.first.countsAsSperm) spermPairList.push({ first: a, second: b });
      if (a !== b) {
        here.push({ key: `${imageId}:${p.first.id}:${p.second.id}`, imageId, kind: 'class', first: brief(p.first), second: brief(p.second), distance: p.distance, countsAsSperm: p.first.countsAsSperm });
      }
      firstMarks.push({ classId: a, imageId });
      secondMarks.push({ classId: b, imageId });
    }
    for (const m of pairing.onlyFirst) {
      here.push({ key: `${imageId}:${m.id}:`, imageId, kind: 'only-first', first: brief(m), second: null, distance: null, countsAsSperm: m.countsAsSperm });
      firstMarks.push({ classId: m.classKey, imageId });
    }
    for (const m of pairing.onlySecond) {
      here.push({ key: `${imageId}::${m.id}`, imageId, kind: 'only-second', first: null, second: brief(m), distance: null, countsAsSperm: m.countsAsSperm });
      secondMarks.push({ classId: m.classKey, imageId });
    }
    // Top to bottom, then left to right, by the first reader's mark where there is one.
    const at = (d: Disagreement) => (d.first ?? d.second)!;
    here.sort((p, q) => at(p).y - at(q).y || at(p).x - at(q).x || (p.key < q.key ? -1 : p.key > q.key ? 1 : 0));
    disagreements.push(...here);
    pairs += pairing.pairs.length;
    onlyFirst += pairing.onlyFirst.length;
    onlySecond += pairing.onlySecond.length;
    perImage.push({ imageId, pairs: pairing.pairs.length, onlyFirst: pairing.onlyFirst.length, onlySecond: pairing.onlySecond.length, disagreements: here.length });
  }

  const setOrder = classSet.map((c) => c.id);
  const classKeys = [
    ...setOrder.filter((k) => keysInPairs.has(k)),
    ...[...keysInPairs].filter((k) => !setOrder.includes(k)).sort(),
  ];

  // Kappa over sperm pairs, on the classes that occur among them.
  const spermKeys = classKeys.filter((k) => spermPairList.some((p) => p.first === k || p.second === k));
  const index = new Map(spermKeys.map((k, i) => [k, i]));
  const table = spermKeys.map(() => new Array<number>(spermKeys.length).fill(0));
  for (const p of spermPairList) table[index.get(p.first)!]![index.get(p.second)!]!++;
  const k = cohensKappa(table);

  const t1 = tallyMarks(classSet, firstMarks);
  const t2 = tallyMarks(classSet, secondMarks);
  let difference: CollectionAgreement['acceptableDifference'] = null;
  if (t1.pctNormal !== null && t2.pctNormal !== null) {
    const d = acceptableDifference(t1.pctNormal, t2.pctNormal, [t1.cellsCounted, t2.cellsCounted], options.z);
    difference = { difference: d.difference, limit: d.limit, differ: d.differ };
  }

  return {
    pairs,
    spermPairs: k.n,
    onlyFirst,
    onlySecond,
    classKeys,
    confusion,
    observedAgreement: k.observedAgreement,
    expectedAgreement: k.expectedAgreement,
    kappa: k.kappa,
    band: k.kappa === null ? null : landisKochBand(k.kappa),
    percentNormal: { first: t1.pctNormal, second: t2.pctNormal },
    cellsCounted: { first: t1.cellsCounted, second: t2.cellsCounted },
    acceptableDifference: difference,
    disagreements,
    perImage,
  };
}
