import { describe, expect, it } from 'vitest';
import {
  BREEDING_SOUNDNESS_PMMN_THRESHOLD_BILLION,
  DOSE_DEFAULTS,
  EJACULATE_PAIR_GAP_DEFAULT,
  SEMEN_WARNING_THRESHOLDS,
  breedingSoundness,
  breedingSoundnessFromCollections,
  dosesFromTotals,
  insemDoses,
  pickSecondEjaculate,
  semenErrors,
  semenTotals,
  semenWarnings,
  spermOnBasisBillion,
} from '@/lib/semen/arithmetic';
import { SemenInputError } from '@/lib/semen/errors';

describe('semenTotals', () => {
  it('computes total sperm and PMS for the worked example', () => {
    const t = semenTotals({
      volumeMl: 50,
      concentrationMillionPerMl: 150,
      totalMotilityPct: 70,
      progressiveMotilityPct: 60,
    });
    // 50 mL × 150 × 10^6/mL = 7.5 × 10^9 (computed example, docs/references.md; total = volume ×
    // concentration, Kavak et al. 2003, Reprod Domest Anim 38:167–169)
    expect(t.totalSpermBillion).toBeCloseTo(7.5, 12);
    // 60 % progressive → 4.5 × 10^9 PMS (computed example from Kavak et al. 2003 and Brinsko 2006; docs/references.md)
    expect(t.progressivelyMotileBillion).toBeCloseTo(4.5, 12);
    // 70 % of 7.5 = 5.25 × 10^9 (computed from total × % motile)
    expect(t.totalMotileBillion).toBeCloseTo(5.25, 12);
    // no morphology yet → PMMN unknown
    expect(t.pmmnBillion).toBeNull();
  });

  it('computes PMMN when % normal is known', () => {
    const t = semenTotals({
      volumeMl: 50,
      concentrationMillionPerMl: 150,
      totalMotilityPct: 70,
      progressiveMotilityPct: 60,
      normalPct: 40,
    });
    // PMMN = PMS × % normal = 4.5 × 0.40 = 1.8 × 10^9 (computed from the PMMN definition,
    // Society for Theriogenology wording; docs/references.md)
    expect(t.pmmnBillion).toBeCloseTo(1.8, 12);
  });

  it('treats normalPct null like omitted', () => {
    const t = semenTotals({
      volumeMl: 10,
      concentrationMillionPerMl: 100,
      totalMotilityPct: 50,
      progressiveMotilityPct: 40,
      normalPct: null,
    });
    expect(t.pmmnBillion).toBeNull();
    // 10 × 100 / 1000 = 1.0 × 10^9 (computed from total = volume × concentration)
    expect(t.totalSpermBillion).toBeCloseTo(1, 12);
  });

  it('gives zeros for an empty ejaculate', () => {
    const t = semenTotals({ volumeMl: 0, concentrationMillionPerMl: 0, totalMotilityPct: 0, progressiveMotilityPct: 0, normalPct: 0 });
    expect(t).toEqual({ totalSpermBillion: 0, totalMotileBillion: 0, progressivelyMotileBillion: 0, pmmnBillion: 0 });
  });

  it('refuses impossible input with a typed error', () => {
    const base = { volumeMl: 50, concentrationMillionPerMl: 150, totalMotilityPct: 70, progressiveMotilityPct: 60 };
    expect(() => semenTotals({ ...base, volumeMl: -1 })).toThrow(SemenInputError);
    expect(() => semenTotals({ ...base, concentrationMillionPerMl: Number.NaN })).toThrow(SemenInputError);
    expect(() => semenTotals({ ...base, totalMotilityPct: 101 })).toThrow(SemenInputError);
    expect(() => semenTotals({ ...base, progressiveMotilityPct: 80 })).toThrow(/exceed total motility/);
    expect(() => semenTotals({ ...base, normalPct: -5 })).toThrow(SemenInputError);
    try {
      semenTotals({ ...base, volumeMl: -1 });
    } catch (e) {
      expect((e as SemenInputError).field).toBe('volumeMl');
      expect((e as SemenInputError).code).toBe('negative');
    }
  });
});

