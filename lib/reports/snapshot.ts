/**
 * The frozen report of one collection: every figure, name and lab setting it showed at signing,
 * as plain JSON values (numbers unrounded, instants as ISO strings in UTC, calendar days as
 * 'YYYY-MM-DD'). Signing stores this object; the PDF, the e-mail and the report page are made
 * from it alone, so later changes to marks, classes, records or settings can never change a
 * signed report.
 *
 * A stored snapshot is parsed back with `parseReportSnapshot` (never cast): years later the code
 * may have moved on, and a snapshot that no longer fits is refused with the path of each problem
 * rather than half-rendered. `schemaVersion` says which shape a snapshot has; a change of shape
 * adds a new version and an upgrade step below, it never edits what version 1 means.
 *
 * Besides types and ranges the schema checks the arithmetic a mapping mistake would break (class
 * counts add up to the cells counted, percentages match their counts, PMMN matches PMS × % normal,
 * the health event's window covers the collection): a report that contradicts itself must not be
 * signable. It does not recompute the figures: the morphology engine, the semen arithmetic and
 * the agreement code do that, once, before signing.
 */
import { z } from 'zod';
import { CAUTIONS } from '@/lib/cautions';
import { CLASS_GROUPS } from '@/lib/class-sets/schema';
import { isCanonicalVerificationCode } from './verification';

export const REPORT_SNAPSHOT_SCHEMA_VERSION = 1;

/** Sperm groups of the morphology figures ('non_sperm' classes are tallied apart). */
export const SPERM_GROUPS = ['normal', 'head', 'midpiece', 'droplet', 'tail', 'other'] as const;
export type SpermGroup = (typeof SPERM_GROUPS)[number];

/** Landis & Koch 1977 bands for Cohen's kappa. */
export const KAPPA_BANDS = ['poor', 'slight', 'fair', 'moderate', 'substantial', 'almost_perfect'] as const;
export type KappaBand = (typeof KAPPA_BANDS)[number];

export const DOSE_KINDS = ['fresh', 'cooled', 'frozen'] as const;
export type DoseKind = (typeof DOSE_KINDS)[number];

// ---------------------------------------------------------------------------
// Building blocks

const instant = z.iso.datetime({ message: 'Expected an ISO instant in UTC, e.g. 2026-05-26T07:40:00.000Z' });
const calendarDay = z.iso.date({ message: 'Expected a calendar day, e.g. 2026-05-26' });
const label = z.string().trim().min(1).max(200);
const optionalLabel = label.nullable();
const longText = z.string().max(20_000).nullable();
const count = z.number().int().min(0);
const positiveInt = z.number().int().min(1);
const pct = z.number().min(0).max(100);
const billions = z.number().min(0);
const classKey = z.string().regex(/^[a-z][a-z0-9_]{0,39}$/, 'Class keys are lower-case slugs');
// A zone the runtime of the day may not know must not make an old report unreadable: only the form is checked here.
const timeZone = z.string().regex(/^[A-Za-z0-9_+\-/]{1,64}$/, 'Expected an IANA time-zone name, e.g. Europe/London');

/** Two figures that must agree up to floating-point noise and rounding in the mapping. */
const close = (a: number, b: number, tolerance: number) => Math.abs(a - b) <= tolerance;
/** Percentages are compared to 0.01 points: far below what any report shows, far above float noise. */
const PCT_TOLERANCE = 0.01;
const pctOf = (part: number, whole: number) => (part / whole) * 100;

// ---------------------------------------------------------------------------
// Sections

const labSchema = z.strictObject({
  name: label,
  address: optionalLabel,
});

const snapshotClassSchema = z.strictObject({
  key: classKey,
  name: label,
  group: z.enum(CLASS_GROUPS),
  countsAsSperm: z.boolean(),
});

const doseSizeSchema = z.strictObject({
  /** Sperm per dose, 10^9, counted on `basis`. */
  sizeBillion: z.number().positive(),
  basis: z.enum(['progressive', 'total']),
});

