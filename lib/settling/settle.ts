/**
 * Settling: the decisions a second reader (or a veterinarian) takes on the disagreements between
 * the submitted first and second reads, and the settled read they make. Pure; the database side
 * is db/queries/settle-core.ts.
 *
 * The settled read holds one mark per cell the settler accepts:
 * - every agreed pair (same class): the first reader's position, the agreed class and the first
 *   reader's extra defect tags;
 * - every decided disagreement (lib/agreement's Disagreement, by its stable key):
 *   'first'    the first reader's class and tags (no mark where only the second reader marked);
 *   'second'   the second reader's class and tags (no mark where only the first reader marked);
 *              a pair keeps the first reader's position, as agreed pairs do;
 *   'other'    the class the settler gives, at the mark that exists (the first reader's for a pair),
 *              with that mark's tags less the new class (none on a non-sperm class);
 *   'not-cell' no mark.
 * Non-sperm pairs settle the same way: they are tallied apart by the morphology engine.
 */
import type { Disagreement, ImagePairing } from '@/lib/agreement/agreement';
import type { PairingMark } from '@/lib/agreement/pairing';

/** The four decisions, named once (the database enum is the landed migration's; a unit test compares). */
export const SETTLE_DECISIONS = ['first', 'second', 'other', 'not-cell'] as const;
export type SettleDecisionKind = (typeof SETTLE_DECISIONS)[number];

export interface SettleDecision {
  key: string;
  decision: SettleDecisionKind;
  /** For 'other' only. */
  classKey: string | null;
}

/** A mark with what the settled read copies of it. */
export interface SettleMark extends PairingMark {
  tags: readonly string[];
}

/** What the settle rules need of a class. */
export interface SettleClass {
  key: string;
  countsAsSperm: boolean;
}

/** A mark of the settled read, before it has an id. */
export interface SettledMark {
  imageId: string;
  x: number;
  y: number;
  classKey: string;
  tags: string[];
}

/** Why this decision cannot settle this disagreement, or null when it can. */
export function whyNotDecision(d: Pick<SettleDecision, 'decision' | 'classKey'>, classes: readonly SettleClass[]): string | null {
  if (d.decision === 'other') {
    if (!d.classKey) return 'Choose the class the cell gets.';
    if (!classes.some((c) => c.key === d.classKey)) return `“${d.classKey}” is not a class of this read’s class set.`;
    return null;
  }
  if (d.classKey) return 'Only “another class” takes a class; leave it out for the other decisions.';
  return null;
}

/**
 * The decision in force for each disagreement key: the last one given (rows in the order they
 * were stored; a later row for a key replaces an earlier one).
 */
export function decisionsInForce<D extends Pick<SettleDecision, 'key'>>(rows: readonly D[]): Map<string, D> {
  const out = new Map<string, D>();
  for (const r of rows) out.set(r.key, r);
  return out;
}

export interface SettleProgress {
  total: number;
  decided: number;
  /** Keys of the disagreements still without a decision, in the walk's order. */
  undecided: string[];
}

/** How far settling has come: decisions for keys that are not disagreements (stale) do not count. */
export function settleProgress(disagreements: readonly Pick<Disagreement, 'key'>[], decisions: ReadonlyMap<string, unknown>): SettleProgress {
  const undecided = disagreements.filter((d) => !decisions.has(d.key)).map((d) => d.key);
  return { total: disagreements.length, decided: disagreements.length - undecided.length, undecided };
}

const disagreementKey = (imageId: string, first: { id: string } | null, second: { id: string } | null) => `${imageId}:${first?.id ?? ''}:${second?.id ?? ''}`;

const markOf = (imageId: string, at: SettleMark, classKey: string, tags: readonly string[]): SettledMark => ({ imageId, x: at.x, y: at.y, classKey, tags: [...tags] });

function decided(imageId: string, first: SettleMark | null, second: SettleMark | null, d: SettleDecision, classes: ReadonlyMap<string, SettleClass>): SettledMark | null {
  const at = first ?? second!;
  switch (d.decision) {
    case 'first':
      return first ? markOf(imageId, first, first.classKey, first.tags) : null;
    case 'second':
      return second ? markOf(imageId, at, second.classKey, second.tags) : null;
    case 'other': {
      const cls = classes.get(d.classKey ?? '');
      if (!cls) throw new RangeError(`“${d.classKey}” is not a class of this read’s class set`);
      return markOf(imageId, at, cls.key, cls.countsAsSperm ? at.tags.filter((t) => t !== cls.key) : []);
    }
    case 'not-cell':
      return null;
  }
}

export interface SettledRead {
  marks: SettledMark[];
  /** Disagreement keys with no decision (the read cannot be written while any remain). */
  undecided: string[];
}

/**
 * The settled read's marks from the two reads' pairing (lib/agreement's pairCollection, with the
 * marks' tags) and the decisions in force by disagreement key. Marks come image by image, pairs
 * in the first read's order, then cells only the first, then only the second reader marked.
 */
export function buildSettledRead<M extends SettleMark>(
  pairings: readonly ImagePairing<M>[],
  decisions: ReadonlyMap<string, SettleDecision>,
  classes: readonly SettleClass[],
): SettledRead {
  const byKey = new Map(classes.map((c) => [c.key, c]));
  const marks: SettledMark[] = [];
  const undecided: string[] = [];
  const settle = (imageId: string, first: M | null, second: M | null) => {
    const key = disagreementKey(imageId, first, second);
    const d = decisions.get(key);
    if (!d) {
      undecided.push(key);
      return;
    }
    const m = decided(imageId, first, second, d, byKey);
    if (m) marks.push(m);
  };
  for (const { imageId, pairing } of pairings) {
    for (const p of pairing.pairs) {
      if (p.first.classKey === p.second.classKey) marks.push(markOf(imageId, p.first, p.first.classKey, p.first.tags));
      else settle(imageId, p.first, p.second);
    }
    for (const m of pairing.onlyFirst) settle(imageId, m, null);
    for (const m of pairing.onlySecond) settle(imageId, null, m);
  }
  return { marks, undecided };
}
