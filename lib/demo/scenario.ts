/**
 * The invented demo scenario of the invented Quillfield Equine Reproduction Centre: clients,
 * stallions, one breeding season of collections and testicular measurements. Every person,
 * horse, number and address here is made up.
 *
 * Pure and deterministic: the same seed gives the same values on every run, so the seeds can
 * be re-run and tests (and later seeds, e.g. morphology marks) can rebuild the same data.
 * Imports nothing, so the seed runner (tsx, no `@/` alias needed) can load it by relative path.
 */

export const DEMO_CENTRE_NAME = 'Quillfield Equine Reproduction Centre';
export const DEMO_SEED = 20260302;

/** Season of collections, UTC calendar days (inclusive). */
export const DEMO_SEASON = Object.freeze({ start: '2026-03-02', end: '2026-07-31' });

/** Demo users (lib/demo/users.ts) who record the rows; the seeds look their ids up by e-mail. */
export const DEMO_RECORDERS = Object.freeze({
  collections: 'tech@quillfield.example',
  testis: 'vet@quillfield.example',
});

/** The client user whose users row is linked to the client of the same e-mail. */
export const DEMO_CLIENT_USER_EMAIL = 'owner@quillfield.example';
/** A second client user, another owner (of Marrowby Sextant): sees none of the first one's stallions. */
export const DEMO_OTHER_CLIENT_USER_EMAIL = 'bryony@fenwarde.example';

// ---------------------------------------------------------------------------
// Random numbers

// The project's one PRNG (deterministic: same seed, same numbers on every platform).
import { mulberry32, type Random } from '../synthetic/prng';

/** Roughly normal, mean 0, sd ~1, bounded to ±3 (sum of three uniforms). */
const normalish = (rnd: Random) => (rnd() + rnd() + rnd() - 1.5) * 2;
const round = (x: number, decimals: number) => {
  const f = 10 ** decimals;
  return Math.round(x * f) / f;
};
const clamp = (x: number, min: number, max: number) => Math.min(max, Math.max(min, x));

// ---------------------------------------------------------------------------
// Dates (UTC days as whole numbers since 1970-01-01)

const DAY_MS = 86_400_000;
const MINUTE_MS = 60_000;

function dayNumber(isoDay: string): number {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(isoDay);
  if (!m) throw new RangeError(`not a YYYY-MM-DD date: ${isoDay}`);
  return Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])) / DAY_MS;
}
const isoDay = (day: number) => new Date(day * DAY_MS).toISOString().slice(0, 10);
const utcDayOf = (d: Date) => Math.floor(d.getTime() / DAY_MS);

// ---------------------------------------------------------------------------
// Clients and stallions

export type ClientKind = 'owner' | 'referring_vet';

export interface DemoClient {
  /** Unique within the scenario; the seed matches existing rows by name. */
  name: string;
  kind: ClientKind;
  email: string;
  phone: string;
  address: string;
  notes: string | null;
}

// Phone numbers are in the UK range set aside for fiction (01632 960xxx).
export const DEMO_CLIENTS: readonly DemoClient[] = Object.freeze([
  {
    name: 'Corwen Ashdale',
    kind: 'owner',
    email: DEMO_CLIENT_USER_EMAIL,
    phone: '01632 960418',
    address: 'Ashdale Barns, 2 Lantern Row, Quillfield',
    notes: 'Owner of two stallions standing at the centre this season.',
  },
  {
    name: 'Bryony Fenwarde',
    kind: 'owner',
    email: DEMO_OTHER_CLIENT_USER_EMAIL,
    phone: '01632 960733',
    address: 'Fenwarde House, Marrowby Road, Quillfield',
    notes: null,
  },
  {
    name: 'Talbot Merrowcroft',
    kind: 'owner',
    email: 'talbot@merrowcroft.example',
    phone: '01632 960251',
    address: 'Merrowcroft Yard, Copperline Lane, Quillfield',
    notes: null,
  },
  {
    name: 'Dr Ysolde Pennacott',
    kind: 'referring_vet',
    email: 'ysolde@pennacott-vets.example',
    phone: '01632 960964',
    address: 'Pennacott Equine Practice, 14 Tideglass Street, Quillfield',
    notes: 'Referring veterinarian; receives the signed reports of the stallions she refers.',
  },
]);

