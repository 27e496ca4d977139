/**
 * From a collection's figures to its report: the draft a veterinarian previews, and the frozen
 * snapshot signing makes of it. Pure: db/queries/report-core.ts gathers the inputs (records, the
 * read the report rests on with its morphology from the one engine, the agreement figures of
 * lib/agreement, health events) and this maps them onto the snapshot's shape
 * (lib/reports/snapshot.ts) without computing any figure a second time: semen arithmetic comes
 * from lib/semen/summary.ts, percentages and the interval from the morphology engine, kappa and
 * the acceptable difference from lib/agreement.
 *
 * A draft has the snapshot's sections, but it may lack morphology (no read submitted yet) and it
 * has no signature; `ReportContent` is that shape, and a signed snapshot fits it too, so one view
 * shows both.
 */
import type { CollectionAgreement } from '@/lib/agreement/agreement';
import { CAUTIONS } from '@/lib/cautions';
import type { ClassSet } from '@/lib/class-sets/schema';
import { Z_95 } from '@/lib/morphology/wilson';
import type { Morphology } from '@/lib/morphology/engine';
import { soundnessForCollection, summariseCollection } from '@/lib/semen/summary';
import type { LabSettings } from '@/lib/settings/lab-settings';
import { labDayKey } from '@/lib/time/lab-time';
import { OPTICS } from '@/lib/validations/collection';
import {
  SPERM_GROUPS,
  buildReportSnapshot,
  type KappaBand,
  type ReportAgreement,
  type ReportAmendmentLink,
  type ReportHealthEvent,
  type ReportMorphology,
  type ReportSnapshot,
  type SpermGroup,
} from './snapshot';

/**
 * Where the report's morphology comes from. 'settled': the settled read (or a first read the
 * blind second read agreed with cell for cell); 'single': one read, where the lab allows
 * reports without a second read; 'first-unchecked': the first read before its check, shown in a
 * draft only, never signable.
 */
export type MorphologyBasis = 'settled' | 'single' | 'first-unchecked';

export type Person = { name: string; qualifications: string | null };

/** A report's sections, signed or not: what the report page and the PDF show. */
export type ReportContent = Omit<ReportSnapshot, 'schemaVersion' | 'morphology' | 'people' | 'report'> & {
  morphology: ReportMorphology | null;
  basis: MorphologyBasis | null;
  people: { readBy: Person | null; checkedBy: Person | null; settledBy: Person | null; signedBy: Person | null; signedAt: string | null };
  report: ReportSnapshot['report'] | null;
};

export type Preparation = 'eosin_nigrosin' | 'other_stain' | 'fixed_wet_mount';
export type Optics = keyof typeof OPTICS;

export interface ReportDraftInputs {
  settings: LabSettings;
  stallion: { id: number; name: string; breed: string | null; registration: string | null; foalingYear: number | null; ownerName: string | null };
  collection: {
    id: number;
    collectedAt: string;
    numberThatDay: number;
    /** This stallion's previous collection, or null for his first. */
    previousCollectedAt: string | null;
    preparation: Preparation;
    optics: Optics;
    magnification: number;
    collectedBy: string | null;
    remarks: string | null;
    volumeMl: number | null;
    concentrationMillionPerMl: number | null;
    concentrationMethod: 'entered' | 'chamber';
    totalMotilityPct: number | null;
    progressiveMotilityPct: number | null;
  };
  /** This stallion's collections within a few hours of this one (this one included), for the breeding-soundness pair. */
  around: { id: number; collectedAt: string }[];
  /** The read the report rests on: its class-set snapshot, target and morphology (from the engine). */
  morphology: { basis: MorphologyBasis; classSet: Pick<ClassSet, 'name' | 'classes'>; morphology: Morphology } | null;
  /** Agreement of the submitted first and second reads (lib/agreement), when both exist. */
  agreement: CollectionAgreement | null;
  healthEvents: ReportHealthEvent[];
  veterinarian: { remarks: string | null; interpretation: string | null };
  people: { readBy: string | null; checkedBy: string | null; settledBy: string | null };
}

const person = (name: string | null): Person | null => (name ? { name, qualifications: null } : null);

/** Preparation as the report prints it: the preparation, and the stain where there is one. */
export function preparationLabels(p: Preparation): { preparation: string; stain: string | null } {
  if (p === 'eosin_nigrosin') return { preparation: 'Stained smear', stain: 'Eosin–nigrosin' };
  if (p === 'other_stain') return { preparation: 'Stained smear', stain: 'Other stain' };
  return { preparation: 'Fixed wet mount', stain: null };
}

const DAY_MS = 86_400_000;
const dayNumber = (isoDay: string) => Date.parse(`${isoDay}T00:00:00Z`) / DAY_MS;

/** Whole days on the lab's calendar between two instants (0 on the same lab day). */
export function labDaysBetween(earlier: string, later: string, timeZone: string): number {
  return dayNumber(labDayKey(new Date(later), timeZone)) - dayNumber(labDayKey(new Date(earlier), timeZone));
}