const settingsSchema = z.strictObject({
  doses: z.strictObject({ fresh: doseSizeSchema, cooled: doseSizeSchema, frozen: doseSizeSchema }),
  /** Breeding soundness: PMMN in the second ejaculate at least this, 10^9. */
  bseThresholdBillion: z.number().positive(),
  ejaculatePair: z.strictObject({ gapMinutes: positiveInt, toleranceMinutes: count }),
  targetCells: positiveInt,
  window: z.strictObject({ spermatogenesisDays: count, epididymalTransitDays: count }),
  timeZone,
  /** The lab's setting "second read required before a report" at signing. */
  secondReadRequired: z.boolean(),
  classSet: z.strictObject({ name: label, classes: z.array(snapshotClassSchema).min(1).max(40) }),
});

const stallionSchema = z.strictObject({
  id: positiveInt,
  name: label,
  breed: optionalLabel,
  registration: optionalLabel,
  foalingYear: z.number().int().min(1950).max(2200).nullable(),
  owner: z.strictObject({ name: label }).nullable(),
});

const collectionSchema = z.strictObject({
  id: positiveInt,
  collectedAt: instant,
  /** 1 for the day's first ejaculate of this stallion (the lab's day). */
  ejaculateOfDay: positiveInt,
  /** Whole days on the lab's calendar since this stallion's previous collection; null for the first. */
  daysSincePrevious: count.nullable(),
  preparation: label,
  stain: optionalLabel,
  optics: label,
  magnification: positiveInt,
  collectedBy: optionalLabel,
  notes: longText,
});

const semenSchema = z.strictObject({
  volumeMl: z.number().min(0).nullable(),
  concentrationMillionPerMl: z.number().min(0).nullable(),
  concentrationMethod: z.enum(['entered', 'chamber']),
  totalMotilityPct: pct.nullable(),
  progressiveMotilityPct: pct.nullable(),
  totalSpermBillion: billions.nullable(),
  totalMotileBillion: billions.nullable(),
  progressivelyMotileBillion: billions.nullable(),
  /** Progressively motile, morphologically normal sperm, 10^9. */
  pmmnBillion: billions.nullable(),
  /** The % normal the PMMN used (the report's morphology). */
  normalPctUsed: pct.nullable(),
  /** One row per dose kind; doses null when the sperm on its basis is unknown. */
  doses: z
    .array(
      z.strictObject({
        kind: z.enum(DOSE_KINDS),
        sizeBillion: z.number().positive(),
        basis: z.enum(['progressive', 'total']),
        doses: count.nullable(),
        remainderBillion: billions.nullable(),
      }),
    )
    .max(DOSE_KINDS.length),
});

const breedingSoundnessSchema = z
  .discriminatedUnion('role', [
    /** This collection is the first of a pair about an hour apart: the check belongs to the second. */
    z.strictObject({ role: z.literal('first'), secondCollectedAt: instant, gapMinutes: z.number().positive() }),
    z.strictObject({
      role: z.literal('second'),
      firstCollectedAt: instant,
      gapMinutes: z.number().positive(),
      pmmnBillion: billions.nullable(),
      thresholdBillion: z.number().positive(),
      status: z.enum(['pass', 'fail', 'unknown']),
    }),
  ])
  .nullable();

const morphologySchema = z.strictObject({
  /** 'settled': agreed pairs plus settled disagreements; 'single': one read, where the lab allows it. */
  source: z.enum(['settled', 'single']),
  /** Sperm cells counted (non-sperm cells are apart). */
  cellsCounted: count,
  target: positiveInt,
  targetReached: z.boolean(),
  normalCount: count,
  abnormalCount: count,
  pctNormal: pct.nullable(),
  pctAbnormal: pct.nullable(),
  /** Wilson score interval on % normal (Newcombe 1998, method 3). */
  normalInterval: z
    .strictObject({ lowerPct: pct, upperPct: pct, confidencePct: z.literal(95), method: z.literal('wilson') })
    .nullable(),
  /** "Cells normal/abnormal" view: one primary class per cell; sums to 100 %. Sperm classes only. */
  perClass: z.array(
    z.strictObject({ key: classKey, name: label, group: z.enum(SPERM_GROUPS), count, pct: pct.nullable() }),
  ),
  perGroup: z.array(z.strictObject({ group: z.enum(SPERM_GROUPS), count, pct: pct.nullable() })),
  /** Round cells, leukocytes …: counted apart, never in a percentage. */
  nonSperm: z.array(z.strictObject({ key: classKey, name: label, count })),
  /** "Defect frequency" view: every defect on every cell (primary class plus tags); may exceed 100 %. */
  defectFrequencies: z.strictObject({
    perClass: z.array(
      z.strictObject({
        key: classKey,
        name: label,
        group: z.enum(SPERM_GROUPS).exclude(['normal']),
        cellsWithDefect: count,
        pctOfCells: z.number().min(0).max(100).nullable(),
      }),
    ),
    totalDefects: count,
    /** Sum of the per-class percentages; may exceed 100. */
    sumPct: z.number().min(0).nullable(),
  }),
});

