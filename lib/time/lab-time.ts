import { TZDate } from '@date-fns/tz';

/*
 * The lab's clock. Instants are stored in UTC; people enter and read times on the wall clock
 * of the lab's time zone (a lab setting), and "the same day" means the same day there.
 */

export const DEFAULT_TIME_ZONE = 'UTC';

/** Whether the runtime knows this IANA time-zone name (e.g. Europe/London, America/New_York). */
export function isTimeZone(tz: string): boolean {
  if (!tz || tz.length > 64) return false;
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

/** Every zone the runtime knows, UTC first, for the settings page. */
export function timeZoneNames(): string[] {
  return ['UTC', ...Intl.supportedValuesOf('timeZone').filter((z) => z !== 'UTC')];
}

const WALL = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2}))?$/;

/**
 * A wall-clock time as a datetime-local input gives it ('YYYY-MM-DDTHH:mm'), read in the
 * lab's zone. A time skipped by a clock change is moved forward past the gap; a time that
 * happens twice is the first of the two. Null if the text is not such a time.
 */
export function wallTimeToDate(value: string, tz: string): Date | null {
  const m = WALL.exec(value);
  if (!m) return null;
  const [y, mo, d, h, mi, s] = m.slice(1).map((v) => Number(v ?? 0)) as [number, number, number, number, number, number];
  if (mo < 1 || mo > 12 || d < 1 || h > 23 || mi > 59 || s > 59) return null;
  const t = new TZDate(y, mo - 1, d, h, mi, s, tz);
  const out = new Date(t.getTime());
  return Number.isNaN(out.getTime()) || t.getMonth() !== mo - 1 ? null : out;
}

const pad = (n: number) => String(n).padStart(2, '0');

/** The instant as a datetime-local value on the lab's wall clock. */
export function dateToWallTime(at: Date | string, tz: string): string {
  const t = new TZDate(new Date(at).getTime(), tz);
  return `${t.getFullYear()}-${pad(t.getMonth() + 1)}-${pad(t.getDate())}T${pad(t.getHours())}:${pad(t.getMinutes())}`;
}

/** The lab's calendar day holding the instant, as [start, end) instants (23 or 25 hours across a clock change). */
export function labDay(at: Date, tz: string): { start: Date; end: Date } {
  const t = new TZDate(at.getTime(), tz);
  const start = new TZDate(t.getFullYear(), t.getMonth(), t.getDate(), 0, 0, 0, tz);
  const end = new TZDate(t.getFullYear(), t.getMonth(), t.getDate() + 1, 0, 0, 0, tz);
  return { start: new Date(start.getTime()), end: new Date(end.getTime()) };
}

/** 'YYYY-MM-DD' of the lab's calendar day holding the instant. */
export function labDayKey(at: Date, tz: string): string {
  return dateToWallTime(at, tz).slice(0, 10);
}

/** The lab's calendar year holding the instant, as [start, end) instants: the breeding season a dashboard counts. */
export function labYear(at: Date, tz: string): { year: number; start: Date; end: Date } {
  const year = new TZDate(at.getTime(), tz).getFullYear();
  const start = new TZDate(year, 0, 1, 0, 0, 0, tz);
  const end = new TZDate(year + 1, 0, 1, 0, 0, 0, tz);
  return { year, start: new Date(start.getTime()), end: new Date(end.getTime()) };
}

/** The instant in ISO 8601 with the lab's offset, e.g. '2026-05-12T10:35:00.000+01:00' (exports). */
export function isoInZone(at: Date | string, tz: string): string {
  return new TZDate(new Date(at).getTime(), tz).toISOString();
}

/** The instant a lab calendar date ('YYYY-MM-DD') begins in the zone (01:00 where a clock change skips midnight). */
export function labDateStart(date: string, tz: string): Date {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number];
  return new Date(new TZDate(y, m - 1, d, 0, 0, 0, tz).getTime());
}

/** The instant the lab calendar date after `date` begins: the exclusive end of that day. */
export function labDateEnd(date: string, tz: string): Date {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number];
  return new Date(new TZDate(y, m - 1, d + 1, 0, 0, 0, tz).getTime());
}
