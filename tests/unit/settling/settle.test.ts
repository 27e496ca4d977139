import { describe, expect, it } from 'vitest';
import { collectionAgreement, pairCollection } from '@/lib/agreement/agreement';
import { DEFAULT_CLASS_SET } from '@/lib/class-sets/default-set';
import { morphologyClasses, morphologyOfRead } from '@/lib/morphology/engine';
import { countMarks } from '@/lib/morphology/tally';
import { buildSettledRead, decisionsInForce, settleProgress, whyNotDecision, SETTLE_DECISIONS, type SettleDecision, type SettleMark } from '@/lib/settling/settle';
import { SETTLE_DECISIONS as MIGRATION_DECISIONS } from '@/db/migrations/20261226000200_settle_decisions';

/*
 * The settled read from a hand-made layout. Every expected mark below is worked out by hand from
 * the rules in lib/settling/settle.ts (no outside source: these are our own rules, not a formula).
 */
const classes = DEFAULT_CLASS_SET.classes.map((c) => ({ key: c.key, countsAsSperm: c.countsAsSperm }));
const sperm = new Set(DEFAULT_CLASS_SET.classes.filter((c) => c.countsAsSperm).map((c) => c.key));
const id = (n: number) => `00000000-0000-4000-8000-${String(n).padStart(12, '0')}`;
const mark = (n: number, x: number, y: number, classKey: string, tags: string[] = []): SettleMark => ({ id: id(n), x, y, classKey, countsAsSperm: sperm.has(classKey), tags });

// Image 1: A agreed normal; B class differs (first: proximal droplet + tag bent tail, second: distal droplet);
// C only the first reader (abnormal head); D only the second reader (normal); E agreed round cells.
// Image 2: F class differs (first normal, second bent tail); G only the second reader (detached head).
const first1 = [mark(1, 100, 100, 'normal'), mark(2, 300, 100, 'proximal_droplet', ['bent_coiled_tail']), mark(3, 500, 100, 'abnormal_head'), mark(4, 700, 100, 'round_cell')];
const second1 = [mark(11, 102, 101, 'normal'), mark(12, 301, 99, 'distal_droplet'), mark(14, 900, 300, 'normal'), mark(15, 701, 100, 'round_cell')];
const first2 = [mark(21, 50, 60, 'normal')];
const second2 = [mark(31, 52, 61, 'bent_coiled_tail'), mark(32, 400, 400, 'detached_head')];

const pairings = pairCollection([
  { imageId: '7', first: first1, second: second1, maxDistancePx: 16 },
  { imageId: '8', first: first2, second: second2, maxDistancePx: 16 },
]);
const agreement = collectionAgreement(pairings, morphologyClasses(DEFAULT_CLASS_SET));
const keys = {
  B: `7:${id(2)}:${id(12)}`,
  C: `7:${id(3)}:`,
  D: `7::${id(14)}`,
  F: `8:${id(21)}:${id(31)}`,
  G: `8::${id(32)}`,
};
const decide = (entries: [keyof typeof keys, SettleDecision['decision'], string?][]) =>
  new Map(entries.map(([k, decision, classKey]) => [keys[k], { key: keys[k], decision, classKey: classKey ?? null }]));