export interface DemoStallion {
  /** Stable short key used in collection keys and PRNG seeds. */
  key: string;
  name: string;
  /** Microchip-style number; the zeros make it plainly fictional. Unique; the seed matches by it. */
  registration: string;
  breed: string;
  foalingYear: number;
  /** Name of the client of record (DEMO_CLIENTS). */
  clientName: string;
  notes: string | null;
}

export const DEMO_STALLIONS: readonly DemoStallion[] = Object.freeze([
  {
    key: 'thistlewick-lantern',
    name: 'Thistlewick Lantern',
    registration: '956000000001014',
    breed: 'Warmblood',
    foalingYear: 2014,
    clientName: 'Corwen Ashdale',
    notes: 'Fever in early May 2026; watch collections through the spermatogenic window.',
  },
  {
    key: 'ambervale-corsair',
    name: 'Ambervale Corsair',
    registration: '956000000002027',
    breed: 'Friesian',
    foalingYear: 2017,
    clientName: 'Corwen Ashdale',
    notes: null,
  },
  {
    key: 'marrowby-sextant',
    name: 'Marrowby Sextant',
    registration: '956000000003031',
    breed: 'Thoroughbred',
    foalingYear: 2012,
    clientName: 'Bryony Fenwarde',
    notes: null,
  },
  {
    key: 'copperline-drifter',
    name: 'Copperline Drifter',
    registration: '956000000004048',
    breed: 'Quarter Horse',
    foalingYear: 2016,
    clientName: 'Talbot Merrowcroft',
    notes: 'Daily collections in early June to estimate daily sperm output.',
  },
  {
    key: 'saffron-tideglass',
    name: 'Saffron Tideglass',
    registration: '956000000005052',
    breed: 'Arabian',
    foalingYear: 2019,
    clientName: 'Dr Ysolde Pennacott',
    notes: 'Referred for a breeding-soundness evaluation; standing at the centre for the season.',
  },
]);

function stallionByKey(key: string): DemoStallion {
  const s = DEMO_STALLIONS.find((x) => x.key === key);
  if (!s) throw new RangeError(`unknown demo stallion: ${key}`);
  return s;
}

// ---------------------------------------------------------------------------
// Special events

export const DEMO_FEVER = Object.freeze({
  stallionKey: 'thistlewick-lantern',
  stallionName: 'Thistlewick Lantern',
  stallionRegistration: '956000000001014',
  date: '2026-05-04',
  /** Last day of the fever (normal temperature again from 7 May). */
  endDate: '2026-05-06',
  temperatureC: 39.8,
  /** The health event's notes (seed 08 records the fever as a health event). */
  notes: 'Treated by the attending vet; normal temperature again from 7 May. No collections while ill.',
  /** Written in the remarks of the first collection after the fever. */
  remark: 'Fever 39.8 °C on 4 May, treated by the attending vet',
  /** Days after the fever during which progressive motility is lower. */
  motilityEffectDays: Object.freeze([9, 67] as const),
  /** Days after the fever during which more cells are abnormal (peak in the middle). */
  morphologyEffectDays: Object.freeze([9, 67] as const),
});

/** Breeding-soundness evaluations: two ejaculates 60 min apart after a week without collection. */
export const DEMO_BSE: readonly { stallionKey: string; date: string; gapMinutes: number }[] = Object.freeze([
  { stallionKey: 'ambervale-corsair', date: '2026-04-21', gapMinutes: 60 },
  { stallionKey: 'saffron-tideglass', date: '2026-03-23', gapMinutes: 60 },
]);

/** Daily collections 24 h apart, long enough for an actual daily-sperm-output estimate. */
export const DEMO_DSO_RUN = Object.freeze({
  stallionKey: 'copperline-drifter',
  start: '2026-06-01',
  days: 10,
  /** Same time each day, so the run is exactly 24 h apart. */
  timeOfDay: '08:30',
});

// ---------------------------------------------------------------------------
// Per-stallion semen profile and collection plan

interface Profile {
  volumeMl: number;
  concentration: number;
  totalMotility: number;
  progressiveMotility: number;
  /** Share of abnormal cells outside any health event (0–1). */
  baselineAbnormal: number;
}

