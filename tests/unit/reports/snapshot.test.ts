import { describe, expect, it } from 'vitest';
import { exampleReportInput, exampleReportSnapshot } from '@/lib/reports/fixture';
import {
  REPORT_SNAPSHOT_SCHEMA_VERSION,
  ReportSnapshotError,
  buildReportSnapshot,
  markSuperseded,
  parseReportSnapshot,
  safeParseReportSnapshot,
  type ReportSnapshot,
} from '@/lib/reports/snapshot';

type Mutable = Record<string, any>;
/** A deep copy of the fixture as stored JSON, changed by `edit`. */
function stored(edit: (s: Mutable) => void, base: ReportSnapshot = exampleReportSnapshot()): unknown {
  const copy = JSON.parse(JSON.stringify(base)) as Mutable;
  edit(copy);
  return copy;
}
const refusedAt = (value: unknown) => {
  const r = safeParseReportSnapshot(value);
  expect(r.ok).toBe(false);
  return r.ok ? [] : r.error.issues.map((i) => i.path);
};

describe('the example report (fixture)', () => {
  const s = exampleReportSnapshot();

  it('holds the figures worked out from its counts', () => {
    const m = s.morphology;
    expect(m.cellsCounted).toBe(263);
    expect(m.normalCount).toBe(81);
    // 81/263 → 0.2553–0.3662: Newcombe 1998, "Two-sided confidence intervals for the single
    // proportion", Stat Med 17:857–872, method 3 (Wilson score), its worked example.
    expect(m.normalInterval!.lowerPct).toBeCloseTo(25.53, 2);
    expect(m.normalInterval!.upperPct).toBeCloseTo(36.62, 2);
    expect(m.pctNormal).toBeCloseTo((81 / 263) * 100, 10);
    // Total = volume × concentration (Kavak et al. 2003): 38 mL × 165 × 10^6/mL = 6.27 × 10^9;
    // PMS at 45 % = 2.8215 × 10^9; PMMN = PMS × 81/263 = 0.86898 × 10^9 (computed by hand).
    expect(s.semen.totalSpermBillion).toBeCloseTo(6.27, 10);
    expect(s.semen.progressivelyMotileBillion).toBeCloseTo(2.8215, 10);
    expect(s.semen.pmmnBillion).toBeCloseTo(0.86898, 5);
    // Doses (computed): 2.8215 / 0.5 → 5 fresh; / 1.0 → 2 cooled; 6.27 total / 0.8 → 7 frozen.
    expect(s.semen.doses.map((d) => [d.kind, d.doses])).toEqual([['fresh', 5], ['cooled', 2], ['frozen', 7]]);
    expect(s.breedingSoundness).toMatchObject({ role: 'second', status: 'fail' });
    // The fever lasted 4–6 May: 6 May + 57 + 10 days = 12 July, 69 days from 4 May; 26 May is day 23
    // counting 4 May as day 1 (computed by hand).
    expect(s.healthEvents[0]).toMatchObject({ windowClearsOn: '2026-07-12', dayOfWindow: 23, windowDays: 69 });
    expect(m.defectFrequencies.totalDefects).toBe(226);
  });

  it('is version 2, superseding version 1, with a valid code', () => {
    expect(s.schemaVersion).toBe(REPORT_SNAPSHOT_SCHEMA_VERSION);
    expect(s.report.version).toBe(2);
    expect(s.report.supersedes).toMatchObject({ version: 1 });
    expect(exampleReportSnapshot({ version: 1 }).report.supersedes).toBeNull();
  });
});