/** The engine's morphology in the snapshot's terms (sperm classes, groups, non-sperm apart, defect frequencies). */
export function reportMorphologyOf(m: Morphology, basis: 'settled' | 'single'): ReportMorphology {
  if (m.intervalZ !== Z_95) throw new RangeError('the report prints a 95 % interval');
  const sperm = m.cells.perClass.filter((c) => c.countsAsSperm);
  return {
    source: basis,
    cellsCounted: m.cellsCounted,
    target: m.target,
    targetReached: m.targetReached,
    normalCount: m.normalCount,
    abnormalCount: m.abnormalCount,
    pctNormal: m.pctNormal,
    pctAbnormal: m.pctAbnormal,
    normalInterval: m.normalIntervalPct && { lowerPct: m.normalIntervalPct.lower, upperPct: m.normalIntervalPct.upper, confidencePct: 95, method: 'wilson' },
    perClass: sperm.map((c) => ({ key: c.classId, name: c.name, group: c.group as SpermGroup, count: c.count, pct: c.pctOfCells })),
    perGroup: SPERM_GROUPS.map((g) => {
      const row = m.cells.groups.find((x) => x.group === g);
      return { group: g, count: row?.count ?? 0, pct: row?.pct ?? (m.cellsCounted ? 0 : null) };
    }),
    nonSperm: m.cells.perClass.filter((c) => !c.countsAsSperm).map((c) => ({ key: c.classId, name: c.name, count: c.count })),
    defectFrequencies: {
      perClass: m.defectFrequency.perClass.map((d) => ({
        key: d.classId,
        name: d.name,
        group: d.group as Exclude<SpermGroup, 'normal'>,
        cellsWithDefect: d.cellsWithDefect,
        pctOfCells: d.pctOfCells,
      })),
      totalDefects: m.defectFrequency.totalDefects,
      sumPct: m.defectFrequency.sumPct,
    },
  };
}

const BAND: Record<NonNullable<CollectionAgreement['band']>, KappaBand> = {
  poor: 'poor',
  slight: 'slight',
  fair: 'fair',
  moderate: 'moderate',
  substantial: 'substantial',
  'almost perfect': 'almost_perfect',
};

/**
 * The agreement figures in the snapshot's terms, or null when they are incomplete (no paired
 * sperm cells, or a read without sperm cells): such a pair of reads cannot be signed off.
 * `pairs` counts the paired sperm cells, the items behind the observed agreement and kappa.
 */
export function reportAgreementOf(a: CollectionAgreement): ReportAgreement | null {
  if (a.observedAgreement === null || a.percentNormal.first === null || a.percentNormal.second === null || !a.acceptableDifference) return null;
  return {
    pairs: a.spermPairs,
    onlyFirst: a.onlyFirst,
    onlySecond: a.onlySecond,
    firstCellsCounted: a.cellsCounted.first,
    secondCellsCounted: a.cellsCounted.second,
    observedAgreement: a.observedAgreement,
    kappa: a.kappa,
    band: a.band === null ? null : BAND[a.band],
    firstPctNormal: a.percentNormal.first,
    secondPctNormal: a.percentNormal.second,
    acceptableDifference: { ...a.acceptableDifference },
  };
}