const PROFILES: Record<string, Profile> = {
  'thistlewick-lantern': { volumeMl: 58, concentration: 165, totalMotility: 77, progressiveMotility: 65, baselineAbnormal: 0.24 },
  'ambervale-corsair': { volumeMl: 44, concentration: 150, totalMotility: 70, progressiveMotility: 56, baselineAbnormal: 0.29 },
  'marrowby-sextant': { volumeMl: 42, concentration: 215, totalMotility: 78, progressiveMotility: 66, baselineAbnormal: 0.21 },
  'copperline-drifter': { volumeMl: 55, concentration: 200, totalMotility: 74, progressiveMotility: 61, baselineAbnormal: 0.26 },
  'saffron-tideglass': { volumeMl: 40, concentration: 240, totalMotility: 79, progressiveMotility: 67, baselineAbnormal: 0.22 },
};

type Segment =
  | { kind: 'regular'; from: string; to: string }
  | { kind: 'bse'; date: string }
  | { kind: 'daily'; start: string; days: number };

// Gaps between segments are what make the events readable: nothing in the 7 days before a
// breeding-soundness pair, no collection while the fever stallion is ill.
const PLANS: Record<string, Segment[]> = {
  'thistlewick-lantern': [
    { kind: 'regular', from: '2026-03-02', to: '2026-05-02' },
    { kind: 'regular', from: '2026-05-08', to: DEMO_SEASON.end },
  ],
  'ambervale-corsair': [
    { kind: 'regular', from: '2026-03-03', to: '2026-04-13' },
    { kind: 'bse', date: '2026-04-21' },
    { kind: 'regular', from: '2026-04-23', to: DEMO_SEASON.end },
  ],
  'marrowby-sextant': [{ kind: 'regular', from: '2026-03-02', to: DEMO_SEASON.end }],
  'copperline-drifter': [
    { kind: 'regular', from: '2026-03-04', to: '2026-05-29' },
    { kind: 'daily', start: DEMO_DSO_RUN.start, days: DEMO_DSO_RUN.days },
    { kind: 'regular', from: '2026-06-12', to: DEMO_SEASON.end },
  ],
  'saffron-tideglass': [
    { kind: 'regular', from: '2026-03-03', to: '2026-03-15' },
    { kind: 'bse', date: '2026-03-23' },
    { kind: 'regular', from: '2026-03-25', to: DEMO_SEASON.end },
  ],
};

const HANDLERS = ['Jory Coldharbour', 'Wenna Stroud'] as const;

// ---------------------------------------------------------------------------
// Health-event effects

/** Whole UTC days from the fever to a collection (negative before it). */
function daysAfterFever(collectedAt: Date): number {
  return utcDayOf(collectedAt) - dayNumber(DEMO_FEVER.date);
}

/** 0 outside [from, to]; rises linearly to 1 at riseEnd, stays 1 until fallStart, falls to 0 at `to`. */
function trapezoid(d: number, from: number, riseEnd: number, fallStart: number, to: number): number {
  if (d < from || d > to) return 0;
  if (d < riseEnd) return (d - from) / (riseEnd - from);
  if (d <= fallStart) return 1;
  return (to - d) / (to - fallStart);
}

// Motility drops soon after the fever (epididymal sperm exposed to the heat); morphology
// worsens later, as damaged germ cells reach the ejaculate, and both clear by day ~67.
const motilityEffect = (d: number) => trapezoid(d, DEMO_FEVER.motilityEffectDays[0], 15, 48, DEMO_FEVER.motilityEffectDays[1]);
const morphologyEffect = (d: number) => trapezoid(d, DEMO_FEVER.morphologyEffectDays[0], 28, 52, DEMO_FEVER.morphologyEffectDays[1]);

const FEVER_PROGRESSIVE_DROP = 13;
const FEVER_TOTAL_DROP = 6;
const FEVER_PEAK_ABNORMAL = 0.55;

/**
 * Expected share of abnormal cells (0–1) for a collection of a demo stallion at a time: the
 * stallion's baseline (0.21–0.29), rising to 0.55 for the fever stallion between about day 28
 * and day 52 after the fever and back to baseline by day 67. Works for database rows too
 * (match by registration and collected_at).
 */
export function expectedAbnormalShare(stallionRegistration: string, collectedAt: Date): number {
  const stallion = DEMO_STALLIONS.find((s) => s.registration === stallionRegistration);
  if (!stallion) throw new RangeError(`not a demo stallion: ${stallionRegistration}`);
  const base = PROFILES[stallion.key].baselineAbnormal;
  if (stallion.key !== DEMO_FEVER.stallionKey) return base;
  return round(base + (FEVER_PEAK_ABNORMAL - base) * morphologyEffect(daysAfterFever(collectedAt)), 3);
}

