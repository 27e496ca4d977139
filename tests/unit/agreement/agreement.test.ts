import { all, create, type Fraction, type Matrix } from 'mathjs';
import { describe, expect, it } from 'vitest';
import {
  cohensKappa,
  collectionAgreement,
  landisKochBand,
  pairCollection,
  type ImagePairing,
} from '@/lib/agreement/agreement';
import { pairMarks, pairingDistancePx, type PairingMark } from '@/lib/agreement/pairing';
import { acceptableDifference } from '@/lib/morphology/replicate';
import type { MorphologyClass } from '@/lib/morphology/tally';
import { mulberry32 } from '@/lib/synthetic/prng';

/**
 * Second reference for multi-class tables. No kappa package on the npm registry was one we could
 * trust (the few there are small single-author modules; the well-known confusion-matrix package,
 * ml-confusion-matrix, has no kappa), so the check computes κ = (po − pe) / (1 − pe) (Cohen 1960)
 * with mathjs's matrix operations in exact fractions: po = trace(M) / n, pe = (M·1)·(1ᵀ·M) / n².
 * The arithmetic path (fractions, a dot product of the margins) is independent of ours.
 */
const math = create(all, { number: 'Fraction' });
function mathjsKappa(table: number[][]): { po: number; pe: number; kappa: number } | null {
  const m = math.matrix(table.map((row) => row.map((v) => math.fraction(v)))) as Matrix;
  const ones = math.matrix(table.map(() => math.fraction(1))) as Matrix;
  const n = math.sum(m) as unknown as Fraction;
  if (math.equal(n, 0)) return null;
  const po = math.divide(math.trace(m), n) as Fraction;
  const pe = math.divide(math.dot(math.multiply(m, ones), math.multiply(ones, m)), math.multiply(n, n)) as Fraction;
  if (math.equal(pe, 1)) return null;
  const kappa = math.divide(math.subtract(po, pe), math.subtract(math.fraction(1), pe)) as Fraction;
  return { po: math.number(po), pe: math.number(pe), kappa: math.number(kappa) };
}

