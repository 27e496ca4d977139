import { describe, expect, it } from 'vitest';
import type { CollectionAgreement } from '@/lib/agreement/agreement';
import { DEFAULT_CLASS_SET } from '@/lib/class-sets/default-set';
import { morphologyOfRead } from '@/lib/morphology/engine';
import { countMarks } from '@/lib/morphology/tally';
import { composeReportDraft, contentOfSnapshot, labDaysBetween, preparationLabels, reportAgreementOf, signDraft, type ReportDraftInputs } from '@/lib/reports/draft';
import { exampleReportSnapshot, exampleVerificationCode } from '@/lib/reports/fixture';
import { parseReportSnapshot } from '@/lib/reports/snapshot';
import { LAB_SETTINGS_DEFAULTS } from '@/lib/settings/lab-settings';
import { exampleCells } from '../../support/report-collections';

// The draft maps the engine's figures onto the snapshot: built from the example report's own cells
// (81 normal of 263, with its extra defect tags), it must carry exactly the example's morphology,
// which the fixture works out from its counts by hand.
const classSet = { name: DEFAULT_CLASS_SET.name, classes: DEFAULT_CLASS_SET.classes };
const morphology = morphologyOfRead({ classSet, targetCells: 200 }, countMarks(exampleCells().map((c) => ({ classKey: c.classKey, tags: c.tags, imageId: '1' }))));

function inputs(over: Partial<ReportDraftInputs> = {}): ReportDraftInputs {
  return {
    settings: { ...LAB_SETTINGS_DEFAULTS, timeZone: 'Europe/London', labName: 'Quillfield Equine Reproduction Centre', labAddress: 'Mill Lane, Quillfield' },
    stallion: { id: 1, name: 'Thistlewick Lantern', breed: 'Warmblood', registration: '956000000001014', foalingYear: 2014, ownerName: 'Corwen Ashdale' },
    collection: {
      id: 214, collectedAt: '2026-05-26T07:40:00.000Z', numberThatDay: 2, previousCollectedAt: '2026-05-26T06:35:00.000Z', preparation: 'eosin_nigrosin', optics: 'bright_field',
      magnification: 1000, collectedBy: 'Tamsin Reedway', remarks: null, volumeMl: 38, concentrationMillionPerMl: 165, concentrationMethod: 'chamber', totalMotilityPct: 62, progressiveMotilityPct: 45,
    },
    around: [{ id: 213, collectedAt: '2026-05-26T06:35:00.000Z' }, { id: 214, collectedAt: '2026-05-26T07:40:00.000Z' }],
    morphology: { basis: 'settled', classSet, morphology },
    agreement: null,
    healthEvents: [],
    veterinarian: { remarks: 'r', interpretation: 'i' },
    people: { readBy: 'Tamsin Reedway', checkedBy: 'Orrin Halvard', settledBy: null },
    ...over,
  };
}

const agreement = (over: Partial<CollectionAgreement> = {}): CollectionAgreement => ({
  pairs: 257, spermPairs: 251, onlyFirst: 7, onlySecond: 11, classKeys: [], confusion: {}, observedAgreement: 206 / 251, expectedAgreement: 0.2, kappa: 0.85, band: 'almost perfect',
  percentNormal: { first: 30.2, second: 32.8 }, cellsCounted: { first: 258, second: 262 }, acceptableDifference: { difference: 2.6, limit: 8, differ: false }, disagreements: [], perImage: [],
  ...over,
});

describe('composeReportDraft', () => {
  const example = exampleReportSnapshot();

  it("carries the example's morphology exactly, worked out by the engine from the cells", () => {
    const d = composeReportDraft(inputs());
    // % abnormal: the fixture takes 100 − % normal, the engine abnormal / cells; they differ in the 14th digit.
    const { pctAbnormal, ...rest } = d.morphology!;
    const { pctAbnormal: expectedAbnormal, ...expected } = example.morphology;
    expect(rest).toEqual(expected);
    expect(pctAbnormal).toBeCloseTo(expectedAbnormal!, 10);
    // 81/263 → 25.53–36.62 % (Newcombe 1998, Stat Med 17:857–872, method 3).
    expect(d.morphology!.normalInterval!.lowerPct).toBeCloseTo(25.53, 2);
    expect(d.morphology!.normalInterval!.upperPct).toBeCloseTo(36.62, 2);
  });

  it('does the semen arithmetic at the lab’s dose sizes (Kavak et al. 2003; Brinsko 2006), as the example does', () => {
    const d = composeReportDraft(inputs());
    expect(d.semen).toEqual(example.semen);
    // 38 mL × 165 × 10^6/mL = 6.27 × 10^9 (computed); 45 % progressive → 2.8215; × 81/263 → 0.869 (computed).
    expect(d.semen.totalSpermBillion).toBeCloseTo(6.27, 10);
    expect(d.semen.pmmnBillion).toBeCloseTo(0.86898, 5);
  });

  it('finds the breeding-soundness pair (65 min apart, the second ejaculate) and its settings', () => {
    const d = composeReportDraft(inputs());
    expect(d.breedingSoundness).toEqual({ role: 'second', firstCollectedAt: '2026-05-26T06:35:00.000Z', gapMinutes: 65, pmmnBillion: d.semen.pmmnBillion, thresholdBillion: 1, status: 'fail' });
    expect(d.settings.doses).toEqual(example.settings.doses);
    expect(d.settings.classSet).toEqual(example.settings.classSet);
    expect(d.collection).toMatchObject({ preparation: 'Stained smear', stain: 'Eosin–nigrosin', optics: 'Bright field', ejaculateOfDay: 2, daysSincePrevious: 0 });
  });

  it('has no morphology before a read is submitted, and previews an unchecked first read without making it signable', () => {
    const none = composeReportDraft(inputs({ morphology: null }));
    expect(none.morphology).toBeNull();
    expect(none.semen.pmmnBillion).toBeNull();
    expect(none.semen.normalPctUsed).toBeNull();
    const preview = composeReportDraft(inputs({ morphology: { basis: 'first-unchecked', classSet, morphology } }));
    expect(preview.basis).toBe('first-unchecked');
    expect(preview.morphology!.pctNormal).toBeCloseTo((81 / 263) * 100, 10);
    expect(() => signDraft(preview, { signedBy: { name: 'Dr Maren Kettleby', qualifications: null }, signedAt: '2026-05-29T14:05:00.000Z', version: 1, verificationCode: exampleVerificationCode(), supersedes: null })).toThrow(RangeError);
  });
});

