/**
 * Semen arithmetic for one ejaculate. Pure; no rounding (formatting belongs to the UI).
 * Units: volume mL, concentration 10^6/mL, motility and morphology in %, sperm numbers in 10^9.
 */
import {
  SemenInputError,
  requireNonNegative,
  requirePercent,
  requirePositive,
} from './errors';

export interface SemenTotalsInput {
  /** Gel-free volume, mL. */
  volumeMl: number;
  /** Concentration, 10^6 sperm/mL. */
  concentrationMillionPerMl: number;
  /** Total motility, % of sperm. */
  totalMotilityPct: number;
  /** Progressive motility, % of sperm (≤ total motility). */
  progressiveMotilityPct: number;
  /** Morphologically normal sperm, %; null or omitted when no morphology read exists yet. */
  normalPct?: number | null;
}

export interface SemenTotals {
  /** Total sperm in the ejaculate, 10^9. */
  totalSpermBillion: number;
  /** Total motile sperm, 10^9. */
  totalMotileBillion: number;
  /** Progressively motile sperm (PMS), 10^9. */
  progressivelyMotileBillion: number;
  /** Progressively motile, morphologically normal sperm (PMMN), 10^9; null when % normal is unknown. */
  pmmnBillion: number | null;
}

/** Total = volume × concentration; motile, PMS and PMMN are percentages of that total. */
export function semenTotals(input: SemenTotalsInput): SemenTotals {
  const { volumeMl, concentrationMillionPerMl, totalMotilityPct, progressiveMotilityPct } = input;
  requireNonNegative('volumeMl', volumeMl);
  requireNonNegative('concentrationMillionPerMl', concentrationMillionPerMl);
  requirePercent('totalMotilityPct', totalMotilityPct);
  requirePercent('progressiveMotilityPct', progressiveMotilityPct);
  if (progressiveMotilityPct > totalMotilityPct) {
    throw new SemenInputError(
      'progressiveMotilityPct',
      'out-of-range',
      'progressive motility cannot exceed total motility',
    );
  }
  const normalPct = input.normalPct ?? null;
  if (normalPct !== null) requirePercent('normalPct', normalPct);

  // mL × 10^6/mL = 10^6 sperm; divide by 1000 to express in 10^9.
  const totalSpermBillion = (volumeMl * concentrationMillionPerMl) / 1000;
  const progressivelyMotileBillion = (totalSpermBillion * progressiveMotilityPct) / 100;
  return {
    totalSpermBillion,
    totalMotileBillion: (totalSpermBillion * totalMotilityPct) / 100,
    progressivelyMotileBillion,
    pmmnBillion: normalPct === null ? null : (progressivelyMotileBillion * normalPct) / 100,
  };
}

export interface InsemDosesInput {
  /** Sperm available on the dose's basis (PMS or total), 10^9. */
  availableBillion: number;
  /** Sperm per dose on the same basis, 10^9. */
  doseSizeBillion: number;
}

export interface InsemDoses {
  /** Whole doses that can be filled. */
  doses: number;
  /** Sperm left over after filling them, 10^9. */
  remainderBillion: number;
}

// Relative tolerance for quotients that are whole numbers on paper but not in binary
// floating point (4.5 / 0.5, 0.3 / 0.1): far below one sperm cell in any real ejaculate.
const QUOTIENT_EPSILON = 1e-9;

/** Whole insemination doses of a given size, and what is left over. */
export function insemDoses({ availableBillion, doseSizeBillion }: InsemDosesInput): InsemDoses {
  requireNonNegative('availableBillion', availableBillion);
  requirePositive('doseSizeBillion', doseSizeBillion);

  const quotient = availableBillion / doseSizeBillion;
  const nearest = Math.round(quotient);
  const doses =
    Math.abs(quotient - nearest) <= QUOTIENT_EPSILON * Math.max(1, nearest) ? nearest : Math.floor(quotient);
  // Round the remainder to whole sperm (10^-9 of 10^9) so 7.5 − 15 × 0.5 reads 0, not 1e-16.
  const remainderBillion = Math.max(0, Math.round((availableBillion - doses * doseSizeBillion) * 1e9) / 1e9);
  return { doses, remainderBillion };
}