describe('insemDoses', () => {
  it('fills 9 doses of 0.5 × 10^9 from 4.5 × 10^9 PMS with nothing left', () => {
    // 9 doses of 500 × 10^6 PMS, remainder 0 (computed example from Kavak et al. 2003 and Brinsko 2006; docs/references.md)
    expect(insemDoses({ availableBillion: 4.5, doseSizeBillion: 0.5 })).toEqual({ doses: 9, remainderBillion: 0 });
  });

  it('fills 4 doses of 1 × 10^9 with 0.5 × 10^9 left', () => {
    // 4 doses of 1 × 10^9 PMS, remainder 0.5 × 10^9 (computed example from Kavak et al. 2003 and Brinsko 2006; docs/references.md)
    const r = insemDoses({ availableBillion: 4.5, doseSizeBillion: 1 });
    expect(r.doses).toBe(4);
    expect(r.remainderBillion).toBeCloseTo(0.5, 12);
  });

  it('does not lose a dose to floating-point error', () => {
    // 0.3 / 0.1 is 2.9999999999999996 in binary floating point; 3 doses (computed by hand)
    expect(insemDoses({ availableBillion: 0.3, doseSizeBillion: 0.1 })).toEqual({ doses: 3, remainderBillion: 0 });
    // PMS computed from the worked example (7.5 × 0.6) still gives 9 doses of 0.5 (computed)
    const pms = semenTotals({ volumeMl: 50, concentrationMillionPerMl: 150, totalMotilityPct: 60, progressiveMotilityPct: 60 })
      .progressivelyMotileBillion;
    expect(insemDoses({ availableBillion: pms, doseSizeBillion: 0.5 }).doses).toBe(9);
    // 1.1 / 0.1 → 11 doses, not 10 (computed by hand)
    expect(insemDoses({ availableBillion: 1.1, doseSizeBillion: 0.1 }).doses).toBe(11);
  });

  it('still floors a genuine shortfall', () => {
    // 4.499 / 0.5 = 8.998 → 8 doses, 0.499 left (computed by hand)
    const r = insemDoses({ availableBillion: 4.499, doseSizeBillion: 0.5 });
    expect(r.doses).toBe(8);
    expect(r.remainderBillion).toBeCloseTo(0.499, 9);
  });

  it('gives 0 doses when there is less than one dose', () => {
    expect(insemDoses({ availableBillion: 0.3, doseSizeBillion: 0.5 })).toEqual({ doses: 0, remainderBillion: 0.3 });
    expect(insemDoses({ availableBillion: 0, doseSizeBillion: 0.5 })).toEqual({ doses: 0, remainderBillion: 0 });
  });

  it('refuses a zero or negative dose size and negative sperm', () => {
    expect(() => insemDoses({ availableBillion: 4.5, doseSizeBillion: 0 })).toThrow(SemenInputError);
    expect(() => insemDoses({ availableBillion: 4.5, doseSizeBillion: -1 })).toThrow(SemenInputError);
    expect(() => insemDoses({ availableBillion: -1, doseSizeBillion: 0.5 })).toThrow(SemenInputError);
    expect(() => insemDoses({ availableBillion: Infinity, doseSizeBillion: 0.5 })).toThrow(SemenInputError);
  });
});

describe('DOSE_DEFAULTS', () => {
  it('holds the lab-setting defaults with their basis and source', () => {
    // fresh 500 × 10^6 PMS (Brinsko 2006, Theriogenology 66:543–550)
    expect(DOSE_DEFAULTS.fresh).toMatchObject({ sizeBillion: 0.5, basis: 'progressive' });
    expect(DOSE_DEFAULTS.fresh.source).toMatch(/Brinsko 2006/);
    // cooled 1 × 10^9 PMS (industry standard, cited from Brinsko 2006)
    expect(DOSE_DEFAULTS.cooled).toMatchObject({ sizeBillion: 1, basis: 'progressive' });
    expect(DOSE_DEFAULTS.cooled.source).toMatch(/Brinsko 2006/);
    // frozen ~800 × 10^6 total sperm (common practice)
    expect(DOSE_DEFAULTS.frozen).toMatchObject({ sizeBillion: 0.8, basis: 'total' });
    expect(DOSE_DEFAULTS.frozen.source).toMatch(/[Cc]ommon practice/);
    expect(Object.isFrozen(DOSE_DEFAULTS)).toBe(true);
  });

  it('counts doses on the right basis', () => {
    const t = semenTotals({ volumeMl: 50, concentrationMillionPerMl: 150, totalMotilityPct: 70, progressiveMotilityPct: 60 });
    expect(spermOnBasisBillion(t, 'total')).toBeCloseTo(7.5, 12);
    // cooled: 4.5 PMS / 1.0 → 4 doses, 0.5 left (computed example from Kavak et al. 2003 and Brinsko 2006; docs/references.md)
    expect(dosesFromTotals(t, DOSE_DEFAULTS.cooled)).toMatchObject({ doses: 4, basis: 'progressive' });
    // frozen: 7.5 total / 0.8 = 9.375 → 9 doses, 0.3 left (computed from the frozen default)
    const frozen = dosesFromTotals(t, DOSE_DEFAULTS.frozen);
    expect(frozen.doses).toBe(9);
    expect(frozen.remainderBillion).toBeCloseTo(0.3, 9);
    expect(frozen.basis).toBe('total');
  });
});

