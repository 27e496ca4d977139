import { describe, expect, it } from 'vitest';
import { SemenInputError } from '@/lib/semen/errors';
import {
  DSO_ESTIMATE_DEFAULTS,
  SCROTAL_WIDTH_THRESHOLD_CM,
  TESTIS_ELLIPSOID_FACTOR,
  compareOutput,
  ellipsoidVolumeMl,
  estimateActualDso,
  predictedDailySpermOutputBillion,
  scrotalWidthCheck,
  totalTesticularVolume,
} from '@/lib/semen/testis';

describe('testicular volume', () => {
  it('uses the trade constant 0.5233 (Love, Garcia, Riera, Kenney 1991)', () => {
    expect(TESTIS_ELLIPSOID_FACTOR).toBe(0.5233);
    // π/6 = 0.5236; the quoted constant is within 0.1 % of it (computed)
    expect(Math.abs(TESTIS_ELLIPSOID_FACTOR - Math.PI / 6) / (Math.PI / 6)).toBeLessThan(0.001);
  });

  it('10 × 6.5 × 7 cm → 238.1 mL; both testes 476.2 mL', () => {
    // computed example from 0.5233 × L × W × H (Love, Garcia, Riera & Kenney 1991; docs/references.md)
    const each = ellipsoidVolumeMl(10, 6.5, 7);
    expect(each).toBeCloseTo(238.1, 1);
    expect(totalTesticularVolume(each, each)).toBeCloseTo(476.2, 1);
  });

  it('adds unequal testes and allows a zero measurement', () => {
    // 0.5233 × 9 × 6 × 6 = 169.5492 mL (computed)
    const left = ellipsoidVolumeMl(9, 6, 6);
    expect(left).toBeCloseTo(169.5492, 9);
    expect(totalTesticularVolume(left, 200)).toBeCloseTo(369.5492, 9);
    expect(ellipsoidVolumeMl(0, 6, 6)).toBe(0);
  });

  it('refuses negative or non-numeric sizes', () => {
    expect(() => ellipsoidVolumeMl(-1, 6, 6)).toThrow(SemenInputError);
    expect(() => ellipsoidVolumeMl(10, Number.NaN, 6)).toThrow(SemenInputError);
    expect(() => totalTesticularVolume(-5, 100)).toThrow(SemenInputError);
  });
});

describe('predictedDailySpermOutputBillion', () => {
  it('476.2 mL → 10.67 × 10^9/day with the primary fit', () => {
    // computed example: 0.024 × 476.2 − 0.76 = 10.67 (Love et al. 1991 as reported in later reviews; docs/references.md)
    const total = totalTesticularVolume(ellipsoidVolumeMl(10, 6.5, 7), ellipsoidVolumeMl(10, 6.5, 7));
    const p = predictedDailySpermOutputBillion(total);
    expect(p.billionPerDay).toBeCloseTo(10.67, 2);
    expect(p.fit).toBe('primary');
    expect(p.clamped).toBe(false);
  });

  it('the alternative fit is 0.5 × 10^9/day lower', () => {
    // 0.024 × V − 1.26 (alternative fit, Love et al. 1991 via later reviews): 0.024 × 476.203 − 1.26 = 10.168872 (computed)
    const p = predictedDailySpermOutputBillion(476.203, 'alternative');
    expect(p.billionPerDay).toBeCloseTo(10.168872, 9);
    expect(p.fit).toBe('alternative');
  });

  it('clamps at 0 for very small testes and says so', () => {
    // 0.024 × 20 − 0.76 = −0.28 (computed) → 0 with the flag
    const p = predictedDailySpermOutputBillion(20);
    expect(p.billionPerDay).toBe(0);
    expect(p.unclampedBillionPerDay).toBeCloseTo(-0.28, 12);
    expect(p.clamped).toBe(true);
  });

  it('refuses a negative volume', () => {
    expect(() => predictedDailySpermOutputBillion(-1)).toThrow(SemenInputError);
  });
});

describe('compareOutput', () => {
  it('gives actual as a ratio and % of predicted', () => {
    // 8 / 10 = 0.8 → 80 % (computed)
    expect(compareOutput(8, 10)).toMatchObject({ ratio: 0.8, percentOfPredicted: 80 });
    const predicted = predictedDailySpermOutputBillion(476.203);
    // 10.668872 / 10.668872 = 1 (computed)
    expect(compareOutput(10.668872, predicted).percentOfPredicted).toBeCloseTo(100, 9);
  });

  it('gives null ratios when the prediction is 0', () => {
    expect(compareOutput(2, predictedDailySpermOutputBillion(10))).toMatchObject({ ratio: null, percentOfPredicted: null });
  });

  it('refuses negative outputs', () => {
    expect(() => compareOutput(-1, 10)).toThrow(SemenInputError);
    expect(() => compareOutput(1, -10)).toThrow(SemenInputError);
  });
});

