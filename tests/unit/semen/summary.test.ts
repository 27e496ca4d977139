import { describe, expect, it } from 'vitest';
import { LAB_SETTINGS_DEFAULTS, mergeLabSettings } from '@/lib/settings/lab-settings';
import { soundnessForCollection, summariseCollection } from '@/lib/semen/summary';

describe('summariseCollection', () => {
  it('works out totals and doses at the lab dose sizes (computed example from Kavak et al. 2003 and Brinsko 2006, docs/references.md)', () => {
    // 50 mL × 150 × 10^6/mL = 7.5 × 10^9 (Kavak et al. 2003: total = volume × concentration); 60 % → 4.5 × 10^9 PMS;
    // 9 fresh doses of 0.5 × 10^9 PMS (Brinsko 2006), 4 cooled doses of 1 × 10^9 with 0.5 left, 9 frozen of 0.8 × 10^9 total with 0.3 left (computed).
    const s = summariseCollection({ volumeMl: 50, concentrationMillionPerMl: 150, totalMotilityPct: 70, progressiveMotilityPct: 60 }, LAB_SETTINGS_DEFAULTS, 80);
    expect(s.totals!.totalSpermBillion).toBeCloseTo(7.5, 10);
    expect(s.totals!.progressivelyMotileBillion).toBeCloseTo(4.5, 10);
    expect(s.totals!.pmmnBillion).toBeCloseTo(3.6, 10); // 4.5 × 80 % (computed)
    const dose = Object.fromEntries(s.doses.map((d) => [d.kind, d]));
    expect([dose.fresh.doses, dose.fresh.remainderBillion]).toEqual([9, 0]);
    expect(dose.cooled.doses).toBe(4);
    expect(dose.cooled.remainderBillion).toBeCloseTo(0.5, 10);
    expect(dose.frozen.doses).toBe(9);
    expect(dose.frozen.remainderBillion).toBeCloseTo(0.3, 10);
  });

  it('says which values are missing instead of guessing, and keeps PMMN waiting without morphology', () => {
    const s = summariseCollection({ volumeMl: 50, concentrationMillionPerMl: null, totalMotilityPct: 70, progressiveMotilityPct: null }, LAB_SETTINGS_DEFAULTS, null);
    expect(s.totals).toBeNull();
    expect(s.missing).toEqual(['concentration', 'progressive motility']);
    const t = summariseCollection({ volumeMl: 50, concentrationMillionPerMl: 150, totalMotilityPct: 70, progressiveMotilityPct: 60 }, LAB_SETTINGS_DEFAULTS, null);
    expect(t.totals!.pmmnBillion).toBeNull();
  });

  it('uses the lab’s own dose sizes', () => {
    const s = summariseCollection({ volumeMl: 50, concentrationMillionPerMl: 150, totalMotilityPct: 70, progressiveMotilityPct: 60 }, { ...LAB_SETTINGS_DEFAULTS, cooledDoseBillion: 1.5 }, null);
    expect(s.doses.find((d) => d.kind === 'cooled')!.doses).toBe(3); // 4.5 / 1.5 (computed)
  });
});

describe('soundnessForCollection', () => {
  const pair = [
    { id: 1, collectedAt: '2026-04-21T08:00:00Z', pmmnBillion: 2.1 },
    { id: 2, collectedAt: '2026-04-21T09:00:00Z', pmmnBillion: 1.2 },
  ];
  it('judges the second of two ejaculates an hour apart against the threshold (Society for Theriogenology criterion, ≥ 1 × 10^9 PMMN)', () => {
    const second = soundnessForCollection(2, pair, LAB_SETTINGS_DEFAULTS);
    expect(second.role).toBe('second');
    if (second.role === 'second') {
      expect(second.gapMinutes).toBe(60);
      expect(second.result.passes).toBe(true);
    }
    expect(soundnessForCollection(1, pair, LAB_SETTINGS_DEFAULTS)).toMatchObject({ role: 'first', secondId: 2 });
    const low = soundnessForCollection(2, [pair[0], { ...pair[1], pmmnBillion: 0.9 }], LAB_SETTINGS_DEFAULTS);
    expect(low.role === 'second' && low.result.passes).toBe(false);
  });

  it('applies no check to collections not about an hour apart, and follows the lab’s gap setting', () => {
    const far = [pair[0], { ...pair[1], collectedAt: '2026-04-21T11:00:00Z' }];
    expect(soundnessForCollection(2, far, LAB_SETTINGS_DEFAULTS).role).toBe('none');
    expect(soundnessForCollection(2, far, { ...LAB_SETTINGS_DEFAULTS, pairGapMinutes: 180, pairToleranceMinutes: 30 }).role).toBe('second');
  });
});

describe('mergeLabSettings', () => {
  it('takes stored values over defaults and ignores invalid ones', () => {
    expect(mergeLabSettings(null)).toEqual(LAB_SETTINGS_DEFAULTS);
    expect(mergeLabSettings({ targetCells: 150 }).targetCells).toBe(150);
    expect(mergeLabSettings({ targetCells: -4 })).toEqual(LAB_SETTINGS_DEFAULTS);
  });
});
