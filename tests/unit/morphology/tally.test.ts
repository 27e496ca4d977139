import { describe, expect, it } from 'vitest';
import { DEFAULT_TARGET_CELLS, tallyMarks, type MorphologyClass, type TallyMark } from '@/lib/morphology/tally';

const classes: MorphologyClass[] = [
  { id: 'normal', name: 'Normal', group: 'normal', countsAsSperm: true },
  { id: 'head', name: 'Abnormal head shape or size', group: 'head', countsAsSperm: true },
  { id: 'acrosome', name: 'Acrosome defect', group: 'head', countsAsSperm: true },
  { id: 'midpiece', name: 'Abnormal midpiece', group: 'midpiece', countsAsSperm: true },
  { id: 'proximal', name: 'Proximal cytoplasmic droplet', group: 'droplet', countsAsSperm: true },
  { id: 'distal', name: 'Distal cytoplasmic droplet', group: 'droplet', countsAsSperm: true },
  { id: 'tail', name: 'Bent or coiled tail', group: 'tail', countsAsSperm: true },
  { id: 'other', name: 'Other', group: 'other', countsAsSperm: true },
  { id: 'round', name: 'Round cell', group: 'other', countsAsSperm: false },
];

const repeat = (n: number, mark: TallyMark): TallyMark[] => Array.from({ length: n }, () => ({ ...mark }));

