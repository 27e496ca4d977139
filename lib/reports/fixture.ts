/**
 * An example signed report of an invented collection at the invented Quillfield Equine
 * Reproduction Centre: the second ejaculate of Thistlewick Lantern on 26 May 2026, 22 days after
 * his fever of 4 May, scored by two readers and settled. Used by the tests, the PDF benchmark and
 * anyone who wants to see a report without a database.
 *
 * Counts are chosen by hand; everything derived from them is worked out by the project's own
 * arithmetic (semen totals, doses, Wilson interval, window), as the signing code will. 81 normal of
 * 263 cells is Newcombe's (1998) worked example, so the printed interval can be checked against
 * the paper: 25.53–36.62 %.
 */
import { DEFAULT_CLASS_SET } from '@/lib/class-sets/default-set';
import { acceptableDifference } from '@/lib/morphology/replicate';
import { wilsonInterval } from '@/lib/morphology/wilson';
import { DOSE_DEFAULTS, dosesFromTotals, semenTotals } from '@/lib/semen/arithmetic';
import { mulberry32 } from '@/lib/synthetic/prng';
import { spermatogenicWindow } from '@/lib/windows/window';
import { SPERM_GROUPS, buildReportSnapshot, type ReportSnapshot, type ReportSnapshotInput, type SpermGroup } from './snapshot';
import { newVerificationCode } from './verification';

const DAY_MS = 86_400_000;

/** Settled read: cells per primary class (263 sperm cells, 81 normal). */
export const EXAMPLE_CLASS_COUNTS: Readonly<Record<string, number>> = Object.freeze({
  normal: 81,
  abnormal_head: 22,
  acrosome_defect: 9,
  nuclear_vacuoles: 6,
  abnormal_midpiece: 24,
  proximal_droplet: 41,
  distal_droplet: 33,
  bent_coiled_tail: 28,
  detached_head: 12,
  other: 7,
  round_cell: 6,
  leukocyte: 3,
});

/** Extra defect tags on abnormal cells, per defect class (a cell carries each defect once). */
export const EXAMPLE_EXTRA_TAGS: Readonly<Record<string, number>> = Object.freeze({
  abnormal_head: 3,
  acrosome_defect: 2,
  nuclear_vacuoles: 4,
  abnormal_midpiece: 5,
  proximal_droplet: 9,
  distal_droplet: 6,
  bent_coiled_tail: 14,
  detached_head: 0,
  other: 1,
});

/** A deterministic, valid verification code for examples (a real report draws one with crypto). */
export function exampleVerificationCode(seed = 20260526): string {
  const rnd = mulberry32(seed);
  return newVerificationCode((max) => Math.floor(rnd() * max));
}

export interface ExampleOptions {
  /** 1 or 2 (default 2, amending version 1). */
  version?: 1 | 2;
  /** Report from a single read where the lab allows it (no agreement figures). */
  singleRead?: boolean;
  /** Override any part of the input before it is frozen. */
  patch?: (input: ReportSnapshotInput) => void;
}

