/**
 * Spermatogenic window after a health event (fever, injury, treatment): sperm ejaculated
 * from the event day until spermatogenesis plus epididymal transit has passed may carry
 * its effects.
 *
 * Days are the lab's calendar days, in the lab's IANA time zone (the lab setting `timeZone`,
 * the same calendar that makes "the same day" for collections; lib/time/lab-time.ts):
 * - a 'YYYY-MM-DD' string is a lab date as it stands (health events are recorded as dates);
 * - a Date, or an ISO string with a time, is an instant, reduced to the lab date it falls on
 *   there (23:30 in New York is still that day, though UTC has moved on).
 * Counting is done on the dates themselves (whole calendar days), never by adding 24-hour
 * spans to an instant, so a clock change inside a window cannot move a boundary by a day.
 *
 * The window is half-open over dates: [start, clears). Day 1 is the event's start date; the
 * last day inside is day `totalDays`; `clears` is the first date after it.
 *
 * An event that lasts several days (an illness from 4 to 9 May, a course of treatment) keeps
 * harming germ cells until its last day, and the cells that were at the earliest stage on that
 * day reach the ejaculate spermatogenesis + transit later. So the window opens on the start date
 * and clears spermatogenesis + transit days after the END date (the start date when no end is
 * given): clears = end + spermatogenesisDays + epididymalTransitDays. A one-day event keeps the
 * plain 57 + 10 = 67 days; an event of n days gives a window of n − 1 + 67 days.
 */
import { TZDate } from '@date-fns/tz';
import { DEFAULT_TIME_ZONE, isTimeZone, labDayKey } from '@/lib/time/lab-time';

/** Days of spermatogenesis in the stallion (common practice; Swierstra, Gebauer & Pickett 1974, from memory). */
export const SPERMATOGENESIS_DAYS_DEFAULT = 57;
/** Epididymal transit, days (Gebauer, Pickett & Swierstra 1974: at least 4.9, on average 7.5–11). */
export const EPIDIDYMAL_TRANSIT_DAYS_DEFAULT = 10;

/** The lab settings the window needs (the LabSettings object itself fits). */
export interface WindowSettings {
  spermatogenesisDays?: number;
  epididymalTransitDays?: number;
  /** IANA zone of the lab's calendar; default UTC. */
  timeZone?: string;
}

/** A lab calendar date, 'YYYY-MM-DD'. */
export type LabDate = string;

export interface SpermatogenicWindow {
  /** Event's start date: day 1, the first day inside. */
  startDate: LabDate;
  /** Event's last day (its end date, or its start date when it has none). */
  endDate: LabDate;
  /** Last day inside (day `totalDays`). */
  lastDate: LabDate;
  /** First date after the window: re-evaluate from here. */
  clearsDate: LabDate;
  /** Instant the start date begins in the lab's zone (for charts). */
  start: Date;
  /** Instant the clears date begins in the lab's zone. */
  clears: Date;
  /** Days inside the window, day 1 to its last day: (end − start) + spermatogenesis + transit. */
  totalDays: number;
  /** spermatogenesisDays + epididymalTransitDays: the days after the event's last day. */
  spermatogenicDays: number;
  timeZone: string;
}

export type WindowPosition = 'before' | 'inside' | 'after';

/** A lab date ('YYYY-MM-DD'), a Date, or an ISO 8601 instant with a time and zone. */
export type DateInput = Date | string;

const DAY_MS = 86_400_000;
const ISO_DAY = /^(\d{4})-(\d{2})-(\d{2})$/;
const ISO_INSTANT = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:\d{2})$/;

// Checking a zone builds an Intl formatter: remember the ones already found good.
const knownZones = new Set<string>();
function checkZone(timeZone: string): string {
  if (knownZones.has(timeZone)) return timeZone;
  if (!isTimeZone(timeZone)) throw new RangeError(`unknown time zone: ${timeZone}`);
  knownZones.add(timeZone);
  return timeZone;
}

/** Whole days since 1970-01-01 of a 'YYYY-MM-DD' calendar date (zone-free: a date is a date). */
export function dateDayNumber(date: LabDate): number {
  const m = ISO_DAY.exec(date);
  if (!m) throw new RangeError(`not a YYYY-MM-DD date: ${date}`);
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const ms = Date.UTC(y, mo - 1, d);
  const check = new Date(ms);
  // Date.UTC rolls 2025-02-29 into March; refuse it instead.
  if (check.getUTCFullYear() !== y || check.getUTCMonth() !== mo - 1 || check.getUTCDate() !== d) {
    throw new RangeError(`no such date: ${date}`);
  }
  return ms / DAY_MS;
}

