import { describe, expect, it } from 'vitest';
import { readerQuality, type QualityCollection, type QualityRead } from '@/lib/agreement/quality';

/*
 * Reader quality from hand-made agreement figures. Every expected value is worked out by hand
 * beside it (means of the listed values; signs by "this reader minus the other"): common practice,
 * no outside source needed for averages and counts.
 */
const ann = { id: 1, name: 'Ann' };
const ben = { id: 2, name: 'Ben' };
const cara = { id: 3, name: 'Cara' };
const ad = (differ: boolean) => ({ difference: 10, limit: 9.8, differ });

const compared: QualityCollection[] = [
  {
    collectionId: 1, collectedAt: '2026-06-01T08:00:00.000Z', first: ann, second: ben,
    agreement: { kappa: 0.6, percentNormal: { first: 60, second: 50 }, acceptableDifference: ad(false), confusion: { normal: { normal: 50, distal_droplet: 4 }, distal_droplet: { normal: 1, distal_droplet: 10 } } },
  },
  {
    collectionId: 2, collectedAt: '2026-06-10T08:00:00.000Z', first: ann, second: cara,
    agreement: { kappa: 0.8, percentNormal: { first: 70, second: 80 }, acceptableDifference: ad(true), confusion: { normal: { abnormal_head: 2 }, abnormal_head: { abnormal_head: 3 } } },
  },
  {
    collectionId: 3, collectedAt: '2026-06-20T08:00:00.000Z', first: ben, second: ann,
    agreement: { kappa: null, percentNormal: { first: null, second: 40 }, acceptableDifference: null, confusion: {} },
  },
];
const reads: QualityRead[] = [
  { collectionId: 1, kind: 'first', reader: ann }, { collectionId: 1, kind: 'second', reader: ben },
  { collectionId: 2, kind: 'first', reader: ann }, { collectionId: 2, kind: 'second', reader: cara },
  { collectionId: 3, kind: 'first', reader: ben }, { collectionId: 3, kind: 'second', reader: ann },
  // Read first, never compared (no second read yet).
  { collectionId: 4, kind: 'first', reader: ann },
];

describe('reader quality', () => {
  const [a, b, c] = readerQuality(reads, compared);

  it('counts the collections read as first and as second reader, and those compared', () => {
    expect(a!.reader.name).toBe('Ann');
    expect([a!.asFirst, a!.asSecond, a!.compared]).toEqual([3, 1, 3]); // first: 1, 2, 4; second: 3; compared: 1, 2, 3
    expect([b!.asFirst, b!.asSecond, b!.compared]).toEqual([1, 1, 2]);
    expect([c!.asFirst, c!.asSecond, c!.compared]).toEqual([0, 1, 1]);
  });

  it('means kappa over the collections that have one, saying how many', () => {
    expect(a!.meanKappa).toBeCloseTo(0.7, 12); // (0.6 + 0.8) / 2; collection 3 has no kappa
    expect(a!.kappaCollections).toBe(2);
    expect([b!.meanKappa, b!.kappaCollections]).toEqual([0.6, 1]);
    expect([c!.meanKappa, c!.kappaCollections]).toEqual([0.8, 1]);
  });

  it('gives the bias in % normal with its sign: this reader minus the other', () => {
    expect([a!.meanBias, a!.biasCollections]).toEqual([0, 2]); // (60 − 50) and (70 − 80): +10 and −10 → 0; collection 3 lacks Ben's figure
    expect([b!.meanBias, b!.biasCollections]).toEqual([-10, 1]); // 50 − 60
    expect([c!.meanBias, c!.biasCollections]).toEqual([10, 1]); // 80 − 70
  });

  it('counts how often the acceptable difference was exceeded, of how many', () => {
    expect([a!.exceeded, a!.exceededCollections]).toEqual([1, 2]);
    expect([b!.exceeded, b!.exceededCollections]).toEqual([0, 1]);
    expect([c!.exceeded, c!.exceededCollections]).toEqual([1, 1]);
  });

  it('lists the classes each reader confuses, from its own side of the confusion matrix', () => {
    expect(a!.confusions).toEqual([
      { said: 'normal', otherSaid: 'distal_droplet', count: 4 },
      { said: 'normal', otherSaid: 'abnormal_head', count: 2 },
      { said: 'distal_droplet', otherSaid: 'normal', count: 1 },
    ]);
    expect(a!.confusedCells).toBe(7);
    // Ben read collection 1 second: the matrix's rows are Ann's classes, its columns his.
    expect(b!.confusions).toEqual([
      { said: 'distal_droplet', otherSaid: 'normal', count: 4 },
      { said: 'normal', otherSaid: 'distal_droplet', count: 1 },
    ]);
    expect(c!.confusions).toEqual([{ said: 'abnormal_head', otherSaid: 'normal', count: 2 }]);
  });

  it('keeps one point per compared collection in date order for the chart', () => {
    expect(a!.points.map((p) => [p.collectionId, p.as, p.otherReader, p.bias, p.exceeded])).toEqual([
      [1, 'first', 'Ben', 10, false],
      [2, 'first', 'Cara', -10, true],
      [3, 'second', 'Ben', null, null],
    ]);
  });

  it('has no figure without collections behind it', () => {
    const [only] = readerQuality([{ collectionId: 9, kind: 'first', reader: ann }], []);
    expect(only).toMatchObject({ asFirst: 1, compared: 0, meanKappa: null, kappaCollections: 0, meanBias: null, exceeded: 0, exceededCollections: 0, confusions: [] });
  });
});