const agreementSchema = z
  .strictObject({
    /** Cells both readers marked, paired one to one. */
    pairs: count,
    onlyFirst: count,
    onlySecond: count,
    firstCellsCounted: count,
    secondCellsCounted: count,
    /** Share of pairs given the same class, 0–1. */
    observedAgreement: z.number().min(0).max(1),
    /** Cohen's kappa; null when chance agreement is 1 (every cell one class). */
    kappa: z.number().min(-1).max(1).nullable(),
    band: z.enum(KAPPA_BANDS).nullable(),
    firstPctNormal: pct,
    secondPctNormal: pct,
    /** Binomial acceptable difference for the two % normal values, percentage points. */
    acceptableDifference: z.strictObject({ difference: z.number().min(0), limit: z.number().min(0), differ: z.boolean() }),
  })
  .nullable();

const healthEventSchema = z.strictObject({
  kind: label,
  description: longText,
  startedOn: calendarDay,
  endedOn: calendarDay.nullable(),
  /** 1 on the event day; the collection's day in the event's spermatogenic window. */
  dayOfWindow: positiveInt,
  /** Days in the window from the event's start: spermatogenesis + epididymal transit after its last day (lib/windows). */
  windowDays: positiveInt,
  /** First day after the window. */
  windowClearsOn: calendarDay,
});

const personSchema = z.strictObject({ name: label, qualifications: optionalLabel });

const peopleSchema = z.strictObject({
  /** The first reader. */
  readBy: personSchema,
  /** The second reader (who also settled, unless `settledBy` says otherwise); null for a single read. */
  checkedBy: personSchema.nullable(),
  settledBy: personSchema.nullable(),
  signedBy: personSchema,
  signedAt: instant,
});

const amendmentLinkSchema = z.strictObject({
  version: positiveInt,
  reason: z.string().trim().min(1).max(2000),
  by: label,
  at: instant,
});

const reportSchema = z.strictObject({
  version: positiveInt,
  verificationCode: z.string().refine(isCanonicalVerificationCode, 'Not a verification code in canonical form'),
  /** The version this one replaces, why, and who amended it; null for version 1. */
  supersedes: amendmentLinkSchema.nullable(),
  /**
   * Null in what is frozen at signing. A later version may be recorded here on a copy made for
   * display ("superseded by version 3"); the stored PDF stays as signed.
   */
  supersededBy: amendmentLinkSchema.nullable(),
});

const cautionSchema = z.strictObject({ title: label, text: z.string().trim().min(1).max(2000) });

// ---------------------------------------------------------------------------
// The whole snapshot, with its cross-checks

const snapshotShape = z.strictObject({
  schemaVersion: z.literal(REPORT_SNAPSHOT_SCHEMA_VERSION),
  lab: labSchema,
  settings: settingsSchema,
  stallion: stallionSchema,
  collection: collectionSchema,
  semen: semenSchema,
  breedingSoundness: breedingSoundnessSchema,
  morphology: morphologySchema,
  agreement: agreementSchema,
  healthEvents: z.array(healthEventSchema).max(50),
  veterinarian: z.strictObject({ remarks: longText, interpretation: longText }),
  people: peopleSchema,
  report: reportSchema,
  /** Frozen with the report, so a re-render years later shows what was signed. */
  cautions: z.array(cautionSchema).min(1),
});

type Shape = z.infer<typeof snapshotShape>;
type Ctx = z.core.$RefinementCtx<Shape>;

function checkClassSet(s: Shape, ctx: Ctx) {
  const classes = s.settings.classSet.classes;
  const keys = new Set<string>();
  classes.forEach((c, i) => {
    const path = ['settings', 'classSet', 'classes', i];
    if (keys.has(c.key)) ctx.addIssue({ code: 'custom', path: [...path, 'key'], message: `Class key ${c.key} appears twice` });
    keys.add(c.key);
    // A non-sperm class counted as sperm would corrupt every percentage in the report.
    if ((c.group === 'non_sperm') === c.countsAsSperm) {
      ctx.addIssue({ code: 'custom', path: [...path, 'countsAsSperm'], message: 'Only non-sperm classes are tallied apart from sperm' });
    }
  });
  if (!classes.some((c) => c.group === 'normal')) {
    ctx.addIssue({ code: 'custom', path: ['settings', 'classSet', 'classes'], message: 'The class set has no normal class' });
  }
}

