import { describe, expect, it } from 'vitest';
import {
  CHAMBER_MAX_SQUARES,
  concentrationFromChamber,
  tryConcentrationFromChamber,
} from '@/lib/semen/chamber';
import { SemenInputError } from '@/lib/semen/errors';

describe('concentrationFromChamber', () => {
  it('1:10, 50 sperm in 5 squares → 25 × 10^6/mL', () => {
    // worked example, note on the WHO laboratory manual 5th ed. 2010, pp. 32 ff. (docs/references.md)
    const r = concentrationFromChamber({ dilution: 10, squaresCounted: 5, counts: [50, 50] });
    expect(r.concentrationMillionPerMl).toBeCloseTo(25, 12);
    expect(r.perChamber).toEqual([25, 25]);
    expect(r.agree).toBe(true);
  });

  it('1:20, 500 sperm in 5 squares → 500 × 10^6/mL', () => {
    // worked example, note on the WHO laboratory manual 5th ed. 2010, pp. 32 ff. (docs/references.md)
    const r = concentrationFromChamber({ dilution: 20, squaresCounted: 5, counts: [500, 500] });
    expect(r.concentrationMillionPerMl).toBeCloseTo(500, 12);
    expect(r.lowCount).toBe(false);
  });

  it('averages two replicates and checks their agreement', () => {
    // 1:20, 5 squares: 480 → 480, 520 → 520, mean 500 (computed from count × dilution / (squares × 4))
    const r = concentrationFromChamber({ dilution: 20, squaresCounted: 5, counts: [480, 520] });
    expect(r.perChamber[0]).toBeCloseTo(480, 12);
    expect(r.perChamber[1]).toBeCloseTo(520, 12);
    expect(r.concentrationMillionPerMl).toBeCloseTo(500, 12);
    expect(r.difference).toBe(40);
    // 1.96 × √1000 = 61.98 (computed from |N1 − N2| ≤ 1.96 × √(N1 + N2); Poisson basis, from memory)
    expect(r.allowedDifference).toBeCloseTo(61.98, 2);
    expect(r.agree).toBe(true);
  });

  it('flags replicates that differ by more than chance', () => {
    // |400 − 500| = 100 > 1.96 × √900 = 58.8 (computed from the replicate rule, from memory)
    const r = concentrationFromChamber({ dilution: 20, squaresCounted: 25, counts: [400, 500] });
    expect(r.allowedDifference).toBeCloseTo(58.8, 9);
    expect(r.agree).toBe(false);
    // 25 squares = 100 nL: 450 × 20 / 100 = 90 × 10^6/mL (computed from the chamber formula)
    expect(r.concentrationMillionPerMl).toBeCloseTo(90, 12);
  });

  it('treats the limit itself as agreement', () => {
    // 41 + 60: limit 1.96 × √101 = 19.70 ≥ 19 → agree; 40 + 60: limit 1.96 × √100 = 19.6 < 20 → differ
    // (computed from |N1 − N2| ≤ 1.96 × √(N1 + N2), from memory)
    expect(concentrationFromChamber({ dilution: 10, squaresCounted: 5, counts: [41, 60] }).agree).toBe(true);
    expect(concentrationFromChamber({ dilution: 10, squaresCounted: 5, counts: [40, 60] }).agree).toBe(false);
  });

  it('flags low counts per replicate (from memory: WHO manual asks about 200 per replicate)', () => {
    expect(concentrationFromChamber({ dilution: 10, squaresCounted: 5, counts: [50, 50] }).lowCount).toBe(true);
    expect(concentrationFromChamber({ dilution: 10, squaresCounted: 5, counts: [50, 50], minCountPerReplicate: 40 }).lowCount).toBe(false);
  });

  it('handles two zero counts', () => {
    const r = concentrationFromChamber({ dilution: 1, squaresCounted: 25, counts: [0, 0] });
    expect(r.concentrationMillionPerMl).toBe(0);
    expect(r.agree).toBe(true);
    expect(r.allowedDifference).toBe(0);
  });

  it('refuses bad input with a typed error naming the field', () => {
    const base = { dilution: 10, squaresCounted: 5, counts: [50, 50] as [number, number] };
    const fail = (input: typeof base) => {
      try {
        concentrationFromChamber(input);
      } catch (e) {
        expect(e).toBeInstanceOf(SemenInputError);
        return (e as SemenInputError).field;
      }
      return 'no error';
    };
    expect(fail({ ...base, squaresCounted: 0 })).toBe('squaresCounted');
    expect(fail({ ...base, squaresCounted: CHAMBER_MAX_SQUARES + 1 })).toBe('squaresCounted');
    expect(fail({ ...base, squaresCounted: 2.5 })).toBe('squaresCounted');
    expect(fail({ ...base, counts: [-1, 50] })).toBe('counts[0]');
    expect(fail({ ...base, counts: [50, 12.5] })).toBe('counts[1]');
    expect(fail({ ...base, dilution: 0.5 })).toBe('dilution');
    expect(fail({ ...base, dilution: Number.NaN })).toBe('dilution');
    expect(fail({ ...base, counts: [50] as unknown as [number, number] })).toBe('counts');
    // the edges are allowed
    expect(fail({ ...base, squaresCounted: 25, dilution: 1 })).toBe('no error');
  });
});

describe('tryConcentrationFromChamber', () => {
  it('returns a result or the input error instead of throwing', () => {
    const ok = tryConcentrationFromChamber({ dilution: 10, squaresCounted: 5, counts: [50, 50] });
    expect(ok.ok).toBe(true);
    if (ok.ok) expect(ok.concentrationMillionPerMl).toBeCloseTo(25, 12);

    const bad = tryConcentrationFromChamber({ dilution: 10, squaresCounted: 0, counts: [50, 50] });
    expect(bad).toMatchObject({ ok: false, error: { field: 'squaresCounted', code: 'out-of-range' } });
  });
});