/**
 * Class weights for synthetic field images of a collection with this share of abnormal cells:
 * normal takes 1 − share, the defect classes split the rest in the proportions of `defectWeights`.
 */
export function demoClassWeights(abnormalShare: number, defectWeights: Readonly<Record<string, number>>): Record<string, number> {
  const defects = Object.keys(defectWeights).filter((k) => k !== 'normal');
  const total = defects.reduce((s, k) => s + defectWeights[k], 0);
  return Object.fromEntries([['normal', 1 - abnormalShare], ...defects.map((k) => [k, (abnormalShare * defectWeights[k]) / total])]);
}

/**
 * Collections of the fever stallion that seed 08 gives field images and a submitted first read,
 * by the UTC day nearest to which a collection is picked: before the fever, through its window
 * (the dip from about day 9, deepest between days 28 and 52) and after it clears (beside the
 * three of seed 06: 20 April, 10 June, 28 July).
 */
export const DEMO_HISTORY_READ_DATES: readonly string[] = Object.freeze([
  '2026-03-04', '2026-03-25', '2026-04-30', '2026-05-13', '2026-05-25', '2026-06-02', '2026-06-22', '2026-07-06', '2026-07-17',
]);

// ---------------------------------------------------------------------------
// Collections

export type Preparation = 'eosin_nigrosin' | 'other_stain' | 'fixed_wet_mount';
export type Optics = 'bright_field' | 'dic' | 'phase_contrast';

export interface DemoCollection {
  /** Stable id within the scenario: `<stallion key>-<YYYY-MM-DD>-<number that day>`. */
  key: string;
  stallionKey: string;
  stallionRegistration: string;
  /** UTC. */
  collectedAt: Date;
  numberThatDay: 1 | 2;
  /** Gel-free volume, mL (1 decimal). */
  volumeMl: number;
  /** 10^6 sperm per mL (integer). */
  concentrationMPerMl: number;
  /** % (integer). */
  totalMotilityPct: number;
  /** % (integer), never above total. */
  progressiveMotilityPct: number;
  preparation: Preparation;
  optics: Optics;
  magnification: number;
  collectedBy: string;
  remarks: string | null;
}

interface Planned {
  at: Date;
  numberThatDay: 1 | 2;
  bse?: 1 | 2;
  dailyIndex?: number;
}

/** Minutes after midnight, 08:00–11:00 in 5-minute steps. */
const morningMinutes = (rnd: Random) => 8 * 60 + Math.floor(rnd() * 37) * 5;
const at = (day: number, minutes: number) => new Date(day * DAY_MS + minutes * MINUTE_MS);

function planTimes(stallionKey: string, rnd: Random): Planned[] {
  const out: Planned[] = [];
  for (const seg of PLANS[stallionKey]) {
    if (seg.kind === 'regular') {
      const last = dayNumber(seg.to);
      for (let d = dayNumber(seg.from); d <= last; d += 2 + Math.floor(rnd() * 3)) {
        out.push({ at: at(d, morningMinutes(rnd)), numberThatDay: 1 });
      }
    } else if (seg.kind === 'bse') {
      const bse = DEMO_BSE.find((b) => b.stallionKey === stallionKey && b.date === seg.date);
      if (!bse) throw new Error(`breeding-soundness plan without DEMO_BSE entry: ${stallionKey}`);
      const d = dayNumber(seg.date);
      const first = 8 * 60 + Math.floor(rnd() * 13) * 5; // 08:00–09:00, so the second is by 10:00
      out.push({ at: at(d, first), numberThatDay: 1, bse: 1 });
      out.push({ at: at(d, first + bse.gapMinutes), numberThatDay: 2, bse: 2 });
    } else {
      const [h, m] = DEMO_DSO_RUN.timeOfDay.split(':').map(Number);
      const d0 = dayNumber(seg.start);
      for (let i = 0; i < seg.days; i++) out.push({ at: at(d0 + i, h * 60 + m), numberThatDay: 1, dailyIndex: i });
    }
  }
  return out;
}

function seedFor(seed: number, stallionKey: string): number {
  // One stream per stallion, so a change to one stallion's plan leaves the others as they were.
  let h = seed >>> 0;
  for (const ch of stallionKey) h = Math.imul(h ^ ch.charCodeAt(0), 0x01000193) >>> 0;
  return h;
}