function checkMorphology(s: Shape, ctx: Ctx) {
  const m = s.morphology;
  const at = (...path: (string | number)[]) => ['morphology', ...path];
  const issue = (path: (string | number)[], message: string) => ctx.addIssue({ code: 'custom', path: at(...path), message });
  const byKey = new Map(s.settings.classSet.classes.map((c) => [c.key, c]));
  const n = m.cellsCounted;

  const sperm = s.settings.classSet.classes.filter((c) => c.countsAsSperm).map((c) => c.key);
  const listed = m.perClass.map((c) => c.key);
  if (sperm.join() !== listed.join()) issue(['perClass'], `Per-class rows must be the class set's sperm classes in order (${sperm.join(', ')})`);
  m.perClass.forEach((c, i) => {
    const cls = byKey.get(c.key);
    if (cls && cls.group !== c.group) issue(['perClass', i, 'group'], `Class ${c.key} is in group ${cls.group} in the class set`);
    checkPct(c.count, n, c.pct, ['perClass', i, 'pct']);
  });
  const nonSperm = s.settings.classSet.classes.filter((c) => !c.countsAsSperm).map((c) => c.key);
  if (nonSperm.join() !== m.nonSperm.map((c) => c.key).join()) issue(['nonSperm'], `Non-sperm rows must be the class set's non-sperm classes in order (${nonSperm.join(', ') || 'none'})`);

  const sum = m.perClass.reduce((a, c) => a + c.count, 0);
  if (sum !== n) issue(['cellsCounted'], `Class counts add up to ${sum}, not ${n}`);
  const normal = m.perClass.filter((c) => c.group === 'normal').reduce((a, c) => a + c.count, 0);
  if (normal !== m.normalCount) issue(['normalCount'], `Normal-group classes add up to ${normal}, not ${m.normalCount}`);
  if (m.normalCount + m.abnormalCount !== n) issue(['abnormalCount'], 'Normal plus abnormal must equal the cells counted');
  checkPct(m.normalCount, n, m.pctNormal, ['pctNormal']);
  checkPct(m.abnormalCount, n, m.pctAbnormal, ['pctAbnormal']);
  if (m.target !== s.settings.targetCells) issue(['target'], 'The target must be the lab setting used');
  if (m.targetReached !== n >= m.target) issue(['targetReached'], 'Target reached must match the cells counted');

  if ((m.normalInterval === null) !== (n === 0)) issue(['normalInterval'], 'An interval is given exactly when cells were counted');
  if (m.normalInterval && m.pctNormal !== null) {
    const { lowerPct, upperPct } = m.normalInterval;
    if (!(lowerPct <= m.pctNormal + PCT_TOLERANCE && m.pctNormal <= upperPct + PCT_TOLERANCE)) {
      issue(['normalInterval'], 'The interval must contain % normal');
    }
  }

  if (SPERM_GROUPS.join() !== m.perGroup.map((g) => g.group).join()) issue(['perGroup'], `Group rows must be ${SPERM_GROUPS.join(', ')} in order`);
  m.perGroup.forEach((g, i) => {
    const expected = m.perClass.filter((c) => c.group === g.group).reduce((a, c) => a + c.count, 0);
    if (g.count !== expected) issue(['perGroup', i, 'count'], `Group ${g.group} holds ${expected} cells by its classes, not ${g.count}`);
    checkPct(g.count, n, g.pct, ['perGroup', i, 'pct']);
  });

  const d = m.defectFrequencies;
  let defects = 0;
  d.perClass.forEach((f, i) => {
    const cls = byKey.get(f.key);
    if (!cls || !cls.countsAsSperm || cls.group === 'normal') issue(['defectFrequencies', 'perClass', i, 'key'], `${f.key} is not a sperm defect class of the class set`);
    // A cell carries a defect once at most, so no defect is on more cells than were counted.
    if (f.cellsWithDefect > n) issue(['defectFrequencies', 'perClass', i, 'cellsWithDefect'], 'More cells with this defect than cells counted');
    checkPct(f.cellsWithDefect, n, f.pctOfCells, ['defectFrequencies', 'perClass', i, 'pctOfCells']);
    defects += f.cellsWithDefect;
  });
  if (defects !== d.totalDefects) issue(['defectFrequencies', 'totalDefects'], `Per-class defects add up to ${defects}, not ${d.totalDefects}`);
  if (d.totalDefects < m.abnormalCount) issue(['defectFrequencies', 'totalDefects'], 'Every abnormal cell carries at least one defect');
  checkPct(d.totalDefects, n, d.sumPct, ['defectFrequencies', 'sumPct']);

  function checkPct(part: number, whole: number, value: number | null, path: (string | number)[]) {
    if (whole === 0) {
      if (value !== null) issue(path, 'No cells counted: the percentage must be null');
    } else if (value === null || !close(value, pctOf(part, whole), PCT_TOLERANCE)) {
      issue(path, `Expected ${pctOf(part, whole)} (${part} of ${whole})`);
    }
  }
}

