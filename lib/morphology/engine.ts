/**
 * The morphology engine: everything any screen, report or chart shows about one read's cells,
 * worked out in one place from the read's class-set snapshot and its cells grouped by what they
 * are. The browser feeds it counts made from the marks in memory (lib/morphology/tally.ts); the
 * server feeds it one grouped query (db/queries/morphology.ts). Pure: no database, no framework.
 *
 * Two views, always labelled (common practice; the WHO manual tallies every defect, from memory):
 * - "cells normal/abnormal" (`cells`): each sperm cell counted once, by its primary class; the
 *   class and group percentages sum to 100 %.
 * - "defect frequency" (`defectFrequency`): every defect seen on a cell counted (primary class
 *   plus extra defect tags), as % of sperm cells counted; the sum may exceed 100 %.
 * Non-sperm classes (countsAsSperm false, e.g. round cells) are tallied apart and never enter
 * either view's denominator.
 */
import type { ClassSet } from '@/lib/class-sets/schema';
import { Z_95, wilsonInterval } from './wilson';

export const MORPHOLOGY_GROUPS = ['normal', 'head', 'midpiece', 'droplet', 'tail', 'other'] as const;
export type MorphologyGroup = (typeof MORPHOLOGY_GROUPS)[number];
export type DefectGroup = Exclude<MorphologyGroup, 'normal'>;
export const DEFECT_GROUPS = MORPHOLOGY_GROUPS.filter((g): g is DefectGroup => g !== 'normal');

/** Default cells per read (common practice: 100–200 per sample for stallions). */
export const DEFAULT_TARGET_CELLS = 200;

/**
 * Shape version of `Morphology`. A signed report stores the object frozen; bump this when a field
 * changes meaning or shape, so old snapshots can still be read for what they are.
 */
export const MORPHOLOGY_VERSION = 1;

/** One class of a read's class set as the engine sees it. `id` is the class key. */
export interface MorphologyClass {
  id: string;
  name: string;
  group: MorphologyGroup;
  countsAsSperm: boolean;
}

/**
 * `count` cells that share one primary class and the same extra defect tags (and, when the caller
 * has it, one field image). This is one row of the grouped query, or one group of marks held in
 * the browser. Rows may repeat a combination; their counts add up.
 */
