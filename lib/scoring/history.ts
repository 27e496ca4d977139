import type { HasId, ScoringMark } from './types';

/**
 * One user action on marks. Undoing a delete re-creates the mark with the SAME id,
 * so the server must treat a create (PUT by client id) as an upsert that also
 * restores a deleted mark: keep deleted rows as tombstones (or accept re-insert of
 * a deleted id) and bump the version.
 */
export type MarkOp<M extends HasId = ScoringMark> =
  | { type: 'create'; mark: M }
  | { type: 'update'; id: string; before: Partial<M>; after: Partial<M> }
  | { type: 'delete'; mark: M };

export type MarkMap<M extends HasId = ScoringMark> = ReadonlyMap<string, M>;

/**
 * Apply an op without mutating `marks`. Lenient on purpose: another tab may already
 * have deleted a mark, so updating or deleting a missing id is a no-op, and a create
 * of an existing id replaces it (the same upsert the server does).
 */
export function applyOp<M extends HasId>(marks: MarkMap<M>, op: MarkOp<M>): Map<string, M> {
  const next = new Map(marks);
  switch (op.type) {
    case 'create':
      next.set(op.mark.id, op.mark);
      break;
    case 'delete':
      next.delete(op.mark.id);
      break;
    case 'update': {
      const cur = next.get(op.id);
      if (cur) next.set(op.id, { ...cur, ...op.after, id: op.id });
      break;
    }
  }
  return next;
}

export function invert<M extends HasId>(op: MarkOp<M>): MarkOp<M> {
  switch (op.type) {
    case 'create':
      return { type: 'delete', mark: op.mark };
    case 'delete':
      return { type: 'create', mark: op.mark };
    case 'update':
      return { type: 'update', id: op.id, before: op.after, after: op.before };
  }
}

/** The id of the mark an op touches. */
export function opMarkId<M extends HasId>(op: MarkOp<M>): string {
  return op.type === 'update' ? op.id : op.mark.id;
}

export const HISTORY_LIMIT = 500;

export interface History<M extends HasId = ScoringMark> {
  /** Done ops, oldest first. */
  readonly past: readonly MarkOp<M>[];
  /** Undone ops, the next to redo last. */
  readonly future: readonly MarkOp<M>[];
  readonly limit: number;
}

export function createHistory<M extends HasId = ScoringMark>(limit = HISTORY_LIMIT): History<M> {
  if (!(Number.isInteger(limit) && limit > 0)) throw new RangeError('History limit must be a positive integer');
  return { past: [], future: [], limit };
}

/** Record a done op; a new action makes the undone ops unreachable, so redo is cleared. */
export function push<M extends HasId>(h: History<M>, op: MarkOp<M>): History<M> {
  const past = h.past.length >= h.limit ? h.past.slice(h.past.length - h.limit + 1) : h.past.slice();
  past.push(op);
  return { past, future: [], limit: h.limit };
}

export function canUndo(h: History<HasId>): boolean {
  return h.past.length > 0;
}

export function canRedo(h: History<HasId>): boolean {
  return h.future.length > 0;
}

export interface Step<M extends HasId> {
  history: History<M>;
  /** The op to apply locally and send to the server. */
  op: MarkOp<M>;
}

/** Undo the last op: returns its inverse (undo of a create is a delete of the same id). */
export function undo<M extends HasId>(h: History<M>): Step<M> | null {
  const last = h.past[h.past.length - 1];
  if (last === undefined) return null;
  return {
    history: { past: h.past.slice(0, -1), future: [...h.future, last], limit: h.limit },
    op: invert(last),
  };
}

/** Redo the last undone op: returns it as first done. */
export function redo<M extends HasId>(h: History<M>): Step<M> | null {
  const next = h.future[h.future.length - 1];
  if (next === undefined) return null;
  return {
    history: { past: [...h.past, next], future: h.future.slice(0, -1), limit: h.limit },
    op: next,
  };
}

/**
 * Drop history entries for marks that another tab changed under us (a 409 or a
 * merge took the server's copy): undoing them would replay a stale `before`.
 */
export function forgetMarks<M extends HasId>(h: History<M>, ids: ReadonlySet<string>): History<M> {
  const keep = (op: MarkOp<M>) => !ids.has(opMarkId(op));
  return { past: h.past.filter(keep), future: h.future.filter(keep), limit: h.limit };
}