function checkSemen(s: Shape, ctx: Ctx) {
  const v = s.semen;
  const issue = (field: string, message: string) => ctx.addIssue({ code: 'custom', path: ['semen', field], message });
  const rel = (a: number, b: number) => close(a, b, 1e-6 * Math.max(1, Math.abs(b)));
  if (v.volumeMl !== null && v.concentrationMillionPerMl !== null && v.totalSpermBillion !== null) {
    if (!rel(v.totalSpermBillion, (v.volumeMl * v.concentrationMillionPerMl) / 1000)) issue('totalSpermBillion', 'Total sperm must be volume × concentration');
  }
  if (v.totalMotilityPct !== null && v.progressiveMotilityPct !== null && v.progressiveMotilityPct > v.totalMotilityPct) {
    issue('progressiveMotilityPct', 'Progressive motility cannot exceed total motility');
  }
  if (v.totalSpermBillion !== null && v.progressiveMotilityPct !== null && v.progressivelyMotileBillion !== null) {
    if (!rel(v.progressivelyMotileBillion, (v.totalSpermBillion * v.progressiveMotilityPct) / 100)) issue('progressivelyMotileBillion', 'PMS must be total × % progressive');
  }
  if (v.totalSpermBillion !== null && v.totalMotilityPct !== null && v.totalMotileBillion !== null) {
    if (!rel(v.totalMotileBillion, (v.totalSpermBillion * v.totalMotilityPct) / 100)) issue('totalMotileBillion', 'Total motile must be total × % motile');
  }
  if (v.pmmnBillion !== null) {
    if (v.progressivelyMotileBillion === null || v.normalPctUsed === null) issue('pmmnBillion', 'PMMN needs PMS and % normal');
    else if (!rel(v.pmmnBillion, (v.progressivelyMotileBillion * v.normalPctUsed) / 100)) issue('pmmnBillion', 'PMMN must be PMS × % normal');
  }
  if (v.normalPctUsed !== null && (s.morphology.pctNormal === null || !close(v.normalPctUsed, s.morphology.pctNormal, PCT_TOLERANCE))) {
    issue('normalPctUsed', "The PMMN must use the report's own % normal");
  }
  const kinds = v.doses.map((d) => d.kind);
  if (new Set(kinds).size !== kinds.length) issue('doses', 'Each dose kind at most once');
  v.doses.forEach((d, i) => {
    const setting = s.settings.doses[d.kind];
    if (d.sizeBillion !== setting.sizeBillion || d.basis !== setting.basis) {
      ctx.addIssue({ code: 'custom', path: ['semen', 'doses', i], message: `The ${d.kind} dose must use the lab's dose size` });
    }
    if (d.doses !== null && d.remainderBillion !== null) {
      const available = d.basis === 'progressive' ? v.progressivelyMotileBillion : v.totalSpermBillion;
      if (available === null || !close(d.doses * d.sizeBillion + d.remainderBillion, available, 1e-6) || d.remainderBillion > d.sizeBillion + 1e-9) {
        ctx.addIssue({ code: 'custom', path: ['semen', 'doses', i], message: 'Doses × size + remainder must be the sperm available on the basis' });
      }
    }
  });
}

