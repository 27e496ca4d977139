/**
 * Testicular size and daily sperm output (DSO).
 * Units: testis dimensions and scrotal width in cm, volumes in mL (cm³), DSO in 10^9 sperm/day.
 */
import { SemenInputError, requireNonNegative, requirePositive } from './errors';

/**
 * Ellipsoid factor. The trade quotes 0.5233 for π/6 (≈ 0.5236) after Love et al. 1991;
 * we use the quoted figure so our volumes match the published regression and other labs' reports.
 */
export const TESTIS_ELLIPSOID_FACTOR = 0.5233;

/** Volume of one testis as an ellipsoid, mL: 0.5233 × length × width × height (cm). */
export function ellipsoidVolumeMl(lengthCm: number, widthCm: number, heightCm: number): number {
  requireNonNegative('lengthCm', lengthCm);
  requireNonNegative('widthCm', widthCm);
  requireNonNegative('heightCm', heightCm);
  return TESTIS_ELLIPSOID_FACTOR * lengthCm * widthCm * heightCm;
}

/** Total testicular volume, mL, from the left and right testis volumes (mL). */
export function totalTesticularVolume(leftMl: number, rightMl: number): number {
  requireNonNegative('leftMl', leftMl);
  requireNonNegative('rightMl', rightMl);
  return leftMl + rightMl;
}

/**
 * Love et al. 1991 regressions of DSO (10^9/day) on total testicular volume (mL):
 * primary 0.024 × V − 0.76; alternative fit 0.024 × V − 1.26.
 */
export const DSO_FITS = Object.freeze({
  primary: { slope: 0.024, intercept: -0.76 },
  alternative: { slope: 0.024, intercept: -1.26 },
});

export type DsoFit = keyof typeof DSO_FITS;

export interface PredictedDso {
  /** Predicted DSO, 10^9/day, never below 0. */
  billionPerDay: number;
  /** The regression's own value, 10^9/day (negative for very small testes). */
  unclampedBillionPerDay: number;
  /** True when the regression went below 0 and was clamped: testes too small for the fit. */
  clamped: boolean;
  fit: DsoFit;
}

export function predictedDailySpermOutputBillion(totalVolumeMl: number, fit: DsoFit = 'primary'): PredictedDso {
  requireNonNegative('totalVolumeMl', totalVolumeMl);
  const { slope, intercept } = DSO_FITS[fit];
  const unclamped = slope * totalVolumeMl + intercept;
  return {
    billionPerDay: Math.max(0, unclamped),
    unclampedBillionPerDay: unclamped,
    clamped: unclamped < 0,
    fit,
  };
}

export interface OutputComparison {
  /** Actual ÷ predicted; null when the prediction is 0. */
  ratio: number | null;
  /** ratio × 100; null when the prediction is 0. */
  percentOfPredicted: number | null;
  actualBillionPerDay: number;
  predictedBillionPerDay: number;
}

/** Actual against predicted DSO (both 10^9/day). */
export function compareOutput(actualDsoBillion: number, predicted: number | PredictedDso): OutputComparison {
  const predictedBillionPerDay = typeof predicted === 'number' ? predicted : predicted.billionPerDay;
  requireNonNegative('actualDsoBillion', actualDsoBillion);
  requireNonNegative('predicted', predictedBillionPerDay);
  const ratio = predictedBillionPerDay === 0 ? null : actualDsoBillion / predictedBillionPerDay;
  return {
    ratio,
    percentOfPredicted: ratio === null ? null : ratio * 100,
    actualBillionPerDay: actualDsoBillion,
    predictedBillionPerDay,
  };
}

/** Minimum total scrotal width, cm (Asbury 1988); a lab setting. */
export const SCROTAL_WIDTH_THRESHOLD_CM = 8;

/** Total scrotal width against the threshold (cm); reaching it passes. */
export function scrotalWidthCheck(
  widthCm: number,
  thresholdCm: number = SCROTAL_WIDTH_THRESHOLD_CM,
): { passes: boolean; marginCm: number; widthCm: number; thresholdCm: number } {
  requireNonNegative('widthCm', widthCm);
  requirePositive('thresholdCm', thresholdCm);
  return { passes: widthCm >= thresholdCm, marginCm: widthCm - thresholdCm, widthCm, thresholdCm };
}