function stallionCollections(stallion: DemoStallion, seed: number): DemoCollection[] {
  const rnd = mulberry32(seedFor(seed, stallion.key));
  const p = PROFILES[stallion.key];
  const planned = planTimes(stallion.key, rnd);
  const feverDay = dayNumber(DEMO_FEVER.date);
  let feverRemarked = false;

  return planned.map((pl): DemoCollection => {
    // Less scatter in the daily run (same routine every morning), so its depletion curve reads.
    const scatter = pl.dailyIndex === undefined ? 1 : 0.4;
    let volume = p.volumeMl * (1 + 0.12 * scatter * normalish(rnd));
    let conc = p.concentration * (1 + 0.14 * scatter * normalish(rnd));
    let total = p.totalMotility + 2.5 * normalish(rnd);
    let gap = p.totalMotility - p.progressiveMotility + 1.5 * normalish(rnd);

    if (pl.bse === 2) {
      // The second ejaculate an hour later carries roughly half the sperm.
      volume *= 0.85;
      conc *= 0.65;
    }
    if (pl.dailyIndex !== undefined) {
      // Daily collection drains the extragonadal reserves within a few days, then levels off.
      const k = Math.exp(-pl.dailyIndex / 1.5);
      volume *= 0.9 + 0.1 * k;
      conc *= 0.75 + 0.25 * k;
    }
    let remarks: string | null = null;
    if (stallion.key === DEMO_FEVER.stallionKey) {
      const d = daysAfterFever(pl.at);
      const e = motilityEffect(d);
      total -= FEVER_TOTAL_DROP * e;
      gap += (FEVER_PROGRESSIVE_DROP - FEVER_TOTAL_DROP) * e;
      if (!feverRemarked && utcDayOf(pl.at) >= feverDay) {
        remarks = DEMO_FEVER.remark;
        feverRemarked = true;
      }
    }
    if (pl.bse) {
      remarks =
        pl.bse === 1
          ? 'Breeding-soundness evaluation: first ejaculate after a week without collection'
          : 'Breeding-soundness evaluation: second ejaculate, 60 min after the first';
    }
    if (pl.dailyIndex !== undefined) {
      remarks = `Daily collection for daily sperm output, day ${pl.dailyIndex + 1} of ${DEMO_DSO_RUN.days}`;
    }

    const totalMotilityPct = Math.round(clamp(total, 60, 85));
    const progressiveMotilityPct = Math.min(totalMotilityPct, Math.round(clamp(total - gap, 45, 75)));
    const wetMount = rnd() < 0.15;
    const day = isoDay(utcDayOf(pl.at));
    return {
      key: `${stallion.key}-${day}-${pl.numberThatDay}`,
      stallionKey: stallion.key,
      stallionRegistration: stallion.registration,
      collectedAt: pl.at,
      numberThatDay: pl.numberThatDay,
      volumeMl: round(clamp(volume, 30, 90), 1),
      concentrationMPerMl: Math.round(clamp(conc, 80, 300)),
      totalMotilityPct,
      progressiveMotilityPct,
      preparation: wetMount ? 'fixed_wet_mount' : 'eosin_nigrosin',
      optics: wetMount ? 'dic' : 'bright_field',
      magnification: 1000,
      collectedBy: HANDLERS[rnd() < 0.7 ? 0 : 1],
      remarks,
    };
  });
}

/** Every demo collection, by stallion (DEMO_STALLIONS order) and then time. */
export function buildDemoCollections(seed: number = DEMO_SEED): DemoCollection[] {
  return DEMO_STALLIONS.flatMap((s) => stallionCollections(s, seed));
}

// ---------------------------------------------------------------------------
// Testicular measurements

export type TestisMethod = 'caliper' | 'ultrasound';

export interface DemoTestisMeasurement {
  stallionKey: string;
  stallionRegistration: string;
  /** UTC calendar day, YYYY-MM-DD. */
  measuredOn: string;
  method: TestisMethod;
  /** cm, 1 decimal. */
  leftLengthCm: number;
  leftWidthCm: number;
  leftHeightCm: number;
  rightLengthCm: number;
  rightWidthCm: number;
  rightHeightCm: number;
  /** Total scrotal width, cm, 1 decimal. */
  totalWidthCm: number;
  notes: string | null;
}

