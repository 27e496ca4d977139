/**
 * Sperm concentration from an improved Neubauer chamber, two replicate counts.
 * The central 1 mm² grid holds 25 squares of 0.2 × 0.2 × 0.1 mm = 4 nL each, so
 * concentration (10^6/mL) = count × dilution / (squares × 4).
 */
import { SemenInputError, requireFinite } from './errors';

/** Squares in the central grid of an improved Neubauer chamber. */
export const CHAMBER_MAX_SQUARES = 25;
/** Volume of one central-grid square, nL. */
export const CHAMBER_SQUARE_VOLUME_NL = 4;
/** Counts per replicate below which sampling error is large (from memory: WHO manual 2010 asks ~200). */
export const CHAMBER_MIN_COUNT_PER_REPLICATE = 200;

export interface ChamberInput {
  /** Dilution factor: 10 for 1:10 (1 part semen in 10 parts total). */
  dilution: number;
  /** Central-grid squares counted in each replicate (1–25). */
  squaresCounted: number;
  /** Sperm counted in replicate 1 and replicate 2. */
  counts: readonly [number, number];
  /** Lab setting; below it `lowCount` is set. */
  minCountPerReplicate?: number;
}

export interface ChamberResult {
  /** Mean of the two replicates, 10^6/mL. */
  concentrationMillionPerMl: number;
  /** Concentration from each replicate, 10^6/mL. */
  perChamber: [number, number];
  /** Replicates agree when |N1 − N2| ≤ allowedDifference. */
  agree: boolean;
  /** |N1 − N2|, sperm counted. */
  difference: number;
  /** 1.96 × √(N1 + N2), sperm counted (Poisson, 95 %). */
  allowedDifference: number;
  /** A replicate counted fewer sperm than `minCountPerReplicate`: count more squares. */
  lowCount: boolean;
}

function concentrationFor(count: number, dilution: number, squares: number): number {
  return (count * dilution) / (squares * CHAMBER_SQUARE_VOLUME_NL);
}

/** Concentration and replicate check; throws SemenInputError on impossible input. */
export function concentrationFromChamber(input: ChamberInput): ChamberResult {
  const { dilution, squaresCounted, counts, minCountPerReplicate = CHAMBER_MIN_COUNT_PER_REPLICATE } = input;
  requireFinite('dilution', dilution);
  if (dilution < 1) throw new SemenInputError('dilution', 'out-of-range', 'dilution factor must be at least 1');
  requireFinite('squaresCounted', squaresCounted);
  if (!Number.isInteger(squaresCounted)) {
    throw new SemenInputError('squaresCounted', 'not-integer', 'squares counted must be a whole number');
  }
  if (squaresCounted < 1 || squaresCounted > CHAMBER_MAX_SQUARES) {
    throw new SemenInputError(
      'squaresCounted',
      'out-of-range',
      `squares counted must be between 1 and ${CHAMBER_MAX_SQUARES}`,
    );
  }
  if (!Array.isArray(counts) || counts.length !== 2) {
    throw new SemenInputError('counts', 'out-of-range', 'exactly two replicate counts are needed');
  }
  counts.forEach((n, i) => {
    const field = `counts[${i}]`;
    requireFinite(field, n);
    if (n < 0) throw new SemenInputError(field, 'negative', 'a count cannot be negative');
    if (!Number.isInteger(n)) throw new SemenInputError(field, 'not-integer', 'a count must be a whole number');
  });

  const [n1, n2] = counts;
  const perChamber: [number, number] = [
    concentrationFor(n1, dilution, squaresCounted),
    concentrationFor(n2, dilution, squaresCounted),
  ];
  const difference = Math.abs(n1 - n2);
  const allowedDifference = 1.96 * Math.sqrt(n1 + n2);
  return {
    concentrationMillionPerMl: (perChamber[0] + perChamber[1]) / 2,
    perChamber,
    agree: difference <= allowedDifference,
    difference,
    allowedDifference,
    lowCount: Math.min(n1, n2) < minCountPerReplicate,
  };
}

export type ChamberOutcome =
  | ({ ok: true } & ChamberResult)
  | { ok: false; error: { field: string; code: SemenInputError['code']; message: string } };

/** Same as concentrationFromChamber, but returns the input error instead of throwing (for forms). */
export function tryConcentrationFromChamber(input: ChamberInput): ChamberOutcome {
  try {
    return { ok: true, ...concentrationFromChamber(input) };
  } catch (e) {
    if (e instanceof SemenInputError) {
      return { ok: false, error: { field: e.field, code: e.code, message: e.message } };
    }
    throw e;
  }
}