/** Which sperm a dose size counts: progressively motile sperm, or all sperm. */
export type DoseBasis = 'progressive' | 'total';

export type Preparation = 'fresh' | 'cooled' | 'frozen';

export interface DoseDefault {
  /** Sperm per dose, 10^9, on `basis`. */
  sizeBillion: number;
  basis: DoseBasis;
  /** Where the default comes from, for the settings page. */
  source: string;
}

/** Default dose sizes; each lab may override them in its settings. */
export const DOSE_DEFAULTS: Readonly<Record<Preparation, DoseDefault>> = Object.freeze({
  fresh: {
    sizeBillion: 0.5,
    basis: 'progressive',
    source:
      'Brinsko 2006, "Insemination doses: how low can we go?", Theriogenology 66:543–550 (500 × 10^6 progressively motile sperm)',
  },
  cooled: {
    sizeBillion: 1.0,
    basis: 'progressive',
    source:
      'Industry standard of 1 × 10^9 progressively motile sperm for cooled shipped semen, as cited in Brinsko 2006, Theriogenology 66:543–550',
  },
  frozen: {
    sizeBillion: 0.8,
    basis: 'total',
    source: 'Common practice: about 800 × 10^6 total sperm per frozen dose',
  },
});

/** Sperm in an ejaculate on a dose basis, 10^9. */
export function spermOnBasisBillion(totals: SemenTotals, basis: DoseBasis): number {
  return basis === 'progressive' ? totals.progressivelyMotileBillion : totals.totalSpermBillion;
}

/** Doses of a given kind (e.g. DOSE_DEFAULTS.cooled or a lab's own) from one ejaculate. */
export function dosesFromTotals(
  totals: SemenTotals,
  dose: Pick<DoseDefault, 'sizeBillion' | 'basis'>,
): InsemDoses & { basis: DoseBasis } {
  return {
    ...insemDoses({ availableBillion: spermOnBasisBillion(totals, dose.basis), doseSizeBillion: dose.sizeBillion }),
    basis: dose.basis,
  };
}

// ---------------------------------------------------------------------------
// Breeding soundness

/** Default PMMN threshold in the second ejaculate, 10^9 (Society for Theriogenology criterion). */
export const BREEDING_SOUNDNESS_PMMN_THRESHOLD_BILLION = 1;

export interface BreedingSoundnessInput {
  /** PMMN of the second of two ejaculates, 10^9; null when it cannot be computed yet. */
  secondEjaculatePmmnBillion: number | null;
  /** Lab setting, 10^9; default 1. */
  thresholdBillion?: number;
}

export interface BreedingSoundnessResult {
  status: 'pass' | 'fail' | 'unknown';
  /** null when PMMN is unknown. */
  passes: boolean | null;
  /** PMMN minus threshold, 10^9 (negative when short); null when PMMN is unknown. */
  margin: number | null;
  /** PMMN as % of the threshold; null when PMMN is unknown. */
  percentOfThreshold: number | null;
  pmmnBillion: number | null;
  thresholdBillion: number;
}

/** PMMN in the second ejaculate against the lab's threshold; reaching the threshold passes. */
export function breedingSoundness({
  secondEjaculatePmmnBillion,
  thresholdBillion = BREEDING_SOUNDNESS_PMMN_THRESHOLD_BILLION,
}: BreedingSoundnessInput): BreedingSoundnessResult {
  requirePositive('thresholdBillion', thresholdBillion);
  if (secondEjaculatePmmnBillion === null) {
    return {
      status: 'unknown',
      passes: null,
      margin: null,
      percentOfThreshold: null,
      pmmnBillion: null,
      thresholdBillion,
    };
  }
  requireNonNegative('secondEjaculatePmmnBillion', secondEjaculatePmmnBillion);
  const passes = secondEjaculatePmmnBillion >= thresholdBillion;
  return {
    status: passes ? 'pass' : 'fail',
    passes,
    margin: secondEjaculatePmmnBillion - thresholdBillion,
    percentOfThreshold: (secondEjaculatePmmnBillion / thresholdBillion) * 100,
    pmmnBillion: secondEjaculatePmmnBillion,
    thresholdBillion,
  };
}