export interface CellCount {
  /** Primary class key. */
  classId: string;
  /** Further defects seen on the same cells (class keys); order does not matter. */
  tags?: readonly string[];
  count: number;
  /** Set to get the per-image tally; omit it (server totals) and `perImage` stays empty. */
  imageId?: string;
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
  /** Sperm cells whose primary class is in this group. */
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
  group: DefectGroup;
  /** Sperm cells carrying at least one defect of this group (a cell counts once per group). */
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

/** Something odd about a cell's class or tags; the figures stay usable and say what they ignored. */
export type CellIssue =
  | { kind: 'unknown-class'; classId: string }
  | { kind: 'unknown-tag'; classId: string }
  | { kind: 'ignored-tag'; classId: string; reason: 'normal' | 'not-sperm' | 'duplicate' }
  | { kind: 'tags-on-non-sperm'; classId: string }
  | { kind: 'normal-with-defect-tags' };

/** A cell issue with the number of cells it concerns. */
export type MorphologyIssue = CellIssue & { cells: number };

/**
 * Everything worked out for one read. Percentages are in % (0–100), unrounded; null where the
 * denominator is zero (never NaN). Class lists keep the class set's order.
 */
export interface Morphology {
  version: typeof MORPHOLOGY_VERSION;
  /** Sperm cells counted (cells whose primary class counts as sperm): the denominator of every %. */
  cellsCounted: number;
  /** Cells with a non-sperm primary class (round cells, leukocytes), kept apart. */
  nonSpermCounted: number;
  /** Sperm cells whose primary class is in the normal group. */
  normalCount: number;
  abnormalCount: number;
  /** % normal of sperm cells; null when none counted. */
  pctNormal: number | null;
  pctAbnormal: number | null;
  /** Wilson score interval on % normal (Newcombe 1998, method 3), in %; null when none counted. */
  normalIntervalPct: { lower: number; upper: number } | null;
  /** The normal quantile the interval used (1.959964 for 95 %). */
  intervalZ: number;
  /** Cells to count (the read's target, a lab setting when the read started). */
  target: number;
  targetReached: boolean;
  remainingToTarget: number;
  /** cellsCounted / target in %, at most 100. */
  targetProgressPct: number;
  /** "Cells normal/abnormal" view: one primary class per cell, sums to 100 %. */
  cells: {
    view: 'cells-normal-abnormal';
    /** Every class of the set, non-sperm classes included (their pctOfCells is null). */
    perClass: ClassCount[];
    groups: GroupCount[];
  };
  /** "Defect frequency" view: every defect on every cell; may exceed 100 %. */
  defectFrequency: {
    view: 'defect-frequency';
    /** The sperm defect classes (not normal, not non-sperm), in class-set order. */
    perClass: DefectFrequency[];
    groups: DefectGroupFrequency[];
    /** Defects seen in all, primary plus extra tags. */
    totalDefects: number;
    /** Sum of the per-class percentages (may exceed 100). */
    sumPct: number | null;
  };
  /** Per image, in order of first appearance; empty unless the counts carried image ids. */
  perImage: ImageTally[];
  /** Classes or tags that were ignored or looked inconsistent. */
  issues: MorphologyIssue[];
}

export interface MorphologyOptions {
  /** Cells to count, default 200. */
  target?: number;
  z?: number;
}

const pctOf = (count: number, total: number): number | null => (total === 0 ? null : (count / total) * 100);

/** The class set of a read (its snapshot) in the engine's terms; non-sperm classes keep countsAsSperm false, so their group never counts. */
export function morphologyClasses(set: Pick<ClassSet, 'classes'>): MorphologyClass[] {
  return set.classes.map((c) => ({ id: c.key, name: c.name, group: c.group === 'non_sperm' ? 'other' : c.group, countsAsSperm: c.countsAsSperm }));
}

export function classIndex(classes: readonly MorphologyClass[]): Map<string, MorphologyClass> {
  const index = new Map<string, MorphologyClass>();
  for (const c of classes) {
    if (index.has(c.id)) throw new RangeError(`class id ${c.id} appears twice in the class set`);
    index.set(c.id, c);
  }
  return index;
}

/**
 * What one cell is: its primary class (undefined when unknown), the defects it carries (each class
 * once) and what looked wrong. A cell is normal when its primary class is in the normal group;
 * extra defect tags on a normal cell are an issue and do not make it abnormal (the primary class is
 * the reader's decision), but they do enter the defect frequencies.
 */
export function readCell(classes: ReadonlyMap<string, MorphologyClass>, classId: string, tags: readonly string[] = []) {
  const primary = classes.get(classId);
  const issues: CellIssue[] = [];
  const defects = new Set<string>();
  if (!primary) {
    issues.push({ kind: 'unknown-class', classId });
    return { primary, defects, issues };
  }
  if (!primary.countsAsSperm) {
    if (tags.length > 0) issues.push({ kind: 'tags-on-non-sperm', classId: primary.id });
    return { primary, defects, issues };
  }
  const isNormal = primary.group === 'normal';
  if (!isNormal) defects.add(primary.id);
  for (const tagId of tags) {
    const tag = classes.get(tagId);
    if (!tag) issues.push({ kind: 'unknown-tag', classId: tagId });
    else if (!tag.countsAsSperm) issues.push({ kind: 'ignored-tag', classId: tagId, reason: 'not-sperm' });
    else if (tag.group === 'normal') issues.push({ kind: 'ignored-tag', classId: tagId, reason: 'normal' });
    else if (defects.has(tagId)) issues.push({ kind: 'ignored-tag', classId: tagId, reason: 'duplicate' });
    else defects.add(tagId);
  }
  if (isNormal && defects.size > 0) issues.push({ kind: 'normal-with-defect-tags' });
  return { primary, defects, issues };
}

const issueKey = (i: CellIssue) => JSON.stringify(i);

/** Works out a read's morphology from its classes and its cells grouped by class and tags. */
export function summariseMorphology(classSet: readonly MorphologyClass[], cellCounts: Iterable<CellCount>, options: MorphologyOptions = {}): Morphology {
  const { target = DEFAULT_TARGET_CELLS, z = Z_95 } = options;
  if (!Number.isInteger(target) || target < 1) throw new RangeError('target must be a whole number ≥ 1');
  const classes = classIndex(classSet);

  const primaryCounts = new Map<string, number>(classSet.map((c) => [c.id, 0]));
  const defectCells = new Map<string, number>(classSet.filter((c) => c.countsAsSperm && c.group !== 'normal').map((c) => [c.id, 0]));
  const defectGroupCells = new Map<DefectGroup, number>();
  const images = new Map<string, ImageTally>();
  const issues = new Map<string, MorphologyIssue>();
  let cellsCounted = 0;
  let nonSpermCounted = 0;
  let normalCount = 0;
  let totalDefects = 0;

  for (const row of cellCounts) {
    const n = row.count;
    if (!Number.isInteger(n) || n < 0) throw new RangeError(`cell count for ${row.classId} must be a whole number ≥ 0`);
    if (n === 0) continue;
    const { primary, defects, issues: found } = readCell(classes, row.classId, row.tags);
    for (const i of found) {
      const key = issueKey(i);
      const seen = issues.get(key);
      if (seen) seen.cells += n;
      else issues.set(key, { ...i, cells: n });
    }
    if (!primary) continue;
    primaryCounts.set(primary.id, (primaryCounts.get(primary.id) ?? 0) + n);

    let image: ImageTally | undefined;
    if (row.imageId !== undefined) {
      image = images.get(row.imageId);
      if (!image) {
        image = { imageId: row.imageId, cellsCounted: 0, nonSpermCounted: 0, normalCount: 0, byClass: {} };
        images.set(row.imageId, image);
      }
      image.byClass[primary.id] = (image.byClass[primary.id] ?? 0) + n;
    }

    if (!primary.countsAsSperm) {
      nonSpermCounted += n;
      if (image) image.nonSpermCounted += n;
      continue;
    }
    cellsCounted += n;
    if (image) image.cellsCounted += n;
    if (primary.group === 'normal') {
      normalCount += n;
      if (image) image.normalCount += n;
    }

    const groupsOnCell = new Set<DefectGroup>();
    for (const id of defects) {
      defectCells.set(id, (defectCells.get(id) ?? 0) + n);
      groupsOnCell.add(classes.get(id)!.group as DefectGroup);
    }
    for (const g of groupsOnCell) defectGroupCells.set(g, (defectGroupCells.get(g) ?? 0) + n);
    totalDefects += defects.size * n;
  }

  const perClass: ClassCount[] = classSet.map((c) => {
    const count = primaryCounts.get(c.id) ?? 0;
    return { classId: c.id, name: c.name, group: c.group, countsAsSperm: c.countsAsSperm, count, pctOfCells: c.countsAsSperm ? pctOf(count, cellsCounted) : null };
  });

  const groups: GroupCount[] = MORPHOLOGY_GROUPS.map((group) => {
    const count = perClass.filter((c) => c.countsAsSperm && c.group === group).reduce((sum, c) => sum + c.count, 0);
    return { group, count, pct: pctOf(count, cellsCounted) };
  });

  const defectPerClass: DefectFrequency[] = classSet
    .filter((c) => defectCells.has(c.id))
    .map((c) => ({ classId: c.id, name: c.name, group: c.group, cellsWithDefect: defectCells.get(c.id) ?? 0, pctOfCells: pctOf(defectCells.get(c.id) ?? 0, cellsCounted) }));

  const defectGroups: DefectGroupFrequency[] = DEFECT_GROUPS.map((group) => ({
    group,
    cellsWithDefect: defectGroupCells.get(group) ?? 0,
    pctOfCells: pctOf(defectGroupCells.get(group) ?? 0, cellsCounted),
  }));

  const interval = wilsonInterval(normalCount, cellsCounted, z);
  const abnormalCount = cellsCounted - normalCount;
  return {
    version: MORPHOLOGY_VERSION,
    cellsCounted,
    nonSpermCounted,
    normalCount,
    abnormalCount,
    pctNormal: pctOf(normalCount, cellsCounted),
    pctAbnormal: pctOf(abnormalCount, cellsCounted),
    normalIntervalPct: interval && { lower: interval.lower * 100, upper: interval.upper * 100 },
    intervalZ: z,
    target,
    targetReached: cellsCounted >= target,
    remainingToTarget: Math.max(0, target - cellsCounted),
    targetProgressPct: Math.min(100, (cellsCounted / target) * 100),
    cells: { view: 'cells-normal-abnormal', perClass, groups },
    defectFrequency: { view: 'defect-frequency', perClass: defectPerClass, groups: defectGroups, totalDefects, sumPct: pctOf(totalDefects, cellsCounted) },
    perImage: [...images.values()],
    issues: [...issues.values()],
  };
}

/** A read's morphology: its own class-set snapshot and target, and its cells. */
export function morphologyOfRead(read: { classSet: Pick<ClassSet, 'classes'>; targetCells: number }, cellCounts: Iterable<CellCount>, options: Pick<MorphologyOptions, 'z'> = {}): Morphology {
  return summariseMorphology(morphologyClasses(read.classSet), cellCounts, { ...options, target: Math.max(1, Math.round(read.targetCells)) });
}
