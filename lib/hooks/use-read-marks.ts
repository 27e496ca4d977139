'use client';

import { useCallback, useRef, useState } from 'react';
import { submitReadRequest } from '@/lib/api/reads-client';
import { OPEN, SUBMITTED } from '@/lib/reads/kinds';
import { applyOp, createHistory, forgetMarks, push, redo, undo, type History, type MarkOp } from '@/lib/scoring/history';
import { mergeServerMarks, opToChange, type ChangeQueue } from '@/lib/scoring/queue';
import { newId, type ReadDetail, type ReadPayload, type ScoringMark } from '@/lib/scoring/types';
import { useMarkSync } from './use-mark-sync';

/*
 * A read's marks in the browser: the map the canvas and tally draw from, the undo history, and
 * the wiring to the change queue (useMarkSync) that saves every change and folds the server's
 * answers (acks, conflicts, refusals, fresh copies) back in.
 */

export type MarkMapState = Map<string, ScoringMark>;

function sameMark(a: ScoringMark, b: ScoringMark): boolean {
  return (
    a.imageId === b.imageId &&
    Number(a.x) === Number(b.x) &&
    Number(a.y) === Number(b.y) &&
    a.classKey === b.classKey &&
    a.version === b.version &&
    a.tags.length === b.tags.length &&
    a.tags.every((t, i) => t === b.tags[i])
  );
}

export function useReadMarks(initial: ReadPayload) {
  const readId = String(initial.read.id);
  const [read, setRead] = useState<ReadDetail>(initial.read);
  const [marks, setMarksState] = useState<MarkMapState>(() => new Map(initial.marks.map((m) => [m.id, m])));
  const marksRef = useRef(marks);
  const setMarks = useCallback((next: MarkMapState) => {
    marksRef.current = next;
    setMarksState(next);
  }, []);
  const [history, setHistoryState] = useState<History<ScoringMark>>(createHistory<ScoringMark>);
  const historyRef = useRef(history);
  const setHistory = useCallback((h: History<ScoringMark>) => {
    historyRef.current = h;
    setHistoryState(h);
  }, []);
  const [notice, setNotice] = useState<string | null>(null);

  const sync = useMarkSync<ReadPayload>(
    readId,
    { enabled: true },
    {
      onRestore(queue: ChangeQueue) {
        if (queue.size === 0) return;
        const server = [...marksRef.current.values()];
        const local = new Map(server.map((m) => [m.id, m]));
        for (const e of queue.all()) {
          if (e.kind === 'upsert' && e.payload) local.set(e.markId, { ...e.payload, tags: [...e.payload.tags] });
          else local.delete(e.markId);
        }
        const merged = mergeServerMarks([...local.values()], server, queue.pendingMarkIds());
        setMarks(new Map(merged.map((m) => [m.id, m])));
      },
      onAcked(acks) {
        let next: MarkMapState | null = null;
        for (const a of acks) {
          if (a.version === undefined) continue;
          const m = (next ?? marksRef.current).get(a.markId);
          if (!m || m.version === a.version) continue;
          next ??= new Map(marksRef.current);
          next.set(a.markId, { ...m, version: a.version });
        }
        if (next) setMarks(next);
      },
      onConflicts(conflicts) {
        const next = new Map(marksRef.current);
        for (const c of conflicts) {
          if (c.server) next.set(c.markId, c.server);
          else next.delete(c.markId);
        }
        setMarks(next);
        setHistory(forgetMarks(historyRef.current, new Set(conflicts.map((c) => c.markId))));
        setNotice(`${conflicts.length} mark${conflicts.length === 1 ? ' was' : 's were'} changed elsewhere (another tab?) at the same time; the saved version is shown.`);
      },
      onRejected(rejected) {
        setHistory(forgetMarks(historyRef.current, new Set(rejected.map((r) => r.markId))));
      },
      onServerState(state) {
        setRead((r) => ({ ...r, ...state.read, classSet: state.read.classSet ?? r.classSet }));
        const pending = sync.getQueue().pendingMarkIds();
        const current = marksRef.current;
        const merged = mergeServerMarks([...current.values()], state.marks, pending);
        const next: MarkMapState = new Map();
        const stale = new Set<string>();
        let changed = merged.length !== current.size;
        for (const m of merged) {
          const mine = current.get(m.id);
          // Keep our map when nothing changed, so the canvas and tally do not redraw.
          if (mine && (mine === m || sameMark(mine, m))) next.set(m.id, mine);
          else {
            next.set(m.id, m);
            changed = true;
            if (mine) stale.add(m.id);
          }
        }
        for (const id of current.keys()) if (!next.has(id)) stale.add(id);
        if (changed) setMarks(next);
        if (stale.size) setHistory(forgetMarks(historyRef.current, stale));
      },
    },
  );

  const canEdit = read.canEdit && read.status === OPEN && !sync.status.locked;

  /** Apply an op locally and queue it for the server; returns the new marks. */
  const apply = useCallback(
    (op: MarkOp<ScoringMark>) => {
      const next = applyOp(marksRef.current, op);
      setMarks(next);
      const change = opToChange(op, next, { opId: newId(), now: Date.now() });
      if (change) sync.enqueue(change);
      return next;
    },
    [setMarks, sync],
  );

  /** A new user action: applied, queued and put on the undo history. */
  const perform = useCallback(
    (op: MarkOp<ScoringMark>) => {
      setHistory(push(historyRef.current, op));
      return apply(op);
    },
    [apply, setHistory],
  );

  /** Undo or redo one step; false when there is none (or the read is locked). */
  const travel = (way: 'undo' | 'redo'): boolean => {
    if (!canEdit) return false;
    const step = (way === 'undo' ? undo : redo)(historyRef.current);
    if (!step) return false;
    setHistory(step.history);
    apply(step.op);
    return true;
  };

  /** Save what waits, then submit and lock the read. Returns a message when it could not. */
  const submit = async (): Promise<string | null> => {
    const saved = await sync.flush();
    if (!saved) return 'Some changes are not saved yet. Submit once the status says “All changes saved”.';
    const answer = await submitReadRequest(readId);
    if (!answer.ok) return answer.message;
    setRead((r) => ({ ...r, ...answer.read, classSet: answer.read.classSet ?? r.classSet, status: SUBMITTED, canEdit: false }));
    void sync.refresh();
    return null;
  };

  return { read, marks, marksRef, history, sync, canEdit, notice, dismissNotice: () => setNotice(null), perform, travel, submit };
}