/**
 * "About an hour apart": the criterion says one hour; the tolerance is our own choice,
 * a lab setting with default 60 ± 30 min (pairs collected 30–90 min apart qualify).
 */
export const EJACULATE_PAIR_GAP_DEFAULT: Readonly<EjaculatePairGap> = Object.freeze({ targetMinutes: 60, toleranceMinutes: 30 });

export interface EjaculatePairGap {
  targetMinutes: number;
  toleranceMinutes: number;
}

export interface TimedCollection {
  id: string;
  collectedAt: Date;
  /** PMMN, 10^9; null when not yet known. */
  pmmnBillion: number | null;
}

export interface EjaculatePair<C extends TimedCollection> {
  first: C;
  second: C;
  gapMinutes: number;
}

export interface SecondEjaculatePick<C extends TimedCollection> {
  /** Second collection of the earliest qualifying pair, or null when there is none. */
  second: C | null;
  /** Every qualifying pair, earliest first. */
  pairs: EjaculatePair<C>[];
}

const MINUTE_MS = 60_000;

/**
 * From one stallion's collections (any order), find back-to-back collections taken about an
 * hour apart and pick the second one. Only consecutive collections pair up: a collection in
 * between would make the later one a third ejaculate. Day boundaries are not checked because
 * the gap itself limits a pair to a short span.
 */
export function pickSecondEjaculate<C extends TimedCollection>(
  collections: readonly C[],
  gap: EjaculatePairGap = EJACULATE_PAIR_GAP_DEFAULT,
): SecondEjaculatePick<C> {
  requirePositive('targetMinutes', gap.targetMinutes);
  requireNonNegative('toleranceMinutes', gap.toleranceMinutes);
  const minGap = Math.max(0, gap.targetMinutes - gap.toleranceMinutes);
  const maxGap = gap.targetMinutes + gap.toleranceMinutes;

  for (const c of collections) {
    if (!(c.collectedAt instanceof Date) || Number.isNaN(c.collectedAt.getTime())) {
      throw new SemenInputError('collectedAt', 'not-finite', `collection ${c.id} has no valid date`);
    }
  }
  const sorted = [...collections].sort((a, b) => a.collectedAt.getTime() - b.collectedAt.getTime());
  const pairs: EjaculatePair<C>[] = [];
  for (let i = 1; i < sorted.length; i++) {
    const first = sorted[i - 1];
    const second = sorted[i];
    const gapMinutes = (second.collectedAt.getTime() - first.collectedAt.getTime()) / MINUTE_MS;
    if (gapMinutes > 0 && gapMinutes >= minGap && gapMinutes <= maxGap) {
      pairs.push({ first, second, gapMinutes });
    }
  }
  return { second: pairs[0]?.second ?? null, pairs };
}

/** Pick the second ejaculate and judge its PMMN; `result` is null when no pair was found. */
export function breedingSoundnessFromCollections<C extends TimedCollection>(
  collections: readonly C[],
  options: { thresholdBillion?: number; gap?: EjaculatePairGap } = {},
): { pair: EjaculatePair<C> | null; result: BreedingSoundnessResult | null } {
  const { pairs } = pickSecondEjaculate(collections, options.gap);
  const pair = pairs[0] ?? null;
  if (!pair) return { pair: null, result: null };
  return {
    pair,
    result: breedingSoundness({
      secondEjaculatePmmnBillion: pair.second.pmmnBillion,
      thresholdBillion: options.thresholdBillion,
    }),
  };
}

// ---------------------------------------------------------------------------
// Entry checks for a collection form

export interface SemenValues {
  volumeMl?: number | null;
  concentrationMillionPerMl?: number | null;
  totalMotilityPct?: number | null;
  progressiveMotilityPct?: number | null;
  normalPct?: number | null;
}

export type SemenField = keyof SemenValues;

export interface SemenIssue {
  field: SemenField;
  message: string;
}

/**
 * Plausible-but-unusual bounds for a stallion ejaculate: a warning asks the technician to
 * re-check, never blocks. Common practice / from memory, not from one published source.
 */
