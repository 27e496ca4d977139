import { z } from 'zod';
import { BREEDING_SOUNDNESS_PMMN_THRESHOLD_BILLION, DOSE_DEFAULTS, EJACULATE_PAIR_GAP_DEFAULT } from '@/lib/semen/arithmetic';
import { DEFAULT_TARGET_CELLS } from '@/lib/morphology/tally';
import { DEFAULT_TIME_ZONE, isTimeZone } from '@/lib/time/lab-time';
import { PAIRING_DISTANCE_UM_DEFAULT } from '@/lib/agreement/pairing';
import { EPIDIDYMAL_TRANSIT_DAYS_DEFAULT, SPERMATOGENESIS_DAYS_DEFAULT } from '@/lib/windows/window';

const num = (label: string, min: number, max: number) =>
  z.coerce.number({ error: `${label} must be a number.` }).min(min, `${label} must be at least ${min}.`).max(max, `${label} must be at most ${max}.`);
const int = (label: string, min: number, max: number) => num(label, min, max).int(`${label} must be a whole number.`);

/** A lab's own choices; each default and where it comes from is shown on the settings page. */
export const labSettingsSchema = z.object({
  freshDoseBillion: num('Fresh dose', 0.05, 10),
  cooledDoseBillion: num('Cooled dose', 0.05, 10),
  frozenDoseBillion: num('Frozen dose', 0.05, 10),
  bseThresholdBillion: num('Breeding-soundness threshold', 0.1, 20),
  pairGapMinutes: int('Gap between the two ejaculates', 10, 240),
  pairToleranceMinutes: int('Gap tolerance', 0, 120),
  targetCells: int('Target cell count', 50, 1000),
  spermatogenesisDays: int('Spermatogenesis', 30, 90),
  epididymalTransitDays: int('Epididymal transit', 0, 30),
  unscaledMicronsPerPixel: num('Pixel size for images without a scale', 0.01, 5),
  /**
   * How far apart two readers' marks may be and still be one cell, µm (converted with each image's
   * scale; on an image without one, at the pixel size above). Defaults for older stored settings.
   */
  pairingDistanceUm: num('Pairing distance', 0.5, 20).default(PAIRING_DISTANCE_UM_DEFAULT),
  timeZone: z.string().trim().refine(isTimeZone, 'Unknown time zone — choose one from the list (e.g. Europe/London, America/New_York).'),
  /**
   * "Second read required before a report" (default on): a report is signed only from a settled
   * read. Off, a collection read once may be reported from that single read, and the report says so.
   */
  secondReadRequired: z.boolean({ error: 'Say whether a second read is required.' }).default(true),
  /** The lab's name and address as the signed reports print them; a report cannot be signed without the name. */
  labName: z.string().trim().max(200, 'The lab’s name is limited to 200 characters.').default(''),
  labAddress: z.string().trim().max(200, 'The address is limited to 200 characters.').default(''),
});
export type LabSettings = z.infer<typeof labSettingsSchema>;

export const LAB_SETTINGS_DEFAULTS: LabSettings = {
  freshDoseBillion: DOSE_DEFAULTS.fresh.sizeBillion,
  cooledDoseBillion: DOSE_DEFAULTS.cooled.sizeBillion,
  frozenDoseBillion: DOSE_DEFAULTS.frozen.sizeBillion,
  bseThresholdBillion: BREEDING_SOUNDNESS_PMMN_THRESHOLD_BILLION,
  pairGapMinutes: EJACULATE_PAIR_GAP_DEFAULT.targetMinutes,
  pairToleranceMinutes: EJACULATE_PAIR_GAP_DEFAULT.toleranceMinutes,
  targetCells: DEFAULT_TARGET_CELLS,
  spermatogenesisDays: SPERMATOGENESIS_DAYS_DEFAULT,
  epididymalTransitDays: EPIDIDYMAL_TRANSIT_DAYS_DEFAULT,
  unscaledMicronsPerPixel: 0.25,
  pairingDistanceUm: PAIRING_DISTANCE_UM_DEFAULT,
  timeZone: DEFAULT_TIME_ZONE,
  secondReadRequired: true,
  labName: '',
  labAddress: '',
};

/** The numeric settings, each with its unit and the source of its default (the time zone, the second-read rule and the lab's name have their own fields). */
export const LAB_SETTINGS_FIELDS: { key: Exclude<keyof LabSettings, 'timeZone' | 'secondReadRequired' | 'labName' | 'labAddress'>; label: string; unit: string; source: string }[] = [
  { key: 'freshDoseBillion', label: 'Fresh insemination dose', unit: '10^9 progressively motile sperm', source: DOSE_DEFAULTS.fresh.source },
  { key: 'cooledDoseBillion', label: 'Cooled-shipped dose', unit: '10^9 progressively motile sperm', source: DOSE_DEFAULTS.cooled.source },
  { key: 'frozenDoseBillion', label: 'Frozen dose', unit: '10^9 total sperm', source: DOSE_DEFAULTS.frozen.source },
  { key: 'bseThresholdBillion', label: 'Breeding soundness: PMMN in the second ejaculate at least', unit: '10^9', source: 'Society for Theriogenology criterion, as summarised in equine theriogenology texts' },
  { key: 'pairGapMinutes', label: 'Gap between the two ejaculates', unit: 'minutes', source: 'About one hour (Society for Theriogenology protocol); the tolerance is our default' },
  { key: 'pairToleranceMinutes', label: 'Gap tolerance', unit: '± minutes', source: 'Fieldmark default' },
  { key: 'targetCells', label: 'Target cells per collection', unit: 'cells', source: 'Common practice: 100–200 per sample for stallions' },
  { key: 'spermatogenesisDays', label: 'Spermatogenesis', unit: 'days', source: 'About 57 days (Swierstra, Gebauer & Pickett 1974, from memory)' },
  { key: 'epididymalTransitDays', label: 'Epididymal transit', unit: 'days', source: 'Gebauer, Pickett & Swierstra 1974: at least 4.9, on average 7.5–11 days' },
  { key: 'unscaledMicronsPerPixel', label: 'Pixel size for images without a scale (finding cells, pairing two reads)', unit: 'µm per pixel', source: 'Fieldmark default; set your camera’s calibration (stage micrometer), or set each image’s scale, then re-run the search on those images' },
  { key: 'pairingDistanceUm', label: 'Pairing distance: two readers’ marks this close are one cell', unit: 'µm', source: 'About half a stallion sperm head’s length, 4 µm (from memory); a change applies to agreement figures worked out after it' },
];

/** Stored values win over defaults; unknown or invalid stored keys fall back to the default. */
export function mergeLabSettings(stored: unknown): LabSettings {
  const partial = labSettingsSchema.partial().safeParse(stored ?? {});
  return { ...LAB_SETTINGS_DEFAULTS, ...(partial.success ? Object.fromEntries(Object.entries(partial.data).filter(([, v]) => v !== undefined)) : {}) };
}
