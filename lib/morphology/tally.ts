/**
 * Marks held in memory (the scoring workbench, tests) into the engine's grouped counts, and the
 * engine's answer for them. The figures come from lib/morphology/engine.ts alone, so the
 * workbench's tally and the server's totals cannot drift apart.
 */
import { classIndex, readCell, summariseMorphology, type CellCount, type CellIssue, type Morphology, type MorphologyClass, type MorphologyOptions } from './engine';

export {
  DEFAULT_TARGET_CELLS,
  MORPHOLOGY_GROUPS,
  type ClassCount,
  type DefectFrequency,
  type DefectGroupFrequency,
  type GroupCount,
  type ImageTally,
  type MorphologyClass,
  type MorphologyGroup,
} from './engine';

export interface TallyMark {
  classId: string;
  /** Further defects seen on the same cell (class ids); optional. */
  extraTags?: readonly string[];
  imageId: string;
}

/** Anything shaped like a scoring mark (lib/scoring/types.ts ScoringMark). */
export interface MarkLike {
  classKey: string;
  tags: readonly string[];
  imageId: string;
}

/** A cell issue, with the index of the mark it was found on. */
export type TallyIssue = CellIssue & { markIndex: number };

/** The engine's answer, with issues pointing at marks rather than counting cells. */
export type MorphologyTally = Omit<Morphology, 'issues'> & { issues: TallyIssue[] };

export type TallyOptions = MorphologyOptions;

const SEP = '\u0000';

/** Groups marks by image, primary class and tag set: the same rows the grouped query gives, per image. */
export function countMarks(marks: Iterable<MarkLike>): CellCount[] {
  const groups = new Map<string, CellCount>();
  for (const m of marks) {
    const key = m.imageId + SEP + m.classKey + SEP + m.tags.join(SEP);
    const g = groups.get(key);
    if (g) g.count++;
    else groups.set(key, { imageId: m.imageId, classId: m.classKey, tags: m.tags, count: 1 });
  }
  return [...groups.values()];
}

/** Tally marks against a class set (see the engine for the two views and how tags count). */
export function tallyMarks(classSet: readonly MorphologyClass[], marks: readonly TallyMark[], options: TallyOptions = {}): MorphologyTally {
  const { issues: _grouped, ...figures } = summariseMorphology(
    classSet,
    countMarks(marks.map((m) => ({ classKey: m.classId, tags: m.extraTags ?? [], imageId: m.imageId }))),
    options,
  );
  const classes = classIndex(classSet);
  const issues: TallyIssue[] = [];
  marks.forEach((m, markIndex) => {
    for (const i of readCell(classes, m.classId, m.extraTags).issues) issues.push({ ...i, markIndex });
  });
  return { ...figures, issues };
}