describe('the settled read', () => {
  it('has the disagreements lib/agreement lists, under the keys it gives', () => {
    expect(agreement.disagreements.map((d) => d.key).sort()).toEqual(Object.values(keys).sort());
  });

  it('keeps agreed pairs at the first reader’s position and settles each disagreement by its decision', () => {
    const built = buildSettledRead(pairings, decide([['B', 'second'], ['C', 'first'], ['D', 'not-cell'], ['F', 'other', 'abnormal_midpiece'], ['G', 'second']]), classes);
    expect(built.undecided).toEqual([]);
    expect(built.marks).toEqual([
      { imageId: '7', x: 100, y: 100, classKey: 'normal', tags: [] }, // A agreed
      { imageId: '7', x: 300, y: 100, classKey: 'distal_droplet', tags: [] }, // B: second's class and tags, first's position
      { imageId: '7', x: 700, y: 100, classKey: 'round_cell', tags: [] }, // E agreed (non-sperm)
      { imageId: '7', x: 500, y: 100, classKey: 'abnormal_head', tags: [] }, // C kept
      // D: not a cell, no mark
      { imageId: '8', x: 50, y: 60, classKey: 'abnormal_midpiece', tags: [] }, // F: another class at the first's position
      { imageId: '8', x: 400, y: 400, classKey: 'detached_head', tags: [] }, // G: the second's cell
    ]);
  });

  it('takes the first reader’s tags with their class, and no mark where the chosen reader marked none', () => {
    const built = buildSettledRead(pairings, decide([['B', 'first'], ['C', 'second'], ['D', 'first'], ['F', 'first'], ['G', 'first']]), classes);
    expect(built.marks.filter((m) => m.imageId === '7')).toEqual([
      { imageId: '7', x: 100, y: 100, classKey: 'normal', tags: [] },
      { imageId: '7', x: 300, y: 100, classKey: 'proximal_droplet', tags: ['bent_coiled_tail'] },
      { imageId: '7', x: 700, y: 100, classKey: 'round_cell', tags: [] },
    ]);
    expect(built.marks.filter((m) => m.imageId === '8')).toEqual([{ imageId: '8', x: 50, y: 60, classKey: 'normal', tags: [] }]);
  });

  it('drops the tag that becomes the class, and every tag on a non-sperm class', () => {
    const toTag = buildSettledRead(pairings, decide([['B', 'other', 'bent_coiled_tail'], ['C', 'first'], ['D', 'first'], ['F', 'first'], ['G', 'first']]), classes);
    expect(toTag.marks[1]).toEqual({ imageId: '7', x: 300, y: 100, classKey: 'bent_coiled_tail', tags: [] });
    const toAbnormalHead = buildSettledRead(pairings, decide([['B', 'other', 'abnormal_head'], ['C', 'first'], ['D', 'first'], ['F', 'first'], ['G', 'first']]), classes);
    expect(toAbnormalHead.marks[1]!.tags).toEqual(['bent_coiled_tail']);
    const toRound = buildSettledRead(pairings, decide([['B', 'other', 'leukocyte'], ['C', 'first'], ['D', 'first'], ['F', 'first'], ['G', 'first']]), classes);
    expect(toRound.marks[1]).toEqual({ imageId: '7', x: 300, y: 100, classKey: 'leukocyte', tags: [] });
  });

  it('lists what is undecided and writes nothing for it', () => {
    const built = buildSettledRead(pairings, decide([['B', 'second']]), classes);
    expect(built.undecided.sort()).toEqual([keys.C, keys.D, keys.F, keys.G].sort());
    expect(built.marks.map((m) => m.classKey)).toEqual(['normal', 'distal_droplet', 'round_cell']);
  });

  it('gives totals through the one morphology engine: 5 sperm cells, 1 normal = 20 %; the round cell apart', () => {
    // By hand from the first test's marks: sperm cells A normal, B distal droplet, C abnormal head,
    // F abnormal midpiece, G detached head → 5 cells, 1 normal → 20 % normal; E is a round cell.
    const built = buildSettledRead(pairings, decide([['B', 'second'], ['C', 'first'], ['D', 'not-cell'], ['F', 'other', 'abnormal_midpiece'], ['G', 'second']]), classes);
    const m = morphologyOfRead({ classSet: DEFAULT_CLASS_SET, targetCells: 200 }, countMarks(built.marks));
    expect(m.cellsCounted).toBe(5);
    expect(m.pctNormal).toBe(20);
  });
});

describe('decisions', () => {
  it('are the four kinds the migration stores', () => {
    expect([...SETTLE_DECISIONS]).toEqual([...MIGRATION_DECISIONS]);
  });

  it('in force: the last given per key', () => {
    const m = decisionsInForce([
      { key: 'a', decision: 'first' as const },
      { key: 'b', decision: 'second' as const },
      { key: 'a', decision: 'not-cell' as const },
    ]);
    expect([...m.entries()].map(([k, d]) => [k, d.decision])).toEqual([['a', 'not-cell'], ['b', 'second']]);
  });

  it('progress counts only decisions on the disagreements', () => {
    const p = settleProgress([{ key: 'a' }, { key: 'b' }, { key: 'c' }], new Map([['a', 1], ['stale', 1]]));
    expect(p).toEqual({ total: 3, decided: 1, undecided: ['b', 'c'] });
  });

  it('another class must be a class of the set; the others take none', () => {
    expect(whyNotDecision({ decision: 'other', classKey: null }, classes)).toMatch(/Choose the class/);
    expect(whyNotDecision({ decision: 'other', classKey: 'no_such' }, classes)).toMatch(/not a class/);
    expect(whyNotDecision({ decision: 'other', classKey: 'normal' }, classes)).toBeNull();
    expect(whyNotDecision({ decision: 'first', classKey: 'normal' }, classes)).toMatch(/Only “another class”/);
    expect(whyNotDecision({ decision: 'not-cell', classKey: null }, classes)).toBeNull();
  });
});
