/**
 * Tally of one read's marks against a class set.
 *
 * Two views, always labelled:
 * - "cells normal/abnormal" (`cells`): each sperm cell counted once, by its primary class;
 *   class and group percentages sum to 100 %.
 * - "defect frequency" (`defectFrequency`): every defect seen on a cell counted (primary class
 *   plus extra defect tags), as % of sperm cells counted; the sum may exceed 100 %.
 * Non-sperm classes (countsAsSperm false, e.g. round cells) are tallied apart and never enter
 * either view's denominator.
 */
import { Z_95, wilsonInterval } from './wilson';

export const MORPHOLOGY_GROUPS = ['normal', 'head', 'midpiece', 'droplet', 'tail', 'other'] as const;
export type MorphologyGroup = (typeof MORPHOLOGY_GROUPS)[number];

/** Default cells per read (common practice: 100–200 per sample for stallions). */
export const DEFAULT_TARGET_CELLS = 200;

export interface MorphologyClass {
  id: string;
  name: string;
  group: MorphologyGroup;
  countsAsSperm: boolean;
}

export interface TallyMark {
  classId: string;
  /** Further defects seen on the same cell (class ids); optional. */
  extraTags?: readonly string[];
  imageId: string;
}

export interface ClassCount {
  classId: string;
  name: string;
  group: MorphologyGroup;
  countsAsSperm: boolean;
  /** Cells with this primary class. */
  count: number;
  /** % of sperm cells counted; null for non-sperm classes or when no sperm were counted. */
  pctOfCells: number | null;
}

export interface GroupCount {
  group: MorphologyGroup;
  count: number;
  /** % of sperm cells counted; null when none were counted. */
  pct: number | null;
}

export interface DefectFrequency {
  classId: string;
  name: string;
  group: MorphologyGroup;
  /** Sperm cells carrying this defect as primary class or extra tag. */
  cellsWithDefect: number;
  /** % of sperm cells counted; null when none were counted. */
  pctOfCells: number | null;
}

export interface DefectGroupFrequency {
  group: Exclude<MorphologyGroup, 'normal'>;
  /** Sperm cells carrying at least one defect of this group. */
  cellsWithDefect: number;
  pctOfCells: number | null;
}

export interface ImageTally {
  imageId: string;
  /** Sperm cells marked on this image. */
  cellsCounted: number;
  nonSpermCounted: number;
  normalCount: number;
  /** Marks per primary class id (sperm and non-sperm). */
  byClass: Record<string, number>;
}

export type TallyIssue =
  | { kind: 'unknown-class'; markIndex: number; classId: string }
  | { kind: 'unknown-tag'; markIndex: number; classId: string }
  | { kind: 'ignored-tag'; markIndex: number; classId: string; reason: 'normal' | 'not-sperm' | 'duplicate' }
  | { kind: 'tags-on-non-sperm'; markIndex: number; classId: string }
  | { kind: 'normal-with-defect-tags'; markIndex: number };

export interface MorphologyTally {
  /** Sperm cells counted (marks whose primary class counts as sperm). */
  cellsCounted: number;
  /** Marks with a non-sperm primary class, kept apart. */
  nonSpermCounted: number;
  /** Cells whose primary class is in the normal group. */
  normalCount: number;
  abnormalCount: number;
  /** % normal of sperm cells; null when none counted. */
  pctNormal: number | null;
  pctAbnormal: number | null;
  /** Wilson 95 % interval on % normal, in %; null when none counted. */
  normalIntervalPct: { lower: number; upper: number } | null;
  target: number;
  targetReached: boolean;
  remainingToTarget: number;
  /** "Cells normal/abnormal" view: one primary class per cell, sums to 100 %. */
  cells: {
    view: 'cells-normal-abnormal';
    perClass: ClassCount[];
    groups: GroupCount[];
  };
  /** "Defect frequency" view: every defect on every cell; may exceed 100 %. */
  defectFrequency: {
    view: 'defect-frequency';
    perClass: DefectFrequency[];
    groups: DefectGroupFrequency[];
    /** Defects seen in all, primary plus extra tags. */
    totalDefects: number;
    /** Sum of the per-class percentages. */
    sumPct: number | null;
  };
  /** Per image, in order of first appearance. */
  perImage: ImageTally[];
  /** Marks or tags that were ignored or looked inconsistent; the tally stays usable. */
  issues: TallyIssue[];
}

export interface TallyOptions {
  /** Cells to count (lab setting), default 200. */
  target?: number;
  z?: number;
}

const pctOf = (count: number, total: number): number | null => (total === 0 ? null : (count / total) * 100);

/**
 * Tally marks against a class set. A cell is normal when its primary class is in the normal
 * group; extra defect tags on a normal cell are reported as an issue and do not make it abnormal
 * (the primary class is the reader's decision), but they do enter the defect frequencies.
 */
