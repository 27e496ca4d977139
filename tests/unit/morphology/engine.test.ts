import { describe, expect, it } from 'vitest';
import { DEFAULT_CLASS_SET } from '@/lib/class-sets/default-set';
import { MORPHOLOGY_VERSION, morphologyClasses, morphologyOfRead, summariseMorphology, type CellCount } from '@/lib/morphology/engine';
import { countMarks, tallyMarks, type TallyMark } from '@/lib/morphology/tally';
import { mulberry32 } from '@/lib/synthetic/prng';

const classes = morphologyClasses(DEFAULT_CLASS_SET);
const read = { classSet: DEFAULT_CLASS_SET, targetCells: 200 };

describe('summariseMorphology (grouped counts)', () => {
  // The rows a grouped query gives: 81 normal, 182 abnormal (40 of them tagged with a second
  // defect), and 5 non-sperm cells, in 263 + 5 cells.
  const rows: CellCount[] = [
    { classId: 'normal', count: 81 },
    { classId: 'abnormal_head', count: 60 },
    { classId: 'proximal_droplet', tags: ['bent_coiled_tail'], count: 25 },
    { classId: 'proximal_droplet', count: 35 },
    { classId: 'bent_coiled_tail', tags: ['distal_droplet', 'abnormal_midpiece'], count: 15 },
    { classId: 'bent_coiled_tail', count: 47 },
    { classId: 'round_cell', count: 3 },
    { classId: 'leukocyte', count: 2 },
  ];
  const m = morphologyOfRead(read, rows);

  it('counts sperm cells, keeps non-sperm apart and gives % normal with its Wilson interval', () => {
    expect(m.version).toBe(MORPHOLOGY_VERSION);
    expect(m.cellsCounted).toBe(263);
    expect(m.nonSpermCounted).toBe(5);
    expect(m.normalCount).toBe(81);
    expect(m.abnormalCount).toBe(182);
    // 81/263 → 0.2553–0.3662 (Newcombe 1998, Stat Med 17:857–872, method 3; docs/references.md)
    expect(m.pctNormal).toBeCloseTo((81 / 263) * 100, 12);
    expect(m.normalIntervalPct!.lower).toBeCloseTo(25.53, 2);
    expect(m.normalIntervalPct!.upper).toBeCloseTo(36.62, 2);
    expect(m.intervalZ).toBe(1.959964);
    expect(m.targetReached).toBe(true);
    expect(m.targetProgressPct).toBe(100);
    expect(m.perImage).toEqual([]);
    expect(m.issues).toEqual([]);
  });

  it('counts tags in the defect frequencies only, with groups counting a cell once', () => {
    const byClass = Object.fromEntries(m.defectFrequency.perClass.map((d) => [d.classId, d.cellsWithDefect]));
    // tail: 62 primary + 25 tagged = 87; distal and midpiece: 15 tagged each (computed)
    expect(byClass.bent_coiled_tail).toBe(87);
    expect(byClass.distal_droplet).toBe(15);
    expect(byClass.abnormal_midpiece).toBe(15);
    expect(byClass.normal).toBeUndefined();
    expect(byClass.round_cell).toBeUndefined();
    // 182 primary defects + 25 + 2 × 15 tags = 237 defects on 263 cells (computed)
    expect(m.defectFrequency.totalDefects).toBe(237);
    expect(m.defectFrequency.sumPct).toBeCloseTo((237 / 263) * 100, 12);
    const groups = Object.fromEntries(m.defectFrequency.groups.map((g) => [g.group, g.cellsWithDefect]));
    // droplet: 60 proximal cells + 15 tail cells with a distal tag = 75 (computed)
    expect(groups.droplet).toBe(75);
    expect(groups.tail).toBe(87);
    // the primary view is untouched by tags: tail 62 of 263
    expect(m.cells.perClass.find((c) => c.classId === 'bent_coiled_tail')!.count).toBe(62);
    expect(m.cells.groups.reduce((s, g) => s + g.count, 0)).toBe(263);
  });

  it('gives the same figures as the marks they were counted from, in any order and split', () => {
    const rnd = mulberry32(7);
    const keys = DEFAULT_CLASS_SET.classes.map((c) => c.key);
    const defects = DEFAULT_CLASS_SET.classes.filter((c) => c.countsAsSperm && c.group !== 'normal').map((c) => c.key);
    const marks: TallyMark[] = Array.from({ length: 500 }, (_, i) => {
      const classId = keys[Math.floor(rnd() * keys.length)]!;
      const sperm = DEFAULT_CLASS_SET.classes.find((c) => c.key === classId)!.countsAsSperm;
      const extraTags = sperm && rnd() < 0.3 ? [defects[Math.floor(rnd() * defects.length)]!].filter((t) => t !== classId) : [];
      return { classId, extraTags, imageId: `img-${i % 4}` };
    });
    const fromMarks = tallyMarks(classes, marks);
    const rowsOf = countMarks(marks.map((x) => ({ classKey: x.classId, tags: x.extraTags ?? [], imageId: x.imageId })));
    // Rows without images, in reverse order, some split in two: the server's shape.
    const serverRows = rowsOf.reverse().flatMap(({ imageId: _i, ...r }) => (r.count > 1 ? [{ ...r, count: 1 }, { ...r, count: r.count - 1 }] : [r]));
    const fromRows = summariseMorphology(classes, serverRows);
    const { perImage: _a, issues: _b, ...left } = fromMarks;
    const { perImage: _c, issues: _d, ...right } = fromRows;
    expect(right).toEqual(left);
    expect(fromMarks.perImage.map((p) => p.imageId)).toEqual(['img-0', 'img-1', 'img-2', 'img-3']);
  });

  it('adds repeated rows, ignores empty ones and treats tag order as immaterial', () => {
    const a = summariseMorphology(classes, [{ classId: 'abnormal_head', tags: ['distal_droplet', 'bent_coiled_tail'], count: 3 }, { classId: 'normal', count: 0 }]);
    const b = summariseMorphology(classes, [
      { classId: 'abnormal_head', tags: ['bent_coiled_tail', 'distal_droplet'], count: 1 },
      { classId: 'abnormal_head', tags: ['distal_droplet', 'bent_coiled_tail'], count: 2 },
    ]);
    expect(b).toEqual(a);
    expect(a.defectFrequency.totalDefects).toBe(9);
  });

  it('counts the cells an issue concerns, and refuses impossible counts', () => {
    const r = summariseMorphology(classes, [
      { classId: 'ghost', count: 2 },
      { classId: 'normal', tags: ['bent_coiled_tail'], count: 3 },
      { classId: 'round_cell', tags: ['bent_coiled_tail'], count: 1 },
    ]);
    expect(r.cellsCounted).toBe(3);
    expect(r.normalCount).toBe(3);
    expect(r.issues).toEqual([
      { kind: 'unknown-class', classId: 'ghost', cells: 2 },
      { kind: 'normal-with-defect-tags', cells: 3 },
      { kind: 'tags-on-non-sperm', classId: 'round_cell', cells: 1 },
    ]);
    expect(() => summariseMorphology(classes, [{ classId: 'normal', count: -1 }])).toThrow(RangeError);
    expect(() => summariseMorphology(classes, [{ classId: 'normal', count: 1.5 }])).toThrow(RangeError);
  });

  it('takes the target from the read and reports progress towards it', () => {
    const small = morphologyOfRead({ classSet: DEFAULT_CLASS_SET, targetCells: 100 }, [{ classId: 'normal', count: 40 }, { classId: 'leukocyte', count: 30 }]);
    expect(small.target).toBe(100);
    expect(small.targetProgressPct).toBe(40);
    expect(small.remainingToTarget).toBe(60);
    expect(small.targetReached).toBe(false);
  });

  it('maps the snapshot: non-sperm classes stay out of every sperm group', () => {
    const round = classes.find((c) => c.id === 'round_cell')!;
    expect(round).toMatchObject({ countsAsSperm: false, group: 'other' });
    const only = morphologyOfRead(read, [{ classId: 'round_cell', count: 4 }]);
    expect(only.cells.groups.find((g) => g.group === 'other')!.count).toBe(0);
    expect(only.pctNormal).toBeNull();
    expect(only.normalIntervalPct).toBeNull();
  });
});