const DAY_MS = 86_400_000;
const dayNumber = (isoDay: string) => Date.parse(`${isoDay}T00:00:00Z`) / DAY_MS;

function checkRest(s: Shape, ctx: Ctx) {
  if (s.morphology.source === 'single') {
    if (s.settings.secondReadRequired) {
      ctx.addIssue({ code: 'custom', path: ['morphology', 'source'], message: 'A single-read report needs the lab setting that allows reports without a second read' });
    }
    if (s.agreement !== null) ctx.addIssue({ code: 'custom', path: ['agreement'], message: 'A single read has no agreement figures' });
  } else {
    if (s.agreement === null) ctx.addIssue({ code: 'custom', path: ['agreement'], message: 'A settled read comes with agreement figures' });
    if (s.people.checkedBy === null) ctx.addIssue({ code: 'custom', path: ['people', 'checkedBy'], message: 'A settled read names its second reader' });
  }
  const a = s.agreement;
  if (a) {
    const diff = Math.abs(a.firstPctNormal - a.secondPctNormal);
    if (!close(a.acceptableDifference.difference, diff, PCT_TOLERANCE)) {
      ctx.addIssue({ code: 'custom', path: ['agreement', 'acceptableDifference', 'difference'], message: 'The difference must be that of the two % normal values' });
    }
    if (a.acceptableDifference.differ !== a.acceptableDifference.difference > a.acceptableDifference.limit) {
      ctx.addIssue({ code: 'custom', path: ['agreement', 'acceptableDifference', 'differ'], message: '"Differ" must say whether the difference exceeds the limit' });
    }
    if ((a.kappa === null) !== (a.band === null)) ctx.addIssue({ code: 'custom', path: ['agreement', 'band'], message: 'A band is given exactly when kappa is' });
  }

  const collectedDay = Math.floor(Date.parse(s.collection.collectedAt) / DAY_MS);
  s.healthEvents.forEach((e, i) => {
    const path = ['healthEvents', i];
    if (dayNumber(e.windowClearsOn) - dayNumber(e.startedOn) !== e.windowDays) {
      ctx.addIssue({ code: 'custom', path: [...path, 'windowClearsOn'], message: 'The window clears windowDays after the event starts' });
    }
    if (e.endedOn !== null && e.endedOn < e.startedOn) ctx.addIssue({ code: 'custom', path: [...path, 'endedOn'], message: 'An event cannot end before it starts' });
    if (e.dayOfWindow > e.windowDays) ctx.addIssue({ code: 'custom', path: [...path, 'dayOfWindow'], message: "Only events whose window covers the collection belong in the report" });
    // The lab's day can differ from the UTC day by one either way.
    const expected = collectedDay - dayNumber(e.startedOn) + 1;
    if (Math.abs(e.dayOfWindow - expected) > 1) ctx.addIssue({ code: 'custom', path: [...path, 'dayOfWindow'], message: `The collection is on day ${expected} of this window` });
  });

  const r = s.report;
  if (r.version === 1 && r.supersedes !== null) ctx.addIssue({ code: 'custom', path: ['report', 'supersedes'], message: 'Version 1 supersedes nothing' });
  if (r.version > 1 && (r.supersedes === null || r.supersedes.version !== r.version - 1)) {
    ctx.addIssue({ code: 'custom', path: ['report', 'supersedes'], message: `Version ${r.version} supersedes version ${r.version - 1}` });
  }
  if (r.supersededBy !== null && r.supersededBy.version <= r.version) {
    ctx.addIssue({ code: 'custom', path: ['report', 'supersededBy', 'version'], message: 'A report is superseded by a later version' });
  }
  if (s.settings.timeZone !== s.settings.timeZone.trim()) ctx.addIssue({ code: 'custom', path: ['settings', 'timeZone'], message: 'Time zone has spaces' });
}

export const reportSnapshotSchema = snapshotShape.superRefine((s, ctx) => {
  checkClassSet(s, ctx);
  checkMorphology(s, ctx);
  checkSemen(s, ctx);
  checkRest(s, ctx);
});

export type ReportSnapshot = z.infer<typeof reportSnapshotSchema>;
export type ReportClass = ReportSnapshot['settings']['classSet']['classes'][number];
export type ReportMorphology = ReportSnapshot['morphology'];
export type ReportAgreement = NonNullable<ReportSnapshot['agreement']>;
export type ReportHealthEvent = ReportSnapshot['healthEvents'][number];
export type ReportAmendmentLink = NonNullable<ReportSnapshot['report']['supersedes']>;