interface TestisBase {
  length: number;
  width: number;
  height: number;
  scrotalWidth: number;
}

const TESTIS_BASE: Record<string, TestisBase> = {
  'thistlewick-lantern': { length: 11.0, width: 6.4, height: 6.8, scrotalWidth: 10.6 },
  'ambervale-corsair': { length: 10.2, width: 6.0, height: 6.3, scrotalWidth: 9.9 },
  'marrowby-sextant': { length: 10.8, width: 6.3, height: 6.5, scrotalWidth: 10.3 },
  'copperline-drifter': { length: 10.0, width: 6.0, height: 6.3, scrotalWidth: 10.0 },
  'saffron-tideglass': { length: 9.0, width: 5.4, height: 5.6, scrotalWidth: 8.9 },
};

const TESTIS_PLAN: readonly { stallionKey: string; measuredOn: string; method: TestisMethod; scale?: number; notes?: string }[] = [
  { stallionKey: 'thistlewick-lantern', measuredOn: '2026-03-02', method: 'caliper' },
  {
    stallionKey: 'thistlewick-lantern',
    measuredOn: '2026-06-22',
    method: 'ultrasound',
    scale: 0.96,
    notes: 'Seven weeks after the fever: testes slightly softer and smaller than in March.',
  },
  { stallionKey: 'ambervale-corsair', measuredOn: '2026-04-21', method: 'caliper', notes: 'Part of the breeding-soundness evaluation.' },
  { stallionKey: 'ambervale-corsair', measuredOn: '2026-07-20', method: 'ultrasound' },
  { stallionKey: 'marrowby-sextant', measuredOn: '2026-03-16', method: 'caliper' },
  { stallionKey: 'copperline-drifter', measuredOn: '2026-06-01', method: 'ultrasound', notes: 'Measured before the daily collections, to predict daily sperm output.' },
  { stallionKey: 'saffron-tideglass', measuredOn: '2026-03-23', method: 'caliper', notes: 'Part of the breeding-soundness evaluation.' },
];

/** Every demo testicular measurement, in TESTIS_PLAN order. */
export function buildDemoTestisMeasurements(seed: number = DEMO_SEED): DemoTestisMeasurement[] {
  const rnd = mulberry32(seedFor(seed, 'testis'));
  return TESTIS_PLAN.map((t) => {
    const b = TESTIS_BASE[t.stallionKey];
    const s = t.scale ?? 1;
    const dim = (base: number, min: number, max: number) => round(clamp(base * s + 0.15 * normalish(rnd), min, max), 1);
    return {
      stallionKey: t.stallionKey,
      stallionRegistration: stallionByKey(t.stallionKey).registration,
      measuredOn: t.measuredOn,
      method: t.method,
      leftLengthCm: dim(b.length, 8, 12),
      leftWidthCm: dim(b.width, 5, 7),
      leftHeightCm: dim(b.height, 5, 7.5),
      rightLengthCm: dim(b.length, 8, 12),
      rightWidthCm: dim(b.width, 5, 7),
      rightHeightCm: dim(b.height, 5, 7.5),
      totalWidthCm: dim(b.scrotalWidth, 8.5, 11),
      notes: t.notes ?? null,
    };
  });
}

// ---------------------------------------------------------------------------

export interface DemoScenario {
  centreName: string;
  season: { start: string; end: string };
  clients: DemoClient[];
  stallions: DemoStallion[];
  collections: DemoCollection[];
  testisMeasurements: DemoTestisMeasurement[];
  fever: typeof DEMO_FEVER;
  bse: { stallionKey: string; date: string; gapMinutes: number }[];
  dsoRun: typeof DEMO_DSO_RUN;
}

/** The whole scenario as fresh objects (safe to modify). */
export function buildDemoScenario(seed: number = DEMO_SEED): DemoScenario {
  return {
    centreName: DEMO_CENTRE_NAME,
    season: { ...DEMO_SEASON },
    clients: DEMO_CLIENTS.map((c) => ({ ...c })),
    stallions: DEMO_STALLIONS.map((s) => ({ ...s })),
    collections: buildDemoCollections(seed),
    testisMeasurements: buildDemoTestisMeasurements(seed),
    fever: DEMO_FEVER,
    bse: DEMO_BSE.map((b) => ({ ...b })),
    dsoRun: DEMO_DSO_RUN,
  };
}
