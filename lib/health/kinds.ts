/**
 * Kinds of health event, named once. The database column `health_events.kind` is an enum made by a
 * landed migration (20261220000100): a new kind needs a migration that widens it
 * (tests/integration/db/health-event-kinds.test.ts fails until the two agree).
 *
 * The label is what people read and what a signed report stores as the event's kind.
 */
export const HEALTH_EVENT_KINDS = ['fever', 'injury', 'illness', 'medication', 'housing', 'season_light', 'nutrition', 'other'] as const;
export type HealthEventKind = (typeof HEALTH_EVENT_KINDS)[number];

export const HEALTH_EVENT_KIND_LABELS: Record<HealthEventKind, string> = {
  fever: 'Fever',
  injury: 'Injury',
  illness: 'Illness',
  medication: 'Medication or treatment',
  housing: 'Change of housing',
  season_light: 'Season or light programme',
  nutrition: 'Nutrition change',
  other: 'Other',
};

export const isHealthEventKind = (v: unknown): v is HealthEventKind => (HEALTH_EVENT_KINDS as readonly unknown[]).includes(v);

/** A fever's peak (rectal) temperature is recorded; other kinds have none. */
export const takesTemperature = (kind: HealthEventKind): boolean => kind === 'fever';

/**
 * The event's particulars in one line, for lists and the report's description:
 * "Peak temperature 39.8 °C — treated by the attending vet". Null when there are none.
 */
export function describeHealthEvent(e: { peakTemperatureC: number | null; notes: string | null }): string | null {
  const parts = [e.peakTemperatureC != null ? `Peak temperature ${e.peakTemperatureC.toFixed(1)} °C` : null, e.notes?.trim() || null].filter((p): p is string => Boolean(p));
  return parts.length ? parts.join(' — ') : null;
}