// ---------------------------------------------------------------------------
// Actual daily sperm output

export interface DsoCollection {
  id: string;
  collectedAt: Date;
  /** Total sperm in the ejaculate, 10^9; null when not measured. */
  totalSpermBillion: number | null;
}

export interface DsoEstimateOptions {
  /** Daily collections that must come before a collection counts (depletes extragonadal reserves). */
  minPriorDailyCollections?: number;
  /** Shortest interval still counted as "daily", h (our choice: a same-day second ejaculate breaks the run). */
  minIntervalHours?: number;
  /** Longest interval still counted as "daily", h. */
  maxIntervalHours?: number;
}

/**
 * Common practice: after about a week of daily collection the extragonadal reserves are
 * depleted and each day's ejaculate approximates DSO. Defaults: 7 prior daily collections,
 * daily = 20–26 h apart (the 20 h floor is our choice).
 */
export const DSO_ESTIMATE_DEFAULTS: Readonly<Required<DsoEstimateOptions>> = Object.freeze({
  minPriorDailyCollections: 7,
  minIntervalHours: 20,
  maxIntervalHours: 26,
});

export interface DsoEstimate {
  /** Mean total sperm of the stable collections, 10^9/day; null when none qualifies. */
  dsoBillion: number | null;
  /** Ids of the collections averaged, in time order. */
  usedIds: string[];
}

const HOUR_MS = 3_600_000;

/**
 * Estimate actual DSO: average total sperm of collections that come after at least
 * `minPriorDailyCollections` unbroken daily collections. A gap outside the daily interval starts
 * a new run; a collection with unknown total sperm still counts towards the run.
 */
export function estimateActualDso(
  collections: readonly DsoCollection[],
  options: DsoEstimateOptions = {},
): DsoEstimate {
  const { minPriorDailyCollections, minIntervalHours, maxIntervalHours } = { ...DSO_ESTIMATE_DEFAULTS, ...options };
  requireNonNegative('minPriorDailyCollections', minPriorDailyCollections);
  if (!Number.isInteger(minPriorDailyCollections)) {
    throw new SemenInputError('minPriorDailyCollections', 'not-integer', 'must be a whole number');
  }
  requireNonNegative('minIntervalHours', minIntervalHours);
  requirePositive('maxIntervalHours', maxIntervalHours);
  if (minIntervalHours > maxIntervalHours) {
    throw new SemenInputError('minIntervalHours', 'out-of-range', 'must not exceed maxIntervalHours');
  }
  for (const c of collections) {
    if (!(c.collectedAt instanceof Date) || Number.isNaN(c.collectedAt.getTime())) {
      throw new SemenInputError('collectedAt', 'not-finite', `collection ${c.id} has no valid date`);
    }
    if (c.totalSpermBillion !== null) requireNonNegative('totalSpermBillion', c.totalSpermBillion);
  }

  const sorted = [...collections].sort((a, b) => a.collectedAt.getTime() - b.collectedAt.getTime());
  const used: DsoCollection[] = [];
  let priorInRun = 0;
  for (let i = 0; i < sorted.length; i++) {
    const c = sorted[i];
    if (i > 0) {
      const hours = (c.collectedAt.getTime() - sorted[i - 1].collectedAt.getTime()) / HOUR_MS;
      const daily = hours >= minIntervalHours && hours <= maxIntervalHours;
      priorInRun = daily ? priorInRun + 1 : 0;
    }
    // A collection after a broken gap (priorInRun 0) never counts, even with minPriorDailyCollections 0.
    if (priorInRun > 0 && priorInRun >= minPriorDailyCollections && c.totalSpermBillion !== null) {
      used.push(c);
    }
  }
  const dsoBillion =
    used.length === 0 ? null : used.reduce((sum, c) => sum + (c.totalSpermBillion ?? 0), 0) / used.length;
  return { dsoBillion, usedIds: used.map((c) => c.id) };
}
