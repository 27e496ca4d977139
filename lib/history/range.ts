/**
 * The date ranges the history page offers, as the lab's calendar days (both ends inclusive):
 * a season (the lab's calendar year, as the dashboard counts it), the last 90 days up to today,
 * or a custom range. Pure.
 */
import { dateDayNumber, dayNumberDate, type LabDate } from '@/lib/windows/window';

export type DateRange = { from: LabDate; to: LabDate };
export const RANGE_PRESETS = ['season', 'last90', 'custom'] as const;
export type RangePreset = (typeof RANGE_PRESETS)[number];

export const seasonRange = (year: number): DateRange => ({ from: `${year}-01-01`, to: `${year}-12-31` });

/** The 90 days ending today (today is day 90). */
export function last90Range(today: LabDate): DateRange {
  return { from: dayNumberDate(dateDayNumber(today) - 89), to: today };
}

/** Which preset a range is, for the picker: a whole year is a season, 90 days to today the last 90 days. */
export function presetOf(range: DateRange, today: LabDate): RangePreset {
  const year = Number(range.from.slice(0, 4));
  const season = seasonRange(year);
  if (range.from === season.from && range.to === season.to) return 'season';
  const last = last90Range(today);
  if (range.from === last.from && range.to === last.to) return 'last90';
  return 'custom';
}