/** The report of a collection as it stands, unsigned. */
export function composeReportDraft(i: ReportDraftInputs): ReportContent {
  const s = i.settings;
  const c = i.collection;
  const classSet = i.morphology?.classSet;
  const m = i.morphology && i.morphology.basis !== 'first-unchecked' ? reportMorphologyOf(i.morphology.morphology, i.morphology.basis) : null;
  // A first read before its check is previewed with the same figures, but never as a source.
  const preview = i.morphology && !m ? { ...reportMorphologyOf(i.morphology.morphology, 'single'), source: 'single' as const } : null;
  const morphology = m ?? preview;
  const normalPct = morphology?.pctNormal ?? null;

  const summary = summariseCollection(c, s, normalPct);
  const totals = summary.totals;
  const doseSettings = {
    fresh: { sizeBillion: s.freshDoseBillion, basis: 'progressive' as const },
    cooled: { sizeBillion: s.cooledDoseBillion, basis: 'progressive' as const },
    frozen: { sizeBillion: s.frozenDoseBillion, basis: 'total' as const },
  };

  const pmmn = totals?.pmmnBillion ?? null;
  const bse = soundnessForCollection(c.id, i.around.map((a) => ({ ...a, pmmnBillion: a.id === c.id ? pmmn : null })), s);
  const at = (id: number) => i.around.find((a) => a.id === id)!.collectedAt;
  const breedingSoundness: ReportContent['breedingSoundness'] =
    bse.role === 'first'
      ? { role: 'first', secondCollectedAt: at(bse.secondId), gapMinutes: bse.gapMinutes }
      : bse.role === 'second'
        ? { role: 'second', firstCollectedAt: at(bse.firstId), gapMinutes: bse.gapMinutes, pmmnBillion: bse.result.pmmnBillion, thresholdBillion: bse.result.thresholdBillion, status: bse.result.status }
        : null;

  const agreement = i.agreement ? reportAgreementOf(i.agreement) : null;

  return {
    lab: { name: s.labName, address: s.labAddress || null },
    settings: {
      doses: doseSettings,
      bseThresholdBillion: s.bseThresholdBillion,
      ejaculatePair: { gapMinutes: s.pairGapMinutes, toleranceMinutes: s.pairToleranceMinutes },
      // The target the read was scored against (the lab's setting when it started).
      targetCells: morphology?.target ?? s.targetCells,
      window: { spermatogenesisDays: s.spermatogenesisDays, epididymalTransitDays: s.epididymalTransitDays },
      timeZone: s.timeZone,
      secondReadRequired: s.secondReadRequired,
      classSet: {
        name: classSet?.name ?? '—',
        classes: (classSet?.classes ?? []).map((k) => ({ key: k.key, name: k.name, group: k.group, countsAsSperm: k.countsAsSperm })),
      },
    },
    stallion: {
      id: i.stallion.id,
      name: i.stallion.name,
      breed: i.stallion.breed,
      registration: i.stallion.registration,
      foalingYear: i.stallion.foalingYear,
      owner: i.stallion.ownerName ? { name: i.stallion.ownerName } : null,
    },
    collection: {
      id: c.id,
      collectedAt: new Date(c.collectedAt).toISOString(),
      ejaculateOfDay: c.numberThatDay,
      daysSincePrevious: c.previousCollectedAt ? labDaysBetween(c.previousCollectedAt, c.collectedAt, s.timeZone) : null,
      ...preparationLabels(c.preparation),
      optics: OPTICS[c.optics],
      magnification: c.magnification,
      collectedBy: c.collectedBy,
      notes: c.remarks,
    },
    semen: {
      volumeMl: c.volumeMl,
      concentrationMillionPerMl: c.concentrationMillionPerMl,
      concentrationMethod: c.concentrationMethod,
      totalMotilityPct: c.totalMotilityPct,
      progressiveMotilityPct: c.progressiveMotilityPct,
      totalSpermBillion: totals?.totalSpermBillion ?? null,
      totalMotileBillion: totals?.totalMotileBillion ?? null,
      progressivelyMotileBillion: totals?.progressivelyMotileBillion ?? null,
      pmmnBillion: pmmn,
      normalPctUsed: pmmn === null ? null : normalPct,
      doses: summary.doses.map((d) => ({ kind: d.kind, sizeBillion: d.sizeBillion, basis: d.basis, doses: d.doses, remainderBillion: d.remainderBillion })),
    },
    breedingSoundness,
    morphology,
    basis: i.morphology?.basis ?? null,
    agreement,
    healthEvents: i.healthEvents,
    veterinarian: { remarks: i.veterinarian.remarks, interpretation: i.veterinarian.interpretation },
    people: { readBy: person(i.people.readBy), checkedBy: person(i.people.checkedBy), settledBy: person(i.people.settledBy), signedBy: null, signedAt: null },
    report: null,
    cautions: CAUTIONS,
  };
}

export interface Signature {
  signedBy: Person;
  signedAt: string;
  version: number;
  verificationCode: string;
  /** The version this one replaces, why and who amended it; null for version 1. */
  supersedes: ReportAmendmentLink | null;
}

/**
 * Freezes a draft into the signed snapshot (validated, arithmetic checked). Throws when the draft
 * is not signable (no settled or single-read morphology, no first reader); readiness checks say
 * why in words before this is reached.
 */
export function signDraft(draft: ReportContent, sig: Signature): ReportSnapshot {
  if (!draft.morphology || (draft.basis !== 'settled' && draft.basis !== 'single')) throw new RangeError('the draft has no settled or single-read morphology');
  if (!draft.people.readBy) throw new RangeError('the draft names no first reader');
  return buildReportSnapshot({
    lab: draft.lab,
    settings: draft.settings,
    stallion: draft.stallion,
    collection: draft.collection,
    semen: draft.semen,
    breedingSoundness: draft.breedingSoundness,
    morphology: { ...draft.morphology, source: draft.basis },
    // A single read has no agreement figures, whatever reads were abandoned before.
    agreement: draft.basis === 'single' ? null : draft.agreement,
    healthEvents: draft.healthEvents,
    veterinarian: draft.veterinarian,
    people: { readBy: draft.people.readBy, checkedBy: draft.people.checkedBy, settledBy: draft.people.settledBy, signedBy: sig.signedBy, signedAt: sig.signedAt },
    report: { version: sig.version, verificationCode: sig.verificationCode, supersedes: sig.supersedes, supersededBy: null },
    cautions: draft.cautions,
  });
}

/** A signed snapshot as report content (for the one view of drafts and signed versions). */
export function contentOfSnapshot(s: ReportSnapshot): ReportContent {
  const { schemaVersion: _v, ...rest } = s;
  return { ...rest, basis: s.morphology.source };
}