/** The 'YYYY-MM-DD' date of a day number. */
export function dayNumberDate(day: number): LabDate {
  return new Date(day * DAY_MS).toISOString().slice(0, 10);
}

/** The lab date of a date or an instant (see the module comment). */
export function labDate(input: DateInput, timeZone: string = DEFAULT_TIME_ZONE): LabDate {
  checkZone(timeZone);
  if (typeof input === 'string') {
    if (ISO_DAY.test(input)) {
      dateDayNumber(input); // refuses impossible dates
      return input;
    }
    if (!ISO_INSTANT.test(input)) throw new RangeError(`not a date or an ISO 8601 instant: ${input}`);
    input = new Date(input);
  }
  if (Number.isNaN(input.getTime())) throw new RangeError('invalid date');
  return labDayKey(input, timeZone);
}

/** Whole days since 1970-01-01 of the lab date of a date or an instant. */
export function labDayNumber(input: DateInput, timeZone: string = DEFAULT_TIME_ZONE): number {
  return dateDayNumber(labDate(input, timeZone));
}

/** The instant a lab date begins in the zone (a midnight skipped by a clock change begins at 01:00). */
function dateStart(date: LabDate, timeZone: string): Date {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number];
  return new Date(new TZDate(y, m - 1, d, 0, 0, 0, timeZone).getTime());
}

function checkDays(name: string, days: number): void {
  if (!Number.isInteger(days) || days < 0) throw new RangeError(`${name} must be a whole number of days ≥ 0`);
}

/**
 * Window for a health event starting on `eventDate` and, when given, lasting until `endDate`
 * (inclusive); clears 57 + 10 = 67 days after the event's last day by default.
 */
export function spermatogenicWindow(eventDate: DateInput, settings: WindowSettings = {}, endDate?: DateInput | null): SpermatogenicWindow {
  const {
    spermatogenesisDays = SPERMATOGENESIS_DAYS_DEFAULT,
    epididymalTransitDays = EPIDIDYMAL_TRANSIT_DAYS_DEFAULT,
    timeZone = DEFAULT_TIME_ZONE,
  } = settings;
  checkDays('spermatogenesisDays', spermatogenesisDays);
  checkDays('epididymalTransitDays', epididymalTransitDays);
  const startDate = labDate(eventDate, timeZone);
  const startDay = dateDayNumber(startDate);
  const lastEventDate = endDate == null ? startDate : labDate(endDate, timeZone);
  const lastEventDay = dateDayNumber(lastEventDate);
  if (lastEventDay < startDay) throw new RangeError(`an event cannot end (${lastEventDate}) before it starts (${startDate})`);
  const spermatogenicDays = spermatogenesisDays + epididymalTransitDays;
  const clearsDay = lastEventDay + spermatogenicDays;
  const totalDays = clearsDay - startDay;
  const clearsDate = dayNumberDate(clearsDay);
  return {
    startDate,
    endDate: lastEventDate,
    lastDate: dayNumberDate(clearsDay - 1),
    clearsDate,
    start: dateStart(startDate, timeZone),
    clears: dateStart(clearsDate, timeZone),
    totalDays,
    spermatogenicDays,
    timeZone,
  };
}

/** Where a collection falls relative to a window, on the window's lab calendar. */
export function windowPosition(window: SpermatogenicWindow, collectedAt: DateInput): WindowPosition {
  const day = labDayNumber(collectedAt, window.timeZone);
  if (day < dateDayNumber(window.startDate)) return 'before';
  if (day < dateDayNumber(window.clearsDate)) return 'inside';
  return 'after';
}

/** The day of the window a collection falls on (1 = the event's start date), or null outside it. */
export function windowDay(window: SpermatogenicWindow, collectedAt: DateInput): number | null {
  const day = labDayNumber(collectedAt, window.timeZone) - dateDayNumber(window.startDate) + 1;
  return day >= 1 && day <= window.totalDays ? day : null;
}

export interface WindowedCollection {
  id: string;
  collectedAt: DateInput;
}

/**
 * Classify collections against one health event's window. Each result keeps the collection's
 * own fields and adds its position, `dayFromEvent` (lab days after the event's start date:
 * negative before it, 0 on it; for charts) and `windowDay` (1 on the start date, null outside).
 */