describe('breedingSoundness', () => {
  it('passes at or above 1 × 10^9 PMMN by default', () => {
    // threshold 1 × 10^9 PMMN in the second ejaculate (Society for Theriogenology criterion; docs/references.md)
    expect(BREEDING_SOUNDNESS_PMMN_THRESHOLD_BILLION).toBe(1);
    const pass = breedingSoundness({ secondEjaculatePmmnBillion: 1.8 });
    expect(pass.status).toBe('pass');
    expect(pass.passes).toBe(true);
    expect(pass.margin).toBeCloseTo(0.8, 12);
    expect(pass.percentOfThreshold).toBeCloseTo(180, 9);
    expect(breedingSoundness({ secondEjaculatePmmnBillion: 1 }).passes).toBe(true);
  });

  it('fails below the threshold with a negative margin', () => {
    const fail = breedingSoundness({ secondEjaculatePmmnBillion: 0.6 });
    expect(fail.status).toBe('fail');
    expect(fail.passes).toBe(false);
    expect(fail.margin).toBeCloseTo(-0.4, 12);
  });

  it('uses a lab threshold', () => {
    const r = breedingSoundness({ secondEjaculatePmmnBillion: 1.8, thresholdBillion: 2 });
    expect(r.passes).toBe(false);
    expect(r.thresholdBillion).toBe(2);
  });

  it('reports unknown when PMMN is unknown', () => {
    expect(breedingSoundness({ secondEjaculatePmmnBillion: null })).toMatchObject({
      status: 'unknown',
      passes: null,
      margin: null,
    });
  });

  it('refuses bad input', () => {
    expect(() => breedingSoundness({ secondEjaculatePmmnBillion: -1 })).toThrow(SemenInputError);
    expect(() => breedingSoundness({ secondEjaculatePmmnBillion: 1, thresholdBillion: 0 })).toThrow(SemenInputError);
  });
});

describe('pickSecondEjaculate', () => {
  const at = (hhmm: string) => new Date(`2025-04-10T${hhmm}:00Z`);

  it('defaults to 60 ± 30 min (our choice)', () => {
    expect(EJACULATE_PAIR_GAP_DEFAULT).toEqual({ targetMinutes: 60, toleranceMinutes: 30 });
  });

  it('picks the second of two collections an hour apart, in any input order', () => {
    const second = { id: 'b', collectedAt: at('09:05'), pmmnBillion: 1.2 };
    const first = { id: 'a', collectedAt: at('08:00'), pmmnBillion: 2.1 };
    const r = pickSecondEjaculate([second, first]);
    expect(r.second).toBe(second);
    expect(r.pairs).toHaveLength(1);
    expect(r.pairs[0].first).toBe(first);
    expect(r.pairs[0].gapMinutes).toBe(65);
  });

  it('accepts gaps at the edges of the tolerance and rejects beyond', () => {
    const mk = (gap: number) => [
      { id: 'a', collectedAt: at('08:00'), pmmnBillion: 1 },
      { id: 'b', collectedAt: new Date(at('08:00').getTime() + gap * 60_000), pmmnBillion: 1 },
    ];
    expect(pickSecondEjaculate(mk(30)).second?.id).toBe('b');
    expect(pickSecondEjaculate(mk(90)).second?.id).toBe('b');
    expect(pickSecondEjaculate(mk(29)).second).toBeNull();
    expect(pickSecondEjaculate(mk(91)).second).toBeNull();
    // a lab that allows 30–120 min: 75 ± 45
    expect(pickSecondEjaculate(mk(120), { targetMinutes: 75, toleranceMinutes: 45 }).second?.id).toBe('b');
  });

  it('pairs only back-to-back collections and lists every pair', () => {
    const cs = [
      { id: 'a', collectedAt: at('08:00'), pmmnBillion: 2 },
      { id: 'b', collectedAt: at('08:20'), pmmnBillion: 1.5 },
      { id: 'c', collectedAt: at('09:20'), pmmnBillion: 1.1 },
      { id: 'd', collectedAt: at('10:20'), pmmnBillion: 0.9 },
    ];
    const r = pickSecondEjaculate(cs);
    // a→c is 80 min but b lies between, so c pairs with b only
    expect(r.pairs.map((p) => [p.first.id, p.second.id])).toEqual([
      ['b', 'c'],
      ['c', 'd'],
    ]);
    expect(r.second?.id).toBe('c');
  });

  it('returns null for a single collection, an empty day, or same-time duplicates', () => {
    expect(pickSecondEjaculate([]).second).toBeNull();
    expect(pickSecondEjaculate([{ id: 'a', collectedAt: at('08:00'), pmmnBillion: 1 }]).second).toBeNull();
    const same = [
      { id: 'a', collectedAt: at('08:00'), pmmnBillion: 1 },
      { id: 'b', collectedAt: at('08:00'), pmmnBillion: 1 },
    ];
    expect(pickSecondEjaculate(same, { targetMinutes: 10, toleranceMinutes: 20 }).second).toBeNull();
  });

  it('refuses invalid dates', () => {
    expect(() => pickSecondEjaculate([{ id: 'a', collectedAt: new Date('nope'), pmmnBillion: 1 }])).toThrow(SemenInputError);
  });

  it('judges the second ejaculate against the threshold', () => {
    const cs = [
      { id: 'a', collectedAt: at('08:00'), pmmnBillion: 2.4 },
      { id: 'b', collectedAt: at('09:00'), pmmnBillion: 0.9 },
    ];
    const r = breedingSoundnessFromCollections(cs);
    expect(r.pair?.second.id).toBe('b');
    // 0.9 < 1 × 10^9 → fails although the first ejaculate would pass (Society for Theriogenology criterion)
    expect(r.result?.passes).toBe(false);
    expect(breedingSoundnessFromCollections(cs, { thresholdBillion: 0.8 }).result?.passes).toBe(true);
    expect(breedingSoundnessFromCollections([cs[0]])).toEqual({ pair: null, result: null });
  });
});

