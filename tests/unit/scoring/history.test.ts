import { describe, expect, it } from 'vitest';
import {
  applyOp,
  canRedo,
  canUndo,
  createHistory,
  forgetMarks,
  invert,
  push,
  redo,
  undo,
  type History,
  type MarkOp,
} from '@/lib/scoring/history';
import type { ScoringMark } from '@/lib/scoring/types';

const A: ScoringMark = { id: '6f1c1c1e-7c33-4a8e-9a43-0d6c2b8f0a01', imageId: 'img1', x: 10, y: 20, classKey: 'normal', tags: [], version: 1 };
const B: ScoringMark = { id: '6f1c1c1e-7c33-4a8e-9a43-0d6c2b8f0a02', imageId: 'img1', x: 40, y: 50, classKey: 'distal_droplet', tags: [] };

const empty = (): Map<string, ScoringMark> => new Map();

describe('applyOp and invert', () => {
  it('creates, updates and deletes without mutating the input', () => {
    const m0 = empty();
    const m1 = applyOp(m0, { type: 'create', mark: A });
    expect(m0.size).toBe(0);
    expect(m1.get(A.id)).toEqual(A);
    const m2 = applyOp(m1, { type: 'update', id: A.id, before: { classKey: 'normal' }, after: { classKey: 'acrosome_defect' } });
    expect(m1.get(A.id)?.classKey).toBe('normal');
    expect(m2.get(A.id)).toEqual({ ...A, classKey: 'acrosome_defect' });
    const m3 = applyOp(m2, { type: 'delete', mark: m2.get(A.id)! });
    expect(m3.has(A.id)).toBe(false);
    expect(m2.has(A.id)).toBe(true);
  });

  it('treats an update or delete of a missing mark as a no-op', () => {
    const m = applyOp(new Map([[B.id, B]]), { type: 'update', id: A.id, before: { x: 1 }, after: { x: 2 } });
    expect([...m.keys()]).toEqual([B.id]);
    expect(applyOp(m, { type: 'delete', mark: A }).size).toBe(1);
  });

  it('inverts: create ↔ delete with the same mark, update swaps before/after', () => {
    expect(invert({ type: 'create', mark: A })).toEqual({ type: 'delete', mark: A });
    expect(invert({ type: 'delete', mark: A })).toEqual({ type: 'create', mark: A });
    expect(invert<ScoringMark>({ type: 'update', id: A.id, before: { x: 1 }, after: { x: 2 } })).toEqual({
      type: 'update',
      id: A.id,
      before: { x: 2 },
      after: { x: 1 },
    });
  });

  it('applying an op then its inverse gives back the same marks', () => {
    const start = new Map([[A.id, A], [B.id, B]]);
    const ops: MarkOp[] = [
      { type: 'update', id: A.id, before: { x: 10, y: 20 }, after: { x: 11, y: 22 } },
      { type: 'delete', mark: B },
    ];
    for (const op of ops) expect(applyOp(applyOp(start, op), invert(op))).toEqual(start);
  });
});

describe('history', () => {
  it('undo of a create deletes the same id; redo re-creates it', () => {
    let h: History = push(createHistory(), { type: 'create', mark: A });
    expect(canUndo(h)).toBe(true);
    expect(canRedo(h)).toBe(false);
    const u = undo(h)!;
    expect(u.op).toEqual({ type: 'delete', mark: A });
    h = u.history;
    expect(canUndo(h)).toBe(false);
    expect(canRedo(h)).toBe(true);
    const r = redo(h)!;
    expect(r.op).toEqual({ type: 'create', mark: A });
    expect(canRedo(r.history)).toBe(false);
  });

  it('undo of a delete re-creates the mark with the SAME id', () => {
    const u = undo(push(createHistory(), { type: 'delete', mark: A }))!;
    expect(u.op.type).toBe('create');
    expect(u.op.type === 'create' && u.op.mark.id).toBe(A.id);
  });

  it('walks a sequence back and forth and ends where it started', () => {
    const ops: MarkOp[] = [
      { type: 'create', mark: A },
      { type: 'create', mark: B },
      { type: 'update', id: A.id, before: { classKey: 'normal' }, after: { classKey: 'abnormal_head' } },
      { type: 'delete', mark: B },
    ];
    let marks = empty();
    let h = createHistory();
    for (const op of ops) {
      marks = applyOp(marks, op);
      h = push(h, op);
    }
    expect([...marks.values()]).toEqual([{ ...A, classKey: 'abnormal_head' }]);
    for (let i = 0; i < ops.length; i++) {
      const s = undo(h)!;
      marks = applyOp(marks, s.op);
      h = s.history;
    }
    expect(marks.size).toBe(0);
    expect(undo(h)).toBeNull();
    for (let i = 0; i < 2; i++) {
      const s = redo(h)!;
      marks = applyOp(marks, s.op);
      h = s.history;
    }
    expect([...marks.values()]).toEqual([A, B]);
  });

  it('clears redo when a new op is pushed after an undo', () => {
    let h = push(push(createHistory(), { type: 'create', mark: A }), { type: 'create', mark: B });
    h = undo(h)!.history;
    expect(canRedo(h)).toBe(true);
    h = push(h, { type: 'update', id: A.id, before: { x: 10 }, after: { x: 12 } });
    expect(canRedo(h)).toBe(false);
    expect(redo(h)).toBeNull();
    expect(h.past).toHaveLength(2);
  });

  it('keeps at most the limit, dropping the oldest (default 500)', () => {
    expect(createHistory().limit).toBe(500);
    let h = createHistory(3);
    const marks = [1, 2, 3, 4, 5].map((n) => ({ ...B, id: `id-${n}` }));
    for (const mark of marks) h = push(h, { type: 'create', mark });
    expect(h.past.map((op) => (op.type === 'create' ? op.mark.id : ''))).toEqual(['id-3', 'id-4', 'id-5']);
    let big = createHistory();
    for (let i = 0; i < 510; i++) big = push(big, { type: 'create', mark: { ...B, id: `m${i}` } });
    expect(big.past).toHaveLength(500);
  });

  it('does not mutate a history it is given', () => {
    const h0 = push(createHistory(), { type: 'create', mark: A });
    const h1 = push(h0, { type: 'create', mark: B });
    undo(h1);
    expect(h0.past).toHaveLength(1);
    expect(h1.past).toHaveLength(2);
    expect(h1.future).toHaveLength(0);
  });

  it('forgets the ops of marks another tab changed', () => {
    let h = push(push(createHistory(), { type: 'create', mark: A }), { type: 'create', mark: B });
    h = undo(h)!.history;
    const f = forgetMarks(h, new Set([B.id]));
    expect(f.past).toHaveLength(1);
    expect(f.future).toHaveLength(0);
  });

  it('refuses a bad limit', () => {
    expect(() => createHistory(0)).toThrow(RangeError);
  });
});