export function classifyCollections<C extends WindowedCollection>(
  eventDate: DateInput,
  collections: readonly C[],
  settings: WindowSettings = {},
  endDate?: DateInput | null,
): Array<C & { position: WindowPosition; dayFromEvent: number; windowDay: number | null }> {
  const window = spermatogenicWindow(eventDate, settings, endDate);
  const eventDay = dateDayNumber(window.startDate);
  return collections.map((c) => ({
    ...c,
    position: windowPosition(window, c.collectedAt),
    dayFromEvent: labDayNumber(c.collectedAt, window.timeZone) - eventDay,
    windowDay: windowDay(window, c.collectedAt),
  }));
}

export interface WindowEvent {
  id: string;
  /** The event's start date (a lab date) or instant. */
  startDate: DateInput;
  /** Its last day, inclusive (null or omitted: a one-day event, or one still going on as far as is recorded). */
  endDate?: DateInput | null;
}

/** An event's window, with the event's id. */
export interface EventWindow extends SpermatogenicWindow {
  eventId: string;
}

/** Overlapping (or touching) windows merged into one stretch, for the flag and for shading charts. */
export interface MergedWindow {
  startDate: LabDate;
  /** First date after the last of the merged windows. */
  clearsDate: LabDate;
  start: Date;
  clears: Date;
  /** The events whose windows make up this stretch, by start date. */
  eventIds: string[];
}

/** Every event's window, by start date (then event id). */
export function eventWindows(events: readonly WindowEvent[], settings: WindowSettings = {}): EventWindow[] {
  return events
    .map((e) => ({ eventId: e.id, ...spermatogenicWindow(e.startDate, settings, e.endDate) }))
    .sort((a, b) => (a.startDate < b.startDate ? -1 : a.startDate > b.startDate ? 1 : a.eventId < b.eventId ? -1 : a.eventId > b.eventId ? 1 : 0));
}

/**
 * Windows merged where they overlap or touch (one clears the day the next starts: there is no
 * clean day between them). Empty windows (0 days) merge into nothing.
 */
export function mergeWindows(windows: readonly EventWindow[]): MergedWindow[] {
  const sorted = [...windows].filter((w) => w.totalDays > 0).sort((a, b) => (a.startDate < b.startDate ? -1 : a.startDate > b.startDate ? 1 : 0));
  const merged: MergedWindow[] = [];
  for (const w of sorted) {
    const last = merged[merged.length - 1];
    if (last && w.startDate <= last.clearsDate) {
      if (w.clearsDate > last.clearsDate) {
        last.clearsDate = w.clearsDate;
        last.clears = w.clears;
      }
      last.eventIds.push(w.eventId);
    } else {
      merged.push({ startDate: w.startDate, clearsDate: w.clearsDate, start: w.start, clears: w.clears, eventIds: [w.eventId] });
    }
  }
  return merged;
}

export interface CollectionWindowFlag {
  /** First date after the merged stretch of windows holding this collection: re-evaluate from here. */
  clearsDate: LabDate;
  /** Each event whose own window covers the collection, by start date, with the day of its window. */
  events: { eventId: string; windowDay: number; startDate: LabDate; clearsDate: LabDate }[];
}

/**
 * Flag collections against every health event of a stallion. A collection inside any window
 * gets one flag (windows merged: the flag clears when the whole stretch does) listing each
 * event that covers it; outside every window the flag is null.
 */
export function flagCollections<C extends WindowedCollection>(
  events: readonly WindowEvent[],
  collections: readonly C[],
  settings: WindowSettings = {},
): Array<C & { window: CollectionWindowFlag | null }> {
  const windows = eventWindows(events, settings);
  const merged = mergeWindows(windows);
  const timeZone = checkZone(settings.timeZone ?? DEFAULT_TIME_ZONE);
  return collections.map((c) => {
    const date = labDate(c.collectedAt, timeZone);
    const covering = windows.flatMap((w) => {
      const day = windowDay(w, date);
      return day === null ? [] : [{ eventId: w.eventId, windowDay: day, startDate: w.startDate, clearsDate: w.clearsDate }];
    });
    if (covering.length === 0) return { ...c, window: null };
    const stretch = merged.find((m) => m.startDate <= date && date < m.clearsDate)!;
    return { ...c, window: { clearsDate: stretch.clearsDate, events: covering } };
  });
}

/**
 * While a window is open on `at` (default now), the date to re-evaluate from: the first date
 * after the merged stretch holding `at`'s lab date. Null when no window is open.
 */
export function reEvaluateFrom(events: readonly WindowEvent[], settings: WindowSettings = {}, at: Date = new Date()): LabDate | null {
  const date = labDate(at, settings.timeZone ?? DEFAULT_TIME_ZONE);
  const open = mergeWindows(eventWindows(events, settings)).find((m) => m.startDate <= date && date < m.clearsDate);
  return open?.clearsDate ?? null;
}
