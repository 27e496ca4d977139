import type { ClassSet } from '@/lib/class-sets/schema';
import { tallyMarks, type MorphologyClass, type MorphologyTally } from '@/lib/morphology/tally';
import type { ScoringMark } from '@/lib/scoring/types';

/** The class set in the tally's terms; non-sperm classes keep countsAsSperm false, so their group never counts. */
export function morphologyClasses(set: Pick<ClassSet, 'classes'>): MorphologyClass[] {
  return set.classes.map((c) => ({
    id: c.key,
    name: c.name,
    group: c.group === 'non_sperm' ? 'other' : c.group,
    countsAsSperm: c.countsAsSperm,
  }));
}

export function tallyScoringMarks(classes: readonly MorphologyClass[], marks: Iterable<ScoringMark>, target: number): MorphologyTally {
  const input = [];
  for (const m of marks) input.push({ classId: m.classKey, extraTags: m.tags, imageId: m.imageId });
  return tallyMarks(classes, input, { target: Math.max(1, Math.round(target)) });
}

export function formatPct(v: number | null | undefined, digits = 1): string {
  return v === null || v === undefined ? '—' : `${v.toFixed(digits)} %`;
}