// ---------------------------------------------------------------------------
// Reading and building

export class ReportSnapshotError extends Error {
  constructor(
    message: string,
    readonly issues: { path: string; message: string }[],
  ) {
    super(message);
    this.name = 'ReportSnapshotError';
  }
}

/**
 * Upgrades from older shapes to the current one, keyed by the version they read. Empty while
 * version 1 is the only shape; a version 2 adds `1: (v1) => v2` here and keeps version 1's tests.
 */
const UPGRADES: Record<number, (old: Record<string, unknown>) => Record<string, unknown>> = {};

function toIssues(error: z.ZodError) {
  return error.issues.map((i) => ({ path: i.path.map(String).join('.') || '(root)', message: i.message }));
}

export type SnapshotParse = { ok: true; snapshot: ReportSnapshot } | { ok: false; error: ReportSnapshotError };

/** Reads a stored snapshot (the object, or its JSON text as a JSON column returns it). */
export function safeParseReportSnapshot(stored: unknown): SnapshotParse {
  const fail = (message: string, issues: { path: string; message: string }[] = []): SnapshotParse => ({
    ok: false,
    error: new ReportSnapshotError(message, issues),
  });
  let value: unknown = stored;
  if (typeof value === 'string') {
    try {
      value = JSON.parse(value);
    } catch {
      return fail('The stored report is not valid JSON');
    }
  }
  if (typeof value !== 'object' || value === null || Array.isArray(value)) return fail('The stored report is not an object');
  let obj = value as Record<string, unknown>;
  const stated = obj.schemaVersion;
  if (typeof stated !== 'number' || !Number.isInteger(stated) || stated < 1) return fail('The stored report has no schemaVersion');
  let version: number = stated;
  if (version > REPORT_SNAPSHOT_SCHEMA_VERSION) {
    return fail(`The stored report has schemaVersion ${version}; this version of Fieldmark reads up to ${REPORT_SNAPSHOT_SCHEMA_VERSION}`);
  }
  while (version < REPORT_SNAPSHOT_SCHEMA_VERSION) {
    const step = UPGRADES[version];
    if (!step) return fail(`No upgrade from report schemaVersion ${version}`);
    obj = step(obj);
    version = obj.schemaVersion as number;
  }
  const parsed = reportSnapshotSchema.safeParse(obj);
  if (!parsed.success) {
    const issues = toIssues(parsed.error);
    return fail(`The report does not fit schemaVersion ${REPORT_SNAPSHOT_SCHEMA_VERSION}: ${issues.slice(0, 5).map((i) => `${i.path}: ${i.message}`).join('; ')}${issues.length > 5 ? ` (and ${issues.length - 5} more)` : ''}`, issues);
  }
  return { ok: true, snapshot: parsed.data };
}

/** Like safeParseReportSnapshot, throwing ReportSnapshotError. */
export function parseReportSnapshot(stored: unknown): ReportSnapshot {
  const r = safeParseReportSnapshot(stored);
  if (!r.ok) throw r.error;
  return r.snapshot;
}

/** What the signing code supplies; the builder adds the schema version and, unless given, the cautions. */
export type ReportSnapshotInput = Omit<ReportSnapshot, 'schemaVersion' | 'cautions'> & { cautions?: ReportSnapshot['cautions'] };

/**
 * Freezes a report: JSON round trip (Dates become ISO strings, undefined keys vanish, nothing
 * shared with the caller's objects), then the full validation. Throws ReportSnapshotError with
 * every problem's path when the figures contradict each other.
 */
export function buildReportSnapshot(input: ReportSnapshotInput): ReportSnapshot {
  const plain = JSON.parse(
    JSON.stringify({ schemaVersion: REPORT_SNAPSHOT_SCHEMA_VERSION, ...input, cautions: input.cautions ?? CAUTIONS }),
  ) as unknown;
  return parseReportSnapshot(plain);
}

/** A copy for display marked "superseded by version N"; what was frozen at signing is not changed. */
export function markSuperseded(snapshot: ReportSnapshot, by: ReportAmendmentLink): ReportSnapshot {
  return parseReportSnapshot({ ...JSON.parse(JSON.stringify(snapshot)), report: { ...snapshot.report, supersededBy: by } });
}