export function exampleReportInput(options: ExampleOptions = {}): ReportSnapshotInput {
  const { version = 2, singleRead = false } = options;
  const classes = DEFAULT_CLASS_SET.classes.map((c) => ({ key: c.key, name: c.name, group: c.group, countsAsSperm: c.countsAsSperm }));
  const sperm = classes.filter((c) => c.countsAsSperm);
  const n = sperm.reduce((a, c) => a + (EXAMPLE_CLASS_COUNTS[c.key] ?? 0), 0);
  const normalCount = sperm.filter((c) => c.group === 'normal').reduce((a, c) => a + (EXAMPLE_CLASS_COUNTS[c.key] ?? 0), 0);
  const pct = (k: number) => (k / n) * 100;
  const interval = wilsonInterval(normalCount, n)!;
  const pctNormal = pct(normalCount);

  const timeZone = 'Europe/London';
  const collectedAt = '2026-05-26T07:40:00.000Z'; // 08:40 BST
  const firstCollectedAt = '2026-05-26T06:35:00.000Z';
  const semen = { volumeMl: 38, concentrationMillionPerMl: 165, totalMotilityPct: 62, progressiveMotilityPct: 45 };
  const totals = semenTotals({ ...semen, normalPct: pctNormal });
  const doseSettings = {
    fresh: { sizeBillion: DOSE_DEFAULTS.fresh.sizeBillion, basis: DOSE_DEFAULTS.fresh.basis },
    cooled: { sizeBillion: DOSE_DEFAULTS.cooled.sizeBillion, basis: DOSE_DEFAULTS.cooled.basis },
    frozen: { sizeBillion: DOSE_DEFAULTS.frozen.sizeBillion, basis: DOSE_DEFAULTS.frozen.basis },
  };
  // The fever lasted 4–6 May: its window runs 57 + 10 days past its last day (lib/windows/window.ts).
  const window = spermatogenicWindow('2026-05-04', { spermatogenesisDays: 57, epididymalTransitDays: 10 }, '2026-05-06');
  const isoDay = (d: Date) => d.toISOString().slice(0, 10);
  const dayOfWindow = Math.floor(Date.parse(collectedAt) / DAY_MS) - Math.floor(window.start.getTime() / DAY_MS) + 1;

  const first = { cells: 258, normal: 78 };
  const second = { cells: 262, normal: 86 };
  const firstPct = (first.normal / first.cells) * 100;
  const secondPct = (second.normal / second.cells) * 100;
  const replicate = acceptableDifference(firstPct, secondPct, [first.cells, second.cells]);

  const defectClasses = sperm.filter((c) => c.group !== 'normal');
  const defectCells = defectClasses.map((c) => ({
    key: c.key,
    name: c.name,
    group: c.group as Exclude<SpermGroup, 'normal'>,
    cellsWithDefect: (EXAMPLE_CLASS_COUNTS[c.key] ?? 0) + (EXAMPLE_EXTRA_TAGS[c.key] ?? 0),
  }));
  const totalDefects = defectCells.reduce((a, c) => a + c.cellsWithDefect, 0);

  const people = {
    readBy: { name: 'Tamsin Reedway', qualifications: null },
    checkedBy: singleRead ? null : { name: 'Orrin Halvard', qualifications: null },
    settledBy: null,
    signedBy: { name: 'Dr Maren Kettleby', qualifications: 'BVSc, equine reproduction' },
    signedAt: version === 2 ? '2026-05-29T14:05:00.000Z' : '2026-05-27T16:20:00.000Z',
  };

  const input: ReportSnapshotInput = {
    lab: { name: 'Quillfield Equine Reproduction Centre', address: 'Mill Lane, Quillfield' },
    settings: {
      doses: doseSettings,
      bseThresholdBillion: 1,
      ejaculatePair: { gapMinutes: 60, toleranceMinutes: 30 },
      targetCells: 200,
      window: { spermatogenesisDays: 57, epididymalTransitDays: 10 },
      timeZone,
      secondReadRequired: !singleRead,
      classSet: { name: DEFAULT_CLASS_SET.name, classes },
    },
    stallion: {
      id: 1,
      name: 'Thistlewick Lantern',
      breed: 'Warmblood',
      registration: '956000000001014',
      foalingYear: 2014,
      owner: { name: 'Corwen Ashdale' },
    },
    collection: {
      id: 214,
      collectedAt,
      ejaculateOfDay: 2,
      daysSincePrevious: 0,
      preparation: 'Stained smear',
      stain: 'Eosin–nigrosin',
      optics: 'Bright field',
      magnification: 1000,
      collectedBy: 'Tamsin Reedway',
      notes: 'Second ejaculate, 65 minutes after the first, for the breeding-soundness check.',
    },
    semen: {
      ...semen,
      concentrationMethod: 'chamber',
      totalSpermBillion: totals.totalSpermBillion,
      totalMotileBillion: totals.totalMotileBillion,
      progressivelyMotileBillion: totals.progressivelyMotileBillion,
      pmmnBillion: totals.pmmnBillion,
      normalPctUsed: pctNormal,
      doses: (['fresh', 'cooled', 'frozen'] as const).map((kind) => {
        const d = dosesFromTotals(totals, doseSettings[kind]);
        return { kind, sizeBillion: doseSettings[kind].sizeBillion, basis: d.basis, doses: d.doses, remainderBillion: d.remainderBillion };
      }),
    },
    breedingSoundness: {
      role: 'second',
      firstCollectedAt,
      gapMinutes: 65,
      pmmnBillion: totals.pmmnBillion,
      thresholdBillion: 1,
      status: (totals.pmmnBillion ?? 0) >= 1 ? 'pass' : 'fail',
    },
    morphology: {
      source: singleRead ? 'single' : 'settled',
      cellsCounted: n,
      target: 200,
      targetReached: n >= 200,
      normalCount,
      abnormalCount: n - normalCount,
      pctNormal,
      pctAbnormal: 100 - pctNormal,
      normalInterval: { lowerPct: interval.lower * 100, upperPct: interval.upper * 100, confidencePct: 95, method: 'wilson' },
      perClass: sperm.map((c) => ({
        key: c.key,
        name: c.name,
        group: c.group as SpermGroup,
        count: EXAMPLE_CLASS_COUNTS[c.key] ?? 0,
        pct: pct(EXAMPLE_CLASS_COUNTS[c.key] ?? 0),
      })),
      perGroup: SPERM_GROUPS.map((g) => {
        const k = sperm.filter((c) => c.group === g).reduce((a, c) => a + (EXAMPLE_CLASS_COUNTS[c.key] ?? 0), 0);
        return { group: g, count: k, pct: pct(k) };
      }),
      nonSperm: classes.filter((c) => !c.countsAsSperm).map((c) => ({ key: c.key, name: c.name, count: EXAMPLE_CLASS_COUNTS[c.key] ?? 0 })),
      defectFrequencies: {
        perClass: defectCells.map((c) => ({ ...c, pctOfCells: pct(c.cellsWithDefect) })),
        totalDefects,
        sumPct: pct(totalDefects),
      },
    },
    agreement: singleRead
      ? null
      : {
          pairs: 251,
          onlyFirst: first.cells - 251,
          onlySecond: second.cells - 251,
          firstCellsCounted: first.cells,
          secondCellsCounted: second.cells,
          observedAgreement: 206 / 251,
          kappa: 0.7847,
          band: 'substantial',
          firstPctNormal: firstPct,
          secondPctNormal: secondPct,
          acceptableDifference: { difference: replicate.difference, limit: replicate.limit, differ: replicate.differ },
        },
    healthEvents: [
      {
        kind: 'Fever',
        description: 'Fever 39.8 °C on 4 May, treated by the attending vet; normal temperature from 7 May.',
        startedOn: '2026-05-04',
        endedOn: '2026-05-06',
        dayOfWindow,
        windowDays: window.totalDays,
        windowClearsOn: isoDay(window.clears),
      },
    ],
    veterinarian: {
      remarks:
        'Many proximal and distal cytoplasmic droplets and bent tails, as expected three weeks after a febrile illness. Progressive motility is below this stallion’s spring collections.',
      interpretation:
        'Within the spermatogenic window of the fever of 4 May: the figures are not representative of this stallion’s usual quality. PMMN in the second ejaculate is below the breeding-soundness threshold. Re-evaluate after the window clears (from 12 July 2026).',
    },
    people,
    report: {
      version,
      verificationCode: exampleVerificationCode(version === 2 ? 20260529 : 20260527),
      supersedes:
        version === 2
          ? {
              version: 1,
              reason: 'Interpretation completed after the follow-up examination on 29 May.',
              by: 'Dr Maren Kettleby',
              at: '2026-05-29T13:50:00.000Z',
            }
          : null,
      supersededBy: null,
    },
  };
  options.patch?.(input);
  return input;
}

/** The example, frozen and validated like a signed report. */
export function exampleReportSnapshot(options: ExampleOptions = {}): ReportSnapshot {
  return buildReportSnapshot(exampleReportInput(options));
}