describe('scrotalWidthCheck', () => {
  it('passes at 8 cm or more by default (Asbury 1988)', () => {
    expect(SCROTAL_WIDTH_THRESHOLD_CM).toBe(8);
    expect(scrotalWidthCheck(8).passes).toBe(true);
    expect(scrotalWidthCheck(9.5)).toMatchObject({ passes: true, marginCm: 1.5 });
    expect(scrotalWidthCheck(7.9).passes).toBe(false);
  });

  it('takes a lab threshold', () => {
    expect(scrotalWidthCheck(8.5, 9)).toMatchObject({ passes: false, marginCm: -0.5, thresholdCm: 9 });
  });

  it('refuses bad input', () => {
    expect(() => scrotalWidthCheck(-1)).toThrow(SemenInputError);
    expect(() => scrotalWidthCheck(8, 0)).toThrow(SemenInputError);
  });
});

describe('estimateActualDso', () => {
  const day = (n: number, hour = 8) => new Date(Date.UTC(2025, 4, 1 + n, hour));
  const daily = (totals: (number | null)[]) =>
    totals.map((t, i) => ({ id: `c${i}`, collectedAt: day(i), totalSpermBillion: t }));

  it('defaults: 7 prior daily collections, 20–26 h apart (common practice; 20 h floor our choice)', () => {
    expect(DSO_ESTIMATE_DEFAULTS).toEqual({ minPriorDailyCollections: 7, minIntervalHours: 20, maxIntervalHours: 26 });
  });

  it('averages the collections after the first 7 daily ones', () => {
    // days 0–6 deplete reserves; days 7–9 average (6 + 7 + 8) / 3 = 7 (computed; common practice)
    const r = estimateActualDso(daily([14, 11, 9, 8, 7, 7, 6, 6, 7, 8]));
    expect(r.usedIds).toEqual(['c7', 'c8', 'c9']);
    expect(r.dsoBillion).toBeCloseTo(7, 12);
  });

  it('returns null until the stallion has been collected daily long enough', () => {
    expect(estimateActualDso(daily([14, 11, 9, 8, 7, 7, 6]))).toEqual({ dsoBillion: null, usedIds: [] });
    expect(estimateActualDso([])).toEqual({ dsoBillion: null, usedIds: [] });
  });

  it('restarts the run after a missed day', () => {
    const cs = daily([14, 11, 9, 8, 7, 7, 6, 6, 7, 8]);
    // move c5 and later by a day: a 48 h gap between c4 and c5
    const shifted = cs.map((c, i) => (i >= 5 ? { ...c, collectedAt: day(i + 1) } : c));
    expect(estimateActualDso(shifted).usedIds).toEqual([]);
  });

  it('accepts collection times that drift within 26 h and rejects 27 h', () => {
    const cs = daily([10, 10, 10, 10, 10, 10, 10, 9]);
    // last collection 25 h after the one before → still daily
    const drift = cs.map((c, i) => (i === 7 ? { ...c, collectedAt: day(7, 9) } : c));
    expect(estimateActualDso(drift).dsoBillion).toBe(9);
    const late = cs.map((c, i) => (i === 7 ? { ...c, collectedAt: day(7, 11) } : c));
    expect(estimateActualDso(late).dsoBillion).toBeNull();
  });

  it('counts collections with unknown totals towards the run but not the mean', () => {
    const r = estimateActualDso(daily([14, null, 9, 8, 7, 7, 6, null, 7]));
    expect(r.usedIds).toEqual(['c8']);
    expect(r.dsoBillion).toBe(7);
  });

  it('breaks the run at a same-day second ejaculate', () => {
    const cs = daily([14, 11, 9, 8, 7, 7, 6, 6]);
    cs.splice(3, 0, { id: 'extra', collectedAt: day(2, 9), totalSpermBillion: 3 });
    expect(estimateActualDso(cs).usedIds).toEqual([]);
  });

  it('takes lab options and sorts its input', () => {
    const cs = daily([10, 8, 6, 6]).reverse();
    // with 2 prior daily collections, c2 and c3 average 6 (computed)
    expect(estimateActualDso(cs, { minPriorDailyCollections: 2 })).toEqual({ dsoBillion: 6, usedIds: ['c2', 'c3'] });
  });

  it('refuses bad options and data', () => {
    expect(() => estimateActualDso([], { minPriorDailyCollections: 1.5 })).toThrow(SemenInputError);
    expect(() => estimateActualDso([], { minIntervalHours: 30, maxIntervalHours: 26 })).toThrow(SemenInputError);
    expect(() => estimateActualDso([{ id: 'x', collectedAt: day(0), totalSpermBillion: -1 }])).toThrow(SemenInputError);
  });
});