describe('cohensKappa', () => {
  it('the 50-item worked example: po 0.70, pe 0.50, κ 0.40, fair', () => {
    // Textbook worked example, numbers from memory (REFERENCES.md): both yes 20, first yes /
    // second no 5, first no / second yes 10, both no 15. Band: Landis & Koch 1977.
    const r = cohensKappa([
      [20, 5],
      [10, 15],
    ]);
    expect(r.n).toBe(50);
    expect(r.observedAgreement).toBeCloseTo(0.7, 12);
    expect(r.expectedAgreement).toBeCloseTo(0.5, 12);
    expect(r.kappa).toBeCloseTo(0.4, 12);
    expect(landisKochBand(r.kappa!)).toBe('fair');
    // and from the second reference
    expect(mathjsKappa([[20, 5], [10, 15]])).toEqual({ po: 0.7, pe: 0.5, kappa: 0.4 });
  });

  it('a three-class table: κ 0.35484', () => {
    // pycm's documented example (Haghighi et al. 2018, "PyCM: multiclass confusion matrix library
    // in Python", J Open Source Softw 3:729; its test output prints Kappa 0.35484): actual
    // [2,0,2,2,0,1,1,2,2,0,1,2], predicted [0,0,2,1,0,2,1,0,2,0,2,2] → rows by actual class.
    const table = [
      [3, 0, 0],
      [0, 1, 2],
      [2, 1, 3],
    ];
    const r = cohensKappa(table);
    // po = 7/12, pe = 51/144 (computed from the table)
    expect(r.observedAgreement).toBeCloseTo(7 / 12, 12);
    expect(r.expectedAgreement).toBeCloseTo(51 / 144, 12);
    expect(r.kappa).toBeCloseTo(0.35484, 5);
    expect(r.kappa).toBeCloseTo(mathjsKappa(table)!.kappa, 12);
    expect(landisKochBand(r.kappa!)).toBe('fair');
  });

  it('agrees with the mathjs reference on 300 random tables of 2–8 classes', () => {
    const rnd = mulberry32(1960);
    for (let t = 0; t < 300; t++) {
      const k = 2 + Math.floor(rnd() * 7);
      // mostly diagonal, as two readers of one slide are, with some zero rows and columns
      const table = Array.from({ length: k }, (_, i) =>
        Array.from({ length: k }, (_, j) => (rnd() < 0.15 ? 0 : Math.floor(rnd() * (i === j ? 60 : 8)))),
      );
      const ours = cohensKappa(table);
      const ref = mathjsKappa(table);
      if (ref === null) {
        expect(ours.kappa, `table ${t}`).toBeNull();
        continue;
      }
      expect(ours.observedAgreement!, `table ${t}`).toBeCloseTo(ref.po, 12);
      expect(ours.expectedAgreement!, `table ${t}`).toBeCloseTo(ref.pe, 12);
      expect(ours.kappa, `table ${t}`).toBeCloseTo(ref.kappa, 12);
    }
  });

  it('perfect agreement is 1, agreement no better than chance is 0, systematic disagreement is negative', () => {
    // computed from κ = (po − pe) / (1 − pe), Cohen 1960
    expect(cohensKappa([[30, 0], [0, 20]]).kappa).toBe(1);
    // independent margins: 0.5 × 0.5 in every cell → po = pe = 0.5
    expect(cohensKappa([[10, 10], [10, 10]]).kappa).toBe(0);
    // po 0, pe 0.5 → κ −1
    expect(cohensKappa([[0, 5], [5, 0]]).kappa).toBe(-1);
    expect(landisKochBand(-1)).toBe('poor');
  });

  it('has no kappa for an empty table or a single class both readers always chose', () => {
    expect(cohensKappa([])).toEqual({ n: 0, observedAgreement: null, expectedAgreement: null, kappa: null });
    expect(cohensKappa([[0, 0], [0, 0]]).kappa).toBeNull();
    // po 1, pe 1: κ is 0 / 0
    expect(cohensKappa([[12]])).toEqual({ n: 12, observedAgreement: 1, expectedAgreement: 1, kappa: null });
  });

  it('refuses tables that are not square counts', () => {
    expect(() => cohensKappa([[1, 2]])).toThrow(RangeError);
    expect(() => cohensKappa([[1, -1], [0, 1]])).toThrow(RangeError);
    expect(() => cohensKappa([[1, 0.5], [0, 1]])).toThrow(RangeError);
  });
});

describe('landisKochBand', () => {
  it('follows the published bands at and around every edge', () => {
    // Landis & Koch 1977, Biometrics 33:159–174: < 0.00 poor, 0.00–0.20 slight, 0.21–0.40 fair,
    // 0.41–0.60 moderate, 0.61–0.80 substantial, 0.81–1.00 almost perfect (printed to 2 decimals)
    const cases: [number, string][] = [
      [-0.2, 'poor'], [-0.01, 'poor'], [0, 'slight'], [0.2, 'slight'], [0.21, 'fair'], [0.4, 'fair'],
      [0.41, 'moderate'], [0.6, 'moderate'], [0.61, 'substantial'], [0.8, 'substantial'],
      [0.81, 'almost perfect'], [1, 'almost perfect'],
    ];
    for (const [k, band] of cases) expect(landisKochBand(k), String(k)).toBe(band);
  });

  it('rounds to the table’s two decimals first (our reading of the gaps between the printed bands)', () => {
    expect(landisKochBand(0.204)).toBe('slight');
    expect(landisKochBand(0.205)).toBe('fair');
    expect(landisKochBand(0.4 + 1e-12)).toBe('fair');
    expect(landisKochBand(0.404)).toBe('fair');
    expect(landisKochBand(0.406)).toBe('moderate');
    expect(landisKochBand(-0.004)).toBe('slight');
  });

  it('refuses a value that is not a kappa', () => {
    expect(() => landisKochBand(Number.NaN)).toThrow(RangeError);
    expect(() => landisKochBand(1.5)).toThrow(RangeError);
  });
});

