/**
 * Spermatogenic window after a health event (fever, injury, treatment): sperm ejaculated
 * from the event day until spermatogenesis plus epididymal transit has passed may carry
 * its effects.
 *
 * Dates are UTC calendar days. A Date is reduced to its UTC day (time of day ignored); a
 * 'YYYY-MM-DD' string is read as that UTC day. The window is half-open:
 * [start, clears) — `start` is the event day (inside), `clears` is the first day after it.
 * Callers that store local dates should pass 'YYYY-MM-DD' strings so no time zone shifts a day.
 */

/** Days of spermatogenesis in the stallion (common practice; Swierstra, Gebauer & Pickett 1974, from memory). */
export const SPERMATOGENESIS_DAYS_DEFAULT = 57;
/** Epididymal transit, days (Gebauer, Pickett & Swierstra 1974: at least 4.9, on average 7.5–11). */
export const EPIDIDYMAL_TRANSIT_DAYS_DEFAULT = 10;

export interface WindowSettings {
  spermatogenesisDays?: number;
  epididymalTransitDays?: number;
}

export interface SpermatogenicWindow {
  /** Event day, 00:00 UTC; first day inside the window. */
  start: Date;
  /** First day after the window, 00:00 UTC (start + total days). */
  clears: Date;
  /** spermatogenesisDays + epididymalTransitDays. */
  totalDays: number;
}

export type WindowPosition = 'before' | 'inside' | 'after';

export type DateInput = Date | string;

const DAY_MS = 86_400_000;
const ISO_DAY = /^(\d{4})-(\d{2})-(\d{2})$/;

/** Whole UTC days since 1970-01-01 for a Date or a 'YYYY-MM-DD' string. */
export function utcDayNumber(input: DateInput): number {
  if (typeof input === 'string') {
    const m = ISO_DAY.exec(input);
    if (!m) throw new RangeError(`not a YYYY-MM-DD date: ${input}`);
    const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
    const ms = Date.UTC(y, mo - 1, d);
    const check = new Date(ms);
    // Date.UTC rolls 2024-02-30 into March; refuse it instead.
    if (check.getUTCFullYear() !== y || check.getUTCMonth() !== mo - 1 || check.getUTCDate() !== d) {
      throw new RangeError(`no such date: ${input}`);
    }
    return ms / DAY_MS;
  }
  const ms = input.getTime();
  if (Number.isNaN(ms)) throw new RangeError('invalid date');
  return Math.floor(ms / DAY_MS);
}

function checkDays(name: string, days: number): void {
  if (!Number.isInteger(days) || days < 0) throw new RangeError(`${name} must be a whole number of days ≥ 0`);
}

/** Window for a health event on `eventDate`; clears after 57 + 10 = 67 days by default. */
export function spermatogenicWindow(eventDate: DateInput, settings: WindowSettings = {}): SpermatogenicWindow {
  const {
    spermatogenesisDays = SPERMATOGENESIS_DAYS_DEFAULT,
    epididymalTransitDays = EPIDIDYMAL_TRANSIT_DAYS_DEFAULT,
  } = settings;
  checkDays('spermatogenesisDays', spermatogenesisDays);
  checkDays('epididymalTransitDays', epididymalTransitDays);
  const startDay = utcDayNumber(eventDate);
  const totalDays = spermatogenesisDays + epididymalTransitDays;
  return {
    start: new Date(startDay * DAY_MS),
    clears: new Date((startDay + totalDays) * DAY_MS),
    totalDays,
  };
}

/** Where a collection day falls relative to a window. */
export function windowPosition(window: SpermatogenicWindow, collectedAt: DateInput): WindowPosition {
  const day = utcDayNumber(collectedAt);
  if (day < utcDayNumber(window.start)) return 'before';
  if (day < utcDayNumber(window.clears)) return 'inside';
  return 'after';
}

export interface WindowedCollection {
  id: string;
  collectedAt: DateInput;
}

/**
 * Classify collections against a health event's window. Each result keeps the collection's
 * own fields and adds its position and `dayFromEvent` (UTC days after the event day; negative
 * before it, 0 on it), for charts.
 */
export function classifyCollections<C extends WindowedCollection>(
  eventDate: DateInput,
  collections: readonly C[],
  settings: WindowSettings = {},
): Array<C & { position: WindowPosition; dayFromEvent: number }> {
  const window = spermatogenicWindow(eventDate, settings);
  const eventDay = utcDayNumber(window.start);
  return collections.map((c) => ({
    ...c,
    position: windowPosition(window, c.collectedAt),
    dayFromEvent: utcDayNumber(c.collectedAt) - eventDay,
  }));
}