describe('semenErrors', () => {
  it('accepts an ordinary ejaculate and an empty form', () => {
    expect(semenErrors({ volumeMl: 50, concentrationMillionPerMl: 150, totalMotilityPct: 70, progressiveMotilityPct: 60 })).toEqual([]);
    expect(semenErrors({})).toEqual([]);
  });

  it('flags impossible values by field', () => {
    const fields = (v: Parameters<typeof semenErrors>[0]) => semenErrors(v).map((e) => e.field);
    expect(fields({ volumeMl: -2 })).toEqual(['volumeMl']);
    expect(fields({ volumeMl: 10, concentrationMillionPerMl: -5 })).toEqual(['concentrationMillionPerMl']);
    expect(fields({ totalMotilityPct: 101 })).toEqual(['totalMotilityPct']);
    expect(fields({ progressiveMotilityPct: -1 })).toEqual(['progressiveMotilityPct']);
    expect(fields({ normalPct: 120 })).toEqual(['normalPct']);
    expect(fields({ totalMotilityPct: 50, progressiveMotilityPct: 60 })).toEqual(['progressiveMotilityPct']);
    expect(fields({ concentrationMillionPerMl: 150 })).toEqual(['volumeMl']);
    expect(fields({ concentrationMillionPerMl: 150, volumeMl: null })).toEqual(['volumeMl']);
    expect(fields({ volumeMl: Number.NaN })).toEqual(['volumeMl']);
  });

  it('gives readable messages', () => {
    const [e] = semenErrors({ totalMotilityPct: 50, progressiveMotilityPct: 60 });
    expect(e.message).toMatch(/cannot exceed total motility/);
  });
});

describe('semenWarnings', () => {
  it('uses the documented thresholds', () => {
    // common practice / from memory (see the constant's comment)
    expect(SEMEN_WARNING_THRESHOLDS).toEqual({
      maxVolumeMl: 200,
      maxConcentrationMillionPerMl: 1000,
      minConcentrationMillionPerMl: 10,
      minProgressiveMotilityPct: 20,
    });
  });

  it('warns about unusual but possible values', () => {
    const fields = (v: Parameters<typeof semenWarnings>[0]) => semenWarnings(v).map((w) => w.field);
    expect(fields({ volumeMl: 250, concentrationMillionPerMl: 150 })).toEqual(['volumeMl']);
    expect(fields({ volumeMl: 40, concentrationMillionPerMl: 1200 })).toEqual(['concentrationMillionPerMl']);
    expect(fields({ volumeMl: 40, concentrationMillionPerMl: 5 })).toEqual(['concentrationMillionPerMl']);
    expect(fields({ totalMotilityPct: 30, progressiveMotilityPct: 10 })).toEqual(['progressiveMotilityPct']);
  });

  it('does not warn at the thresholds or for ordinary values', () => {
    expect(semenWarnings({ volumeMl: 200, concentrationMillionPerMl: 1000, totalMotilityPct: 20, progressiveMotilityPct: 20 })).toEqual([]);
    expect(semenWarnings({ volumeMl: 50, concentrationMillionPerMl: 10 })).toEqual([]);
  });

  it('leaves values in error to semenErrors', () => {
    // progressive > total is an error; no "low progressive" warning on top
    expect(semenWarnings({ totalMotilityPct: 5, progressiveMotilityPct: 10 })).toEqual([]);
    expect(semenWarnings({ volumeMl: -300 })).toEqual([]);
  });

  it('takes lab thresholds', () => {
    const w = semenWarnings({ volumeMl: 150 }, { ...SEMEN_WARNING_THRESHOLDS, maxVolumeMl: 120 });
    expect(w).toHaveLength(1);
    expect(w[0].message).toMatch(/120 mL/);
  });
});