describe('a stored snapshot', () => {
  it('survives the trip through JSON text unchanged', () => {
    const s = exampleReportSnapshot();
    const text = JSON.stringify(s);
    expect(parseReportSnapshot(text)).toEqual(s);
    expect(parseReportSnapshot(JSON.parse(text))).toEqual(s);
    expect(JSON.parse(JSON.stringify(parseReportSnapshot(text)))).toEqual(JSON.parse(text));
    // A single-read report round-trips too.
    const single = exampleReportSnapshot({ singleRead: true });
    expect(parseReportSnapshot(JSON.stringify(single))).toEqual(single);
  });

  it('is refused when it is not a report at all', () => {
    expect(() => parseReportSnapshot('{not json')).toThrow(ReportSnapshotError);
    expect(() => parseReportSnapshot(null)).toThrow(/not an object/);
    expect(() => parseReportSnapshot([])).toThrow(/not an object/);
    expect(() => parseReportSnapshot(stored((s) => delete s.schemaVersion))).toThrow(/no schemaVersion/);
    expect(() => parseReportSnapshot(stored((s) => (s.schemaVersion = 2)))).toThrow(/schemaVersion 2; this version of Fieldmark reads up to 1/);
  });

  it('names the place of each problem', () => {
    const cases: [string, (s: Mutable) => void, string][] = [
      ['an unknown field', (s) => (s.stallion.colour = 'bay'), 'stallion'],
      ['a missing section', (s) => delete s.people, 'people'],
      ['a time of day instead of an instant', (s) => (s.collection.collectedAt = '26/05/2026 08:40'), 'collection.collectedAt'],
      ['a negative volume', (s) => (s.semen.volumeMl = -1), 'semen.volumeMl'],
      ['NaN stored as null where a number is needed', (s) => (s.morphology.cellsCounted = null), 'morphology.cellsCounted'],
      ['a class count that no longer adds up', (s) => (s.morphology.perClass[1].count += 1), 'morphology.cellsCounted'],
      ['a percentage that does not match its count', (s) => (s.morphology.perClass[0].pct = 31.5), 'morphology.perClass.0.pct'],
      ['a group total that does not match its classes', (s) => (s.morphology.perGroup[1].count = 36), 'morphology.perGroup.1.count'],
      ['an interval that misses % normal', (s) => (s.morphology.normalInterval.upperPct = 29), 'morphology.normalInterval'],
      ['a non-sperm class in the sperm rows', (s) => s.morphology.perClass.push({ key: 'leukocyte', name: 'Leukocyte', group: 'other', count: 0, pct: 0 }), 'morphology.perClass'],
      ['a non-sperm class counted as sperm', (s) => (s.settings.classSet.classes[10].countsAsSperm = true), 'settings.classSet.classes.10.countsAsSperm'],
      ['defects fewer than abnormal cells', (s) => {
        const d = s.morphology.defectFrequencies;
        d.perClass.forEach((f: Mutable) => ((f.cellsWithDefect = 1), (f.pctOfCells = (1 / 263) * 100)));
        d.totalDefects = d.perClass.length;
        d.sumPct = (d.totalDefects / 263) * 100;
      }, 'morphology.defectFrequencies.totalDefects'],
      ['a PMMN that is not PMS × % normal', (s) => (s.semen.pmmnBillion = 1.2), 'semen.pmmnBillion'],
      ['a total that is not volume × concentration', (s) => (s.semen.volumeMl = 40), 'semen.totalSpermBillion'],
      ['a dose size other than the lab setting', (s) => (s.semen.doses[0].sizeBillion = 0.25), 'semen.doses.0'],
      ['doses that do not add up', (s) => (s.semen.doses[1].doses = 3), 'semen.doses.1'],
      ['a single read where the lab requires a second', (s) => ((s.morphology.source = 'single'), (s.agreement = null), (s.people.checkedBy = null)), 'morphology.source'],
      ['a settled read without agreement figures', (s) => (s.agreement = null), 'agreement'],
      ['an acceptable-difference verdict that contradicts its figures', (s) => (s.agreement.acceptableDifference.differ = true), 'agreement.acceptableDifference.differ'],
      ['a health event whose window has cleared', (s) => (s.healthEvents[0].dayOfWindow = 80), 'healthEvents.0.dayOfWindow'],
      ['a window that clears on the wrong day', (s) => (s.healthEvents[0].windowClearsOn = '2026-07-11'), 'healthEvents.0.windowClearsOn'],
      ['a verification code with a typo', (s) => (s.report.verificationCode = s.report.verificationCode.replace(/^./, (c: string) => (c === 'A' ? 'B' : 'A'))), 'report.verificationCode'],
      ['version 2 that supersedes nothing', (s) => (s.report.supersedes = null), 'report.supersedes'],
      ['superseded by an earlier version', (s) => (s.report.supersededBy = { version: 1, reason: 'x', by: 'y', at: '2026-05-30T10:00:00.000Z' }), 'report.supersededBy.version'],
      ['no cautions', (s) => (s.cautions = []), 'cautions'],
    ];
    for (const [what, edit, path] of cases) {
      const paths = refusedAt(stored(edit));
      expect(paths, what).toContain(path);
    }
  });

  it('keeps every problem in the error for the log', () => {
    const r = safeParseReportSnapshot(stored((s) => ((s.semen.pmmnBillion = 1.2), (s.morphology.perClass[0].pct = 50))));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.message).toMatch(/^The report does not fit schemaVersion 1: /);
      expect(r.error.issues.map((i) => i.path)).toEqual(expect.arrayContaining(['semen.pmmnBillion', 'morphology.perClass.0.pct']));
    }
  });
});

describe('building a snapshot', () => {
  it('turns Dates into ISO instants, drops undefined keys and adds the cautions', () => {
    const input = exampleReportInput();
    const withDate = { ...input, people: { ...input.people, signedAt: new Date(input.people.signedAt) as unknown as string }, extra: undefined };
    const s = buildReportSnapshot(withDate);
    expect(s.people.signedAt).toBe(input.people.signedAt);
    expect('extra' in s).toBe(false);
    expect(s.cautions.some((c) => /never replace, a veterinarian/.test(c.text))).toBe(true);
  });

  it('shares nothing with the caller’s objects', () => {
    const input = exampleReportInput();
    const s = buildReportSnapshot(input);
    input.stallion.name = 'Changed afterwards';
    expect(s.stallion.name).toBe('Thistlewick Lantern');
  });

  it('refuses figures that contradict each other', () => {
    expect(() => exampleReportSnapshot({ patch: (i) => (i.morphology.normalCount = 80) })).toThrow(ReportSnapshotError);
  });

  it('marks a copy superseded and leaves the original as signed', () => {
    const v1 = exampleReportSnapshot({ version: 1 });
    const shown = markSuperseded(v1, { version: 2, reason: 'Interpretation completed.', by: 'Dr Maren Kettleby', at: '2026-05-29T13:50:00.000Z' });
    expect(shown.report.supersededBy?.version).toBe(2);
    expect(v1.report.supersededBy).toBeNull();
    expect(() => markSuperseded(v1, { version: 1, reason: 'x', by: 'y', at: '2026-05-29T13:50:00.000Z' })).toThrow(ReportSnapshotError);
  });
});