// A class set in the tally's terms (id = class key), as toMorphologyClasses gives it.
const CLASSES: MorphologyClass[] = [
  { id: 'normal', name: 'Normal', group: 'normal', countsAsSperm: true },
  { id: 'head_shape', name: 'Abnormal head shape or size', group: 'head', countsAsSperm: true },
  { id: 'proximal_droplet', name: 'Proximal cytoplasmic droplet', group: 'droplet', countsAsSperm: true },
  { id: 'detached_head', name: 'Detached head', group: 'other', countsAsSperm: true },
  { id: 'round_cell', name: 'Round cell', group: 'other', countsAsSperm: false },
];
const SPERM = new Set(CLASSES.filter((c) => c.countsAsSperm).map((c) => c.id));
type M = PairingMark;
const mk = (id: string, x: number, y: number, classKey: string): M => ({ id, x, y, classKey, countsAsSperm: SPERM.has(classKey) });

/** Cells on a 40 px grid; the second reader's marks 1.5 px right and 1 px up of the first's. */
function layout(imageId: string, classes: [string | null, string | null][]): { first: M[]; second: M[] } {
  const first: M[] = [];
  const second: M[] = [];
  classes.forEach(([a, b], i) => {
    const x = 40 + 40 * (i % 20);
    const y = 40 + 40 * Math.floor(i / 20);
    if (a) first.push(mk(`${imageId}-a${i}`, x, y, a));
    if (b) second.push(mk(`${imageId}-b${i}`, x + 1.5, y - 1, b));
  });
  return { first, second };
}

const repeat = <T,>(n: number, v: T): T[] => Array.from({ length: n }, () => v);