describe('tallyMarks', () => {
  // 10 cells on two images: 6 normal, 2 proximal droplet (one also with a bent tail),
  // 1 bent tail (also tagged acrosome and distal), 1 head; plus 2 round cells.
  const marks: TallyMark[] = [
    ...repeat(4, { classId: 'normal', imageId: 'img-1' }),
    { classId: 'proximal', extraTags: ['tail'], imageId: 'img-1' },
    { classId: 'round', imageId: 'img-1' },
    ...repeat(2, { classId: 'normal', imageId: 'img-2' }),
    { classId: 'proximal', imageId: 'img-2' },
    { classId: 'tail', extraTags: ['acrosome', 'distal'], imageId: 'img-2' },
    { classId: 'head', imageId: 'img-2' },
    { classId: 'round', imageId: 'img-2' },
  ];
  const t = tallyMarks(classes, marks);

  it('counts sperm cells and keeps non-sperm apart', () => {
    expect(t.cellsCounted).toBe(10);
    expect(t.nonSpermCounted).toBe(2);
    expect(t.normalCount).toBe(6);
    expect(t.abnormalCount).toBe(4);
    // % normal = normal / cells counted = 6 / 10 (computed from the definition; common practice, docs/references.md)
    expect(t.pctNormal).toBeCloseTo(60, 12);
    expect(t.pctAbnormal).toBeCloseTo(40, 12);
  });

  it('gives primary counts and % per class, summing to 100 %', () => {
    const byId = Object.fromEntries(t.cells.perClass.map((c) => [c.classId, c]));
    expect(t.cells.view).toBe('cells-normal-abnormal');
    expect(byId.proximal.count).toBe(2);
    expect(byId.proximal.pctOfCells).toBeCloseTo(20, 12);
    expect(byId.acrosome.count).toBe(0);
    expect(byId.acrosome.pctOfCells).toBe(0);
    expect(byId.round.count).toBe(2);
    expect(byId.round.pctOfCells).toBeNull();
    const sum = t.cells.perClass.reduce((s, c) => s + (c.pctOfCells ?? 0), 0);
    expect(sum).toBeCloseTo(100, 9);
    // class-set order is kept
    expect(t.cells.perClass.map((c) => c.classId)).toEqual(classes.map((c) => c.id));
  });

  it('gives group totals of primary classes, sperm only', () => {
    const byGroup = Object.fromEntries(t.cells.groups.map((g) => [g.group, g]));
    expect(byGroup.normal.count).toBe(6);
    expect(byGroup.head.count).toBe(1);
    expect(byGroup.droplet.count).toBe(2);
    expect(byGroup.tail.count).toBe(1);
    expect(byGroup.midpiece.count).toBe(0);
    // round cells are group 'other' but not sperm
    expect(byGroup.other.count).toBe(0);
    expect(t.cells.groups.reduce((s, g) => s + g.count, 0)).toBe(10);
    expect(t.cells.groups.reduce((s, g) => s + (g.pct ?? 0), 0)).toBeCloseTo(100, 9);
  });

  it('counts every defect in the defect-frequency view, which may exceed the abnormal %', () => {
    const df = t.defectFrequency;
    expect(df.view).toBe('defect-frequency');
    const byId = Object.fromEntries(df.perClass.map((c) => [c.classId, c]));
    // tail: primary on one cell + tag on another = 2 cells → 20 % (computed; every defect tallied, common practice)
    expect(byId.tail.cellsWithDefect).toBe(2);
    expect(byId.tail.pctOfCells).toBeCloseTo(20, 12);
    expect(byId.acrosome.cellsWithDefect).toBe(1);
    expect(byId.distal.cellsWithDefect).toBe(1);
    expect(byId.proximal.cellsWithDefect).toBe(2);
    expect(byId.head.cellsWithDefect).toBe(1);
    // normal and non-sperm classes are not defects
    expect(byId.normal).toBeUndefined();
    expect(byId.round).toBeUndefined();
    // 7 defects on 4 abnormal cells: 70 % against 40 % abnormal cells (computed)
    expect(df.totalDefects).toBe(7);
    expect(df.sumPct).toBeCloseTo(70, 12);
    const groups = Object.fromEntries(df.groups.map((g) => [g.group, g]));
    // head group: the head cell and the acrosome tag are on different cells → 2 cells
    expect(groups.head.cellsWithDefect).toBe(2);
    // droplet group: proximal ×2 and a distal tag on the tail cell → 3 cells
    expect(groups.droplet.cellsWithDefect).toBe(3);
    expect(groups.tail.cellsWithDefect).toBe(2);
    expect(df.groups.map((g) => g.group)).not.toContain('normal');
  });

  it('gives the Wilson 95 % interval on % normal, in %', () => {
    // 81 normal of 263 sperm cells (with 4 round cells beside them, which must not count):
    // 0.2553–0.3662 (Newcombe 1998, Stat Med 17:857–872, method 3; docs/references.md).
    const w = tallyMarks(classes, [
      ...repeat(81, { classId: 'normal', imageId: 'a' }),
      ...repeat(182, { classId: 'midpiece', imageId: 'a' }),
      ...repeat(4, { classId: 'round', imageId: 'a' }),
    ]);
    expect(w.normalIntervalPct!.lower).toBeCloseTo(25.53, 2);
    expect(w.normalIntervalPct!.upper).toBeCloseTo(36.62, 2);
    // 0 normal of 20: 0.0000–0.1611 (Newcombe 1998, method 3; docs/references.md).
    const none = tallyMarks(classes, repeat(20, { classId: 'tail', imageId: 'a' }));
    expect(none.normalIntervalPct!.lower).toBe(0);
    expect(none.normalIntervalPct!.upper).toBeCloseTo(16.11, 2);
    // The 6/10 read above: the interval brackets the point estimate.
    expect(t.normalIntervalPct!.lower).toBeLessThan(60);
    expect(t.normalIntervalPct!.upper).toBeGreaterThan(60);
  });

  it('tallies each image', () => {
    expect(t.perImage.map((i) => i.imageId)).toEqual(['img-1', 'img-2']);
    expect(t.perImage[0]).toEqual({
      imageId: 'img-1',
      cellsCounted: 5,
      nonSpermCounted: 1,
      normalCount: 4,
      byClass: { normal: 4, proximal: 1, round: 1 },
    });
    expect(t.perImage[1].cellsCounted).toBe(5);
    expect(t.perImage[1].byClass).toEqual({ normal: 2, proximal: 1, tail: 1, head: 1, round: 1 });
  });

  it('tracks the target (default 200, common practice)', () => {
    expect(DEFAULT_TARGET_CELLS).toBe(200);
    expect(t.target).toBe(200);
    expect(t.targetReached).toBe(false);
    expect(t.remainingToTarget).toBe(190);
    const small = tallyMarks(classes, marks, { target: 10 });
    expect(small.targetReached).toBe(true);
    expect(small.remainingToTarget).toBe(0);
  });

  it('reaches 200 with 200 sperm cells, not counting round cells', () => {
    const m = [
      ...repeat(150, { classId: 'normal', imageId: 'a' }),
      ...repeat(49, { classId: 'midpiece', imageId: 'a' }),
      ...repeat(5, { classId: 'round', imageId: 'a' }),
    ];
    expect(tallyMarks(classes, m).targetReached).toBe(false);
    const done = tallyMarks(classes, [...m, { classId: 'midpiece', imageId: 'b' }]);
    expect(done.targetReached).toBe(true);
    // 150 / 200 = 75 % normal (computed)
    expect(done.pctNormal).toBe(75);
  });

  it('returns nulls, not NaN, when no sperm were counted', () => {
    const empty = tallyMarks(classes, []);
    expect(empty.cellsCounted).toBe(0);
    expect(empty.pctNormal).toBeNull();
    expect(empty.pctAbnormal).toBeNull();
    expect(empty.normalIntervalPct).toBeNull();
    expect(empty.defectFrequency.sumPct).toBeNull();
    expect(empty.perImage).toEqual([]);
    expect(empty.cells.perClass.every((c) => c.count === 0 && c.pctOfCells === null)).toBe(true);

    const onlyRound = tallyMarks(classes, repeat(3, { classId: 'round', imageId: 'x' }));
    expect(onlyRound.nonSpermCounted).toBe(3);
    expect(onlyRound.cellsCounted).toBe(0);
    expect(onlyRound.pctNormal).toBeNull();
  });

  it('reports odd marks and tags without breaking the tally', () => {
    const r = tallyMarks(classes, [
      { classId: 'ghost', imageId: 'a' },
      { classId: 'normal', extraTags: ['tail'], imageId: 'a' },
      { classId: 'head', extraTags: ['head', 'normal', 'round', 'nope'], imageId: 'a' },
      { classId: 'round', extraTags: ['tail'], imageId: 'a' },
    ]);
    expect(r.cellsCounted).toBe(2);
    expect(r.nonSpermCounted).toBe(1);
    // a normal primary class keeps the cell normal; its tag still counts as a defect seen
    expect(r.normalCount).toBe(1);
    expect(r.defectFrequency.totalDefects).toBe(2);
    expect(r.issues).toEqual([
      { kind: 'unknown-class', markIndex: 0, classId: 'ghost' },
      { kind: 'normal-with-defect-tags', markIndex: 1 },
      { kind: 'ignored-tag', markIndex: 2, classId: 'head', reason: 'duplicate' },
      { kind: 'ignored-tag', markIndex: 2, classId: 'normal', reason: 'normal' },
      { kind: 'ignored-tag', markIndex: 2, classId: 'round', reason: 'not-sperm' },
      { kind: 'unknown-tag', markIndex: 2, classId: 'nope' },
      { kind: 'tags-on-non-sperm', markIndex: 3, classId: 'round' },
    ]);
  });

  it('refuses a bad target or a class set with duplicate ids', () => {
    expect(() => tallyMarks(classes, [], { target: 0 })).toThrow(RangeError);
    expect(() => tallyMarks(classes, [], { target: 1.5 })).toThrow(RangeError);
    expect(() => tallyMarks([...classes, classes[0]], [])).toThrow(/twice/);
  });
});
