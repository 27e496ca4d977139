/**
 * Everything the collection page shows about one ejaculate, from its recorded values,
 * the lab's settings and (once a read exists) % normal morphology. Pure.
 */
import type { LabSettings } from '@/lib/settings/lab-settings';
import { breedingSoundnessFromCollections, dosesFromTotals, semenTotals, semenWarnings, type SemenIssue, type SemenTotals } from './arithmetic';

export type CollectionFigures = {
  volumeMl: number | null;
  concentrationMillionPerMl: number | null;
  totalMotilityPct: number | null;
  progressiveMotilityPct: number | null;
};

export type DoseLine = { kind: 'fresh' | 'cooled' | 'frozen'; sizeBillion: number; basis: 'progressive' | 'total'; doses: number; remainderBillion: number };

export type CollectionSummary = {
  totals: SemenTotals | null;
  /** Which values are missing, when totals cannot be worked out. */
  missing: string[];
  normalPct: number | null;
  doses: DoseLine[];
  warnings: SemenIssue[];
};

export function summariseCollection(c: CollectionFigures, settings: LabSettings, normalPct: number | null): CollectionSummary {
  const missing = [
    c.volumeMl == null && 'gel-free volume',
    c.concentrationMillionPerMl == null && 'concentration',
    c.totalMotilityPct == null && 'total motility',
    c.progressiveMotilityPct == null && 'progressive motility',
  ].filter((x): x is string => Boolean(x));
  const warnings = semenWarnings(c);
  if (missing.length) return { totals: null, missing, normalPct, doses: [], warnings };
  const totals = semenTotals({
    volumeMl: c.volumeMl!,
    concentrationMillionPerMl: c.concentrationMillionPerMl!,
    totalMotilityPct: c.totalMotilityPct!,
    progressiveMotilityPct: c.progressiveMotilityPct!,
    normalPct,
  });
  const kinds = [
    { kind: 'fresh', sizeBillion: settings.freshDoseBillion, basis: 'progressive' },
    { kind: 'cooled', sizeBillion: settings.cooledDoseBillion, basis: 'progressive' },
    { kind: 'frozen', sizeBillion: settings.frozenDoseBillion, basis: 'total' },
  ] as const;
  const doses = kinds.map((d) => ({ ...d, ...dosesFromTotals(totals, d) }));
  return { totals, missing, normalPct, doses, warnings };
}

/** The breeding-soundness check for a collection, if it is the second of a pair about an hour apart. */
export function soundnessForCollection(
  id: number,
  sameDay: { id: number; collectedAt: string; pmmnBillion: number | null }[],
  settings: LabSettings,
) {
  const { pair, result } = breedingSoundnessFromCollections(
    sameDay.map((c) => ({ ...c, id: String(c.id), collectedAt: new Date(c.collectedAt) })),
    { thresholdBillion: settings.bseThresholdBillion, gap: { targetMinutes: settings.pairGapMinutes, toleranceMinutes: settings.pairToleranceMinutes } },
  );
  if (!pair || !result) return { role: 'none' as const };
  if (pair.first.id === String(id)) return { role: 'first' as const, secondId: Number(pair.second.id), gapMinutes: pair.gapMinutes };
  if (pair.second.id === String(id)) return { role: 'second' as const, firstId: Number(pair.first.id), gapMinutes: pair.gapMinutes, result };
  return { role: 'none' as const };
}