describe('collectionAgreement', () => {
  it('reproduces the 50-item worked example from marks on two images', () => {
    // normal vs abnormal (head shape) on 50 paired cells: 20 both normal, 5 first normal / second
    // abnormal, 10 first abnormal / second normal, 15 both abnormal (worked example, from memory)
    const cells: [string, string][] = [
      ...repeat(20, ['normal', 'normal'] as [string, string]),
      ...repeat(5, ['normal', 'head_shape'] as [string, string]),
      ...repeat(10, ['head_shape', 'normal'] as [string, string]),
      ...repeat(15, ['head_shape', 'head_shape'] as [string, string]),
    ];
    const a = layout('img-1', cells.slice(0, 30));
    const b = layout('img-2', cells.slice(30));
    const images = pairCollection([
      { imageId: 'img-1', ...a, maxDistancePx: pairingDistancePx(0.25) },
      { imageId: 'img-2', ...b, maxDistancePx: pairingDistancePx(null) },
    ]);
    const r = collectionAgreement(images, CLASSES);
    expect(r.pairs).toBe(50);
    expect(r.spermPairs).toBe(50);
    expect(r.onlyFirst).toBe(0);
    expect(r.onlySecond).toBe(0);
    expect(r.confusion).toEqual({ normal: { normal: 20, head_shape: 5 }, head_shape: { normal: 10, head_shape: 15 } });
    expect(r.classKeys).toEqual(['normal', 'head_shape']);
    expect(r.observedAgreement).toBeCloseTo(0.7, 12);
    expect(r.expectedAgreement).toBeCloseTo(0.5, 12);
    expect(r.kappa).toBeCloseTo(0.4, 12);
    expect(r.band).toBe('fair');
    // % normal 25/50 = 50 % and 30/50 = 60 %; limit 1.96 × √(55 × 45 × (1/50 + 1/50)) = 19.50
    // points (computed from the duplicate-count formula, WHO manual 5th ed. 2010, section 2.11)
    expect(r.percentNormal).toEqual({ first: 50, second: 60 });
    expect(r.cellsCounted).toEqual({ first: 50, second: 50 });
    expect(r.acceptableDifference!.difference).toBeCloseTo(10, 12);
    expect(r.acceptableDifference!.limit).toBeCloseTo(19.5, 2);
    expect(r.acceptableDifference!.differ).toBe(false);
    expect(r.disagreements).toHaveLength(15);
    expect(r.disagreements.every((d) => d.kind === 'class')).toBe(true);
    expect(r.perImage).toEqual([
      { imageId: 'img-1', pairs: 30, onlyFirst: 0, onlySecond: 0, disagreements: 10 },
      { imageId: 'img-2', pairs: 20, onlyFirst: 0, onlySecond: 0, disagreements: 5 },
    ]);
  });

  it('counts unpaired marks, keeps non-sperm out of kappa and % normal, and lists every disagreement', () => {
    const { first, second } = layout('img-1', [
      ['normal', 'normal'],
      ['normal', 'normal'],
      ['normal', 'proximal_droplet'],
      ['head_shape', 'head_shape'],
      ['detached_head', null], // only the first reader
      [null, 'head_shape'], // only the second reader
      ['round_cell', 'round_cell'],
      ['round_cell', null], // a round cell only the first reader marked
      ['proximal_droplet', 'proximal_droplet'],
    ]);
    const r = collectionAgreement([{ imageId: 'img-1', pairing: pairMarks(first, second, 8) }], CLASSES);
    expect(r.pairs).toBe(6);
    expect(r.spermPairs).toBe(5);
    expect(r.onlyFirst).toBe(2);
    expect(r.onlySecond).toBe(1);
    expect(r.confusion).toEqual({
      normal: { normal: 2, proximal_droplet: 1 },
      head_shape: { head_shape: 1 },
      proximal_droplet: { proximal_droplet: 1 },
      round_cell: { round_cell: 1 },
    });
    expect(r.classKeys).toEqual(['normal', 'head_shape', 'proximal_droplet', 'round_cell']);
    // sperm pairs over normal, head_shape, proximal_droplet: [[2,0,1],[0,1,0],[0,0,1]], n = 5;
    // po = 4/5; pe = (3·2 + 1·1 + 1·2)/25 = 9/25; κ = (4/5 − 9/25)/(16/25) = 11/16 (computed, Cohen 1960)
    expect(r.observedAgreement).toBeCloseTo(4 / 5, 12);
    expect(r.expectedAgreement).toBeCloseTo(9 / 25, 12);
    expect(r.kappa).toBeCloseTo(11 / 16, 12);
    expect(r.kappa).toBeCloseTo(mathjsKappa([[2, 0, 1], [0, 1, 0], [0, 0, 1]])!.kappa, 12);
    expect(r.band).toBe('substantial');
    // first read: 6 sperm cells (5 paired + the detached head), 3 normal; second: 6 sperm cells
    // (5 paired + its extra head), 2 normal; the round cells stay apart
    expect(r.cellsCounted).toEqual({ first: 6, second: 6 });
    expect(r.percentNormal.first).toBeCloseTo(50, 12);
    expect(r.percentNormal.second).toBeCloseTo((2 / 6) * 100, 12);
    const expected = acceptableDifference(50, (2 / 6) * 100, [6, 6]);
    expect(r.acceptableDifference).toEqual({ difference: expected.difference, limit: expected.limit, differ: expected.differ });

    // top to bottom, then left to right: the second reader's extra mark sits 1 px higher (y 39)
    // than the row of first-read marks (y 40), so it comes first
    expect(r.disagreements.map((d) => [d.kind, d.first?.id ?? null, d.second?.id ?? null, d.countsAsSperm])).toEqual([
      ['only-second', null, 'img-1-b5', true],
      ['class', 'img-1-a2', 'img-1-b2', true],
      ['only-first', 'img-1-a4', null, true],
      ['only-first', 'img-1-a7', null, false],
    ]);
    const d0 = r.disagreements[1]!;
    expect(d0).toEqual({
      key: 'img-1:img-1-a2:img-1-b2',
      imageId: 'img-1',
      kind: 'class',
      first: { id: 'img-1-a2', x: 120, y: 40, classKey: 'normal' },
      second: { id: 'img-1-b2', x: 121.5, y: 39, classKey: 'proximal_droplet' },
      distance: expect.closeTo(Math.hypot(1.5, 1), 12),
      countsAsSperm: true,
    });
    expect(r.disagreements[0]!.key).toBe('img-1::img-1-b5');
  });

  it('walks disagreements image by image, top to bottom', () => {
    const top = layout('a', [['normal', 'head_shape']]);
    const lower = { first: [mk('a-low', 30, 400, 'normal')], second: [] as M[] };
    const other = layout('b', [[null, 'normal']]);
    const r = collectionAgreement(
      pairCollection([
        { imageId: 'b', ...other, maxDistancePx: 8 },
        { imageId: 'a', first: [...lower.first, ...top.first], second: top.second, maxDistancePx: 8 },
      ]),
      CLASSES,
    );
    expect(r.disagreements.map((d) => d.key)).toEqual(['b::b-b0', 'a:a-a0:a-b0', 'a:a-low:']);
  });

  it('a collection with no sperm pairs has no kappa; one with no sperm has no acceptable difference', () => {
    const none = collectionAgreement([], CLASSES);
    expect(none).toMatchObject({ pairs: 0, onlyFirst: 0, onlySecond: 0, kappa: null, band: null, observedAgreement: null, acceptableDifference: null, disagreements: [] });
    expect(none.percentNormal).toEqual({ first: null, second: null });

    const apart = layout('img', [['normal', null], [null, 'normal']]);
    const r = collectionAgreement([{ imageId: 'img', pairing: pairMarks(apart.first, apart.second, 8) }], CLASSES);
    expect(r.kappa).toBeNull();
    expect(r.percentNormal).toEqual({ first: 100, second: 100 });
    expect(r.acceptableDifference).toEqual({ difference: 0, limit: 0, differ: false });
  });

  it('flags two reads whose % normal differ by more than the limit', () => {
    // 200 cells each: 120 vs 90 normal → 60 % vs 45 %, difference 15 > 1.96 × √(2 × 52.5 × 47.5 / 200)
    // = 9.79 points (computed, WHO manual 5th ed. 2010, section 2.11 formula)
    const cells: [string, string][] = [
      ...repeat(90, ['normal', 'normal'] as [string, string]),
      ...repeat(30, ['normal', 'head_shape'] as [string, string]),
      ...repeat(80, ['head_shape', 'head_shape'] as [string, string]),
    ];
    const { first, second } = layout('img', cells);
    const r = collectionAgreement([{ imageId: 'img', pairing: pairMarks(first, second, 8) }], CLASSES);
    expect(r.percentNormal).toEqual({ first: 60, second: 45 });
    expect(r.acceptableDifference!.limit).toBeCloseTo(9.79, 2);
    expect(r.acceptableDifference!.differ).toBe(true);
  });

  it('uses each image’s own pairing distance (an image without scale takes the pixel fallback)', () => {
    // the same two marks 12 px apart: at 0.25 µm/px the 4 µm default is 16 px and they pair;
    // on an image without scale with a 10 px fallback they do not
    const pair = (imageId: string) => ({ first: [mk(`${imageId}-a`, 100, 100, 'normal')], second: [mk(`${imageId}-b`, 112, 100, 'normal')] });
    const images: ImagePairing<M>[] = pairCollection([
      { imageId: 'scaled', ...pair('scaled'), maxDistancePx: pairingDistancePx(0.25) },
      { imageId: 'unscaled', ...pair('unscaled'), maxDistancePx: pairingDistancePx(null, { fallbackPx: 10 }) },
    ]);
    const r = collectionAgreement(images, CLASSES);
    expect(r.perImage).toEqual([
      { imageId: 'scaled', pairs: 1, onlyFirst: 0, onlySecond: 0, disagreements: 0 },
      { imageId: 'unscaled', pairs: 0, onlyFirst: 1, onlySecond: 1, disagreements: 2 },
    ]);
  });

  it('refuses the same image twice', () => {
    const p = { imageId: 'x', pairing: { pairs: [], onlyFirst: [], onlySecond: [] } };
    expect(() => collectionAgreement([p, p], CLASSES)).toThrow(/twice/);
  });
});