describe('reportAgreementOf', () => {
  it('maps the agreement figures, counting the paired sperm cells behind kappa', () => {
    expect(reportAgreementOf(agreement())).toEqual({
      pairs: 251, onlyFirst: 7, onlySecond: 11, firstCellsCounted: 258, secondCellsCounted: 262, observedAgreement: 206 / 251, kappa: 0.85, band: 'almost_perfect',
      firstPctNormal: 30.2, secondPctNormal: 32.8, acceptableDifference: { difference: 2.6, limit: 8, differ: false },
    });
  });

  it('gives nothing when the figures are incomplete', () => {
    expect(reportAgreementOf(agreement({ observedAgreement: null, spermPairs: 0 }))).toBeNull();
    expect(reportAgreementOf(agreement({ percentNormal: { first: null, second: 30 } }))).toBeNull();
    expect(reportAgreementOf(agreement({ acceptableDifference: null }))).toBeNull();
  });
});

describe('signDraft', () => {
  const sig = { signedBy: { name: 'Dr Maren Kettleby', qualifications: null }, signedAt: '2026-05-29T14:05:00.000Z', version: 1, verificationCode: exampleVerificationCode(), supersedes: null };

  it('freezes a settled draft into a snapshot that reads back as it was', () => {
    const s = signDraft(composeReportDraft(inputs({ agreement: agreement({ percentNormal: { first: 30.2, second: 32.8 }, acceptableDifference: { difference: 2.6, limit: 8, differ: false } }) })), sig);
    expect(parseReportSnapshot(JSON.parse(JSON.stringify(s)))).toEqual(s);
    expect(s.report).toEqual({ version: 1, verificationCode: sig.verificationCode, supersedes: null, supersededBy: null });
    expect(s.people).toMatchObject({ readBy: { name: 'Tamsin Reedway' }, checkedBy: { name: 'Orrin Halvard' }, signedAt: sig.signedAt });
    expect(contentOfSnapshot(s).basis).toBe('settled');
  });

  it('freezes a single read without agreement figures, only where the lab allows it', () => {
    const single = inputs({ morphology: { basis: 'single', classSet, morphology }, people: { readBy: 'Tamsin Reedway', checkedBy: null, settledBy: null } });
    const s = signDraft(composeReportDraft({ ...single, settings: { ...single.settings, secondReadRequired: false } }), sig);
    expect(s.morphology.source).toBe('single');
    expect(s.agreement).toBeNull();
    // The snapshot itself refuses a single-read report under "second read required".
    expect(() => signDraft(composeReportDraft(single), sig)).toThrow(/single-read report needs/);
  });

  it('refuses a settled draft without agreement figures (the snapshot checks itself)', () => {
    expect(() => signDraft(composeReportDraft(inputs()), sig)).toThrow(/agreement/);
  });
});

describe('the report’s words and days', () => {
  it('names each preparation with its stain', () => {
    expect(preparationLabels('fixed_wet_mount')).toEqual({ preparation: 'Fixed wet mount', stain: null });
    expect(preparationLabels('other_stain')).toEqual({ preparation: 'Stained smear', stain: 'Other stain' });
  });

  it('counts days since the previous collection on the lab’s calendar, across a clock change (common practice)', () => {
    // Europe/London moves to BST on 29 March 2026: 23:30 UTC on the 29th is 00:30 on the 30th there.
    expect(labDaysBetween('2026-03-28T23:30:00Z', '2026-03-29T23:30:00Z', 'Europe/London')).toBe(2);
    expect(labDaysBetween('2026-03-28T23:30:00Z', '2026-03-29T23:30:00Z', 'UTC')).toBe(1);
    expect(labDaysBetween('2026-05-26T06:35:00Z', '2026-05-26T07:40:00Z', 'Europe/London')).toBe(0);
  });
});
