/**
 * The columns of the collection exports (CSV and .xlsx), one list for both. Numbers go out
 * unformatted (as computed, full precision, no units or thousands separators; the unit is in the
 * header); instants as ISO 8601 with the lab's offset; lab dates as YYYY-MM-DD. Pure.
 */
import { isoInZone } from '@/lib/time/lab-time';
import { HISTORY_DEFECT_LABELS, HISTORY_DEFECTS, type HistoryPoint } from './series';

export type ExportValue = string | number | null;
export interface ExportColumn {
  header: string;
  value: (p: HistoryPoint, timeZone: string) => ExportValue;
}

const READ_BASIS = { settled: 'settled read', 'first-unchecked': 'first read (not checked by a second reader)' } as const;

export const EXPORT_COLUMNS: readonly ExportColumn[] = [
  { header: 'Collection id', value: (p) => p.id },
  { header: 'Stallion', value: (p) => p.stallion },
  { header: 'Collected at', value: (p, tz) => isoInZone(p.collectedAt, tz) },
  { header: 'Lab date', value: (p) => p.labDate },
  { header: 'Ejaculate of the day', value: (p) => p.numberThatDay },
  { header: 'Days since previous collection', value: (p) => p.daysSincePrevious },
  { header: 'Gel-free volume (mL)', value: (p) => p.volumeMl },
  { header: 'Concentration (10^6/mL)', value: (p) => p.concentrationMillionPerMl },
  { header: 'Total motility (%)', value: (p) => p.totalMotilityPct },
  { header: 'Progressive motility (%)', value: (p) => p.progressiveMotilityPct },
  { header: 'Total sperm (10^9)', value: (p) => p.totalSpermBillion },
  { header: 'Progressively motile sperm (10^9)', value: (p) => p.progressivelyMotileBillion },
  { header: 'PMMN (10^9)', value: (p) => p.pmmnBillion },
  { header: 'Normal (%)', value: (p) => p.percentNormal },
  { header: 'Normal 95% interval, lower (%)', value: (p) => p.normalInterval?.lower ?? null },
  { header: 'Normal 95% interval, upper (%)', value: (p) => p.normalInterval?.upper ?? null },
  { header: 'Sperm cells counted', value: (p) => p.cellsCounted },
  { header: 'Morphology from', value: (p) => (p.read ? READ_BASIS[p.read.basis] : null) },
  ...HISTORY_DEFECTS.map((d) => ({ header: `${HISTORY_DEFECT_LABELS[d]} (% of sperm cells)`, value: (p: HistoryPoint) => p.defects[d] })),
  { header: 'Inside health-event windows', value: (p) => (p.windows.length ? p.windows.map((w) => `${w.label} (day ${w.windowDay} of ${w.windowDays})`).join('; ') : null) },
  { header: 'Window clears on', value: (p) => p.windowClearsOn },
];

export const exportHeader = (): string[] => EXPORT_COLUMNS.map((c) => c.header);
export const exportRow = (p: HistoryPoint, timeZone: string): ExportValue[] => EXPORT_COLUMNS.map((c) => c.value(p, timeZone));

/** A file name with the lab's range (the Content-Disposition header encodes any characters). */
export function exportFileName(what: string, range: { from?: string; to?: string }, ext: 'csv' | 'xlsx'): string {
  const slug = what.trim().replace(/[\s/\\:*?"<>|]+/g, '-').replace(/^-+|-+$/g, '').toLowerCase() || 'collections';
  return `${slug}${range.from ? `_${range.from}` : ''}${range.to ? `_to_${range.to}` : ''}.${ext}`;
}