export function tallyMarks(
  classSet: readonly MorphologyClass[],
  marks: readonly TallyMark[],
  options: TallyOptions = {},
): MorphologyTally {
  const { target = DEFAULT_TARGET_CELLS, z = Z_95 } = options;
  if (!Number.isInteger(target) || target < 1) throw new RangeError('target must be a whole number ≥ 1');

  const classes = new Map<string, MorphologyClass>();
  for (const c of classSet) {
    if (classes.has(c.id)) throw new RangeError(`class id ${c.id} appears twice in the class set`);
    classes.set(c.id, c);
  }

  const primaryCounts = new Map<string, number>(classSet.map((c) => [c.id, 0]));
  const defectCells = new Map<string, number>(
    classSet.filter((c) => c.countsAsSperm && c.group !== 'normal').map((c) => [c.id, 0]),
  );
  const defectGroupCells = new Map<DefectGroupFrequency['group'], number>();
  const images = new Map<string, ImageTally>();
  const issues: TallyIssue[] = [];
  let cellsCounted = 0;
  let nonSpermCounted = 0;
  let normalCount = 0;
  let totalDefects = 0;

  marks.forEach((mark, markIndex) => {
    const primary = classes.get(mark.classId);
    if (!primary) {
      issues.push({ kind: 'unknown-class', markIndex, classId: mark.classId });
      return;
    }
    primaryCounts.set(primary.id, (primaryCounts.get(primary.id) ?? 0) + 1);

    let image = images.get(mark.imageId);
    if (!image) {
      image = { imageId: mark.imageId, cellsCounted: 0, nonSpermCounted: 0, normalCount: 0, byClass: {} };
      images.set(mark.imageId, image);
    }
    image.byClass[primary.id] = (image.byClass[primary.id] ?? 0) + 1;

    const tags = mark.extraTags ?? [];
    if (!primary.countsAsSperm) {
      nonSpermCounted++;
      image.nonSpermCounted++;
      if (tags.length > 0) issues.push({ kind: 'tags-on-non-sperm', markIndex, classId: primary.id });
      return;
    }

    cellsCounted++;
    image.cellsCounted++;
    const isNormal = primary.group === 'normal';
    if (isNormal) {
      normalCount++;
      image.normalCount++;
    }

    // Defects on this cell, each class once.
    const defects = new Set<string>();
    if (!isNormal) defects.add(primary.id);
    for (const tagId of tags) {
      const tag = classes.get(tagId);
      if (!tag) issues.push({ kind: 'unknown-tag', markIndex, classId: tagId });
      else if (!tag.countsAsSperm) issues.push({ kind: 'ignored-tag', markIndex, classId: tagId, reason: 'not-sperm' });
      else if (tag.group === 'normal') issues.push({ kind: 'ignored-tag', markIndex, classId: tagId, reason: 'normal' });
      else if (defects.has(tagId)) issues.push({ kind: 'ignored-tag', markIndex, classId: tagId, reason: 'duplicate' });
      else defects.add(tagId);
    }
    if (isNormal && defects.size > 0) issues.push({ kind: 'normal-with-defect-tags', markIndex });

    const groupsOnCell = new Set<DefectGroupFrequency['group']>();
    for (const id of defects) {
      defectCells.set(id, (defectCells.get(id) ?? 0) + 1);
      groupsOnCell.add(classes.get(id)!.group as DefectGroupFrequency['group']);
    }
    for (const g of groupsOnCell) defectGroupCells.set(g, (defectGroupCells.get(g) ?? 0) + 1);
    totalDefects += defects.size;
  });

  const perClass: ClassCount[] = classSet.map((c) => {
    const count = primaryCounts.get(c.id) ?? 0;
    return {
      classId: c.id,
      name: c.name,
      group: c.group,
      countsAsSperm: c.countsAsSperm,
      count,
      pctOfCells: c.countsAsSperm ? pctOf(count, cellsCounted) : null,
    };
  });

  const groups: GroupCount[] = MORPHOLOGY_GROUPS.map((group) => {
    const count = perClass
      .filter((c) => c.countsAsSperm && c.group === group)
      .reduce((sum, c) => sum + c.count, 0);
    return { group, count, pct: pctOf(count, cellsCounted) };
  });

  const defectPerClass: DefectFrequency[] = classSet
    .filter((c) => defectCells.has(c.id))
    .map((c) => ({
      classId: c.id,
      name: c.name,
      group: c.group,
      cellsWithDefect: defectCells.get(c.id) ?? 0,
      pctOfCells: pctOf(defectCells.get(c.id) ?? 0, cellsCounted),
    }));

  const defectGroups: DefectGroupFrequency[] = MORPHOLOGY_GROUPS.filter(
    (g): g is DefectGroupFrequency['group'] => g !== 'normal',
  ).map((group) => ({
    group,
    cellsWithDefect: defectGroupCells.get(group) ?? 0,
    pctOfCells: pctOf(defectGroupCells.get(group) ?? 0, cellsCounted),
  }));

  const interval = wilsonInterval(normalCount, cellsCounted, z);
  const abnormalCount = cellsCounted - normalCount;
  return {
    cellsCounted,
    nonSpermCounted,
    normalCount,
    abnormalCount,
    pctNormal: pctOf(normalCount, cellsCounted),
    pctAbnormal: pctOf(abnormalCount, cellsCounted),
    normalIntervalPct: interval && { lower: interval.lower * 100, upper: interval.upper * 100 },
    target,
    targetReached: cellsCounted >= target,
    remainingToTarget: Math.max(0, target - cellsCounted),
    cells: { view: 'cells-normal-abnormal', perClass, groups },
    defectFrequency: {
      view: 'defect-frequency',
      perClass: defectPerClass,
      groups: defectGroups,
      totalDefects,
      sumPct: pctOf(totalDefects, cellsCounted),
    },
    perImage: [...images.values()],
    issues,
  };
}