export interface SemenWarningThresholds {
  maxVolumeMl: number;
  maxConcentrationMillionPerMl: number;
  minConcentrationMillionPerMl: number;
  minProgressiveMotilityPct: number;
}

export const SEMEN_WARNING_THRESHOLDS: Readonly<SemenWarningThresholds> = Object.freeze({
  /** Gel-free volume above this is rare (from memory). */
  maxVolumeMl: 200,
  /** Above this, suspect a dilution or entry error (from memory). */
  maxConcentrationMillionPerMl: 1000,
  /** Below this, suspect an entry error or a very poor ejaculate (from memory). */
  minConcentrationMillionPerMl: 10,
  /** Progressive motility below this is unusual enough to re-check (common practice). */
  minProgressiveMotilityPct: 20,
});

const present = (v: number | null | undefined): v is number => v !== null && v !== undefined;

/** Impossible values: each must be corrected before the collection is saved. */
export function semenErrors(values: SemenValues): SemenIssue[] {
  const errors: SemenIssue[] = [];
  const nonNegative = (field: SemenField, label: string) => {
    const v = values[field];
    if (!present(v)) return;
    if (!Number.isFinite(v)) errors.push({ field, message: `${label} must be a number` });
    else if (v < 0) errors.push({ field, message: `${label} cannot be negative` });
  };
  const percent = (field: SemenField, label: string) => {
    const v = values[field];
    if (!present(v)) return;
    if (!Number.isFinite(v)) errors.push({ field, message: `${label} must be a number` });
    else if (v < 0 || v > 100) errors.push({ field, message: `${label} must be between 0 and 100 %` });
  };
  nonNegative('volumeMl', 'Volume');
  nonNegative('concentrationMillionPerMl', 'Concentration');
  percent('totalMotilityPct', 'Total motility');
  percent('progressiveMotilityPct', 'Progressive motility');
  percent('normalPct', '% normal');

  const { totalMotilityPct: total, progressiveMotilityPct: progressive } = values;
  if (present(total) && present(progressive) && progressive > total) {
    errors.push({ field: 'progressiveMotilityPct', message: 'Progressive motility cannot exceed total motility' });
  }
  if (present(values.concentrationMillionPerMl) && !present(values.volumeMl)) {
    errors.push({ field: 'volumeMl', message: 'Volume is needed when a concentration is given' });
  }
  return errors;
}

/** Unusual but possible values, each with a prompt to re-check. Values in error are skipped. */
export function semenWarnings(
  values: SemenValues,
  thresholds: Readonly<SemenWarningThresholds> = SEMEN_WARNING_THRESHOLDS,
): SemenIssue[] {
  const inError = new Set(semenErrors(values).map((e) => e.field));
  const ok = (field: SemenField): number | null => {
    const v = values[field];
    return present(v) && !inError.has(field) ? v : null;
  };
  const warnings: SemenIssue[] = [];
  const volume = ok('volumeMl');
  if (volume !== null && volume > thresholds.maxVolumeMl) {
    warnings.push({ field: 'volumeMl', message: `Volume above ${thresholds.maxVolumeMl} mL is unusual; please re-check` });
  }
  const conc = ok('concentrationMillionPerMl');
  if (conc !== null && conc > thresholds.maxConcentrationMillionPerMl) {
    warnings.push({
      field: 'concentrationMillionPerMl',
      message: `Concentration above ${thresholds.maxConcentrationMillionPerMl} × 10^6/mL is unusual; check the dilution`,
    });
  }
  if (conc !== null && conc < thresholds.minConcentrationMillionPerMl) {
    warnings.push({
      field: 'concentrationMillionPerMl',
      message: `Concentration below ${thresholds.minConcentrationMillionPerMl} × 10^6/mL is unusual; please re-check`,
    });
  }
  const progressive = ok('progressiveMotilityPct');
  if (progressive !== null && progressive < thresholds.minProgressiveMotilityPct) {
    warnings.push({
      field: 'progressiveMotilityPct',
      message: `Progressive motility below ${thresholds.minProgressiveMotilityPct} % is unusual; please re-check`,
    });
  }
  return warnings;
}
