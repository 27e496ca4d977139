'use client';

import { useCallback, useRef, useState } from 'react';
import { submitReadRequest } from '@/lib/api/reads-client';
import { OPEN, SUBMITTED } from '@/lib/reads/kinds';
import { applyOp, createHistory, forgetMarks, push, redo, undo, type History, type MarkOp } from '@/lib/scoring/history';
import { mergeServerMarks, opToChange, type ChangeQueue } from '@/lib/scoring/queue';
import { isSkip, newId, type CandidateSkip, type ImageCandidateSet, type ReadDetail, type ReadPayload, type ScoringMark, type SyncRecord } from '@/lib/scoring/types';
import { useMarkSync } from './use-mark-sync';

/*
 * A read's marks in the browser: the map the canvas and tally draw from, the undo history, and
 * the wiring to the change queue (useMarkSync) that saves every change and folds the server's
 * answers (acks, conflicts, refusals, fresh copies) back in.
 */

export type MarkMapState = Map<string, ScoringMark>;
export type SkipMapState = Map<string, CandidateSkip>;
/** One undoable action: on a mark, or on a skipped candidate of the cell walk. */
export type ReadOp = MarkOp<SyncRecord>;

/** A create or delete of a skip (skips are never updated). */
export function isSkipOp(op: ReadOp): op is Extract<ReadOp, { mark: unknown }> & { mark: CandidateSkip } {
  return op.type !== 'update' && isSkip(op.mark);
}

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

/** The new candidates, keeping each image's old object where nothing changed (so nothing redraws). */
function keepSameCandidates(cur: Record<string, ImageCandidateSet>, next: Record<string, ImageCandidateSet>): Record<string, ImageCandidateSet> {
  let changed = Object.keys(cur).length !== Object.keys(next).length;
  const out: Record<string, ImageCandidateSet> = {};
  for (const [id, set] of Object.entries(next)) {
    const old = cur[id];
    const same =
      old && old.status === set.status && old.skipped === set.skipped && old.points.length === set.points.length && old.points.every((p, i) => p.x === set.points[i]!.x && p.y === set.points[i]!.y);
    out[id] = same ? old : set;
    if (!same) changed = true;
  }
  return changed ? out : cur;
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
  const [skips, setSkipsState] = useState<SkipMapState>(() => new Map((initial.skips ?? []).map((k) => [k.id, k])));
  const skipsRef = useRef(skips);
  const setSkips = useCallback((next: SkipMapState) => {
    skipsRef.current = next;
    setSkipsState(next);
  }, []);
  const [history, setHistoryState] = useState<History<SyncRecord>>(createHistory<SyncRecord>);
  const historyRef = useRef(history);
  const setHistory = useCallback((h: History<SyncRecord>) => {
    historyRef.current = h;
    setHistoryState(h);
  }, []);
  const [notice, setNotice] = useState<string | null>(null);
  // The images' candidates: a search still running when the page opened shows up with the next poll.
  const [candidates, setCandidates] = useState<Record<string, ImageCandidateSet>>(() => initial.candidates ?? {});

  const sync = useMarkSync<ReadPayload>(
    readId,
    { enabled: true },
    {
      onRestore(queue: ChangeQueue<SyncRecord>) {
        if (queue.size === 0) return;
        const server = [...marksRef.current.values()];
        const serverSkips = [...skipsRef.current.values()];
        const local = new Map(server.map((m) => [m.id, m]));
        const localSkips = new Map(serverSkips.map((k) => [k.id, k]));
        for (const e of queue.all()) {
          if (e.entity === 'skip') {
            if (e.kind === 'upsert' && e.payload && isSkip(e.payload)) localSkips.set(e.markId, { ...e.payload });
            else localSkips.delete(e.markId);
          } else if (e.kind === 'upsert' && e.payload && !isSkip(e.payload)) local.set(e.markId, { ...e.payload, tags: [...e.payload.tags] });
          else local.delete(e.markId);
        }
        const pending = queue.pendingMarkIds();
        setMarks(new Map(mergeServerMarks([...local.values()], server, pending).map((m) => [m.id, m])));
        setSkips(new Map(mergeServerMarks([...localSkips.values()], serverSkips, pending).map((k) => [k.id, k])));
      },
      onAcked(acks) {
        let next: MarkMapState | null = null;
        let nextSkips: SkipMapState | null = null;
        for (const a of acks) {
          if (a.version === undefined) continue;
          const m = (next ?? marksRef.current).get(a.markId);
          if (m && m.version !== a.version) {
            next ??= new Map(marksRef.current);
            next.set(a.markId, { ...m, version: a.version });
          }
          const k = (nextSkips ?? skipsRef.current).get(a.markId);
          if (k && k.version !== a.version) {
            nextSkips ??= new Map(skipsRef.current);
            nextSkips.set(a.markId, { ...k, version: a.version });
          }
        }
        if (next) setMarks(next);
        if (nextSkips) setSkips(nextSkips);
      },
      onConflicts(conflicts) {
        const next = new Map(marksRef.current);
        const nextSkips = new Map(skipsRef.current);
        for (const c of conflicts) {
          const skip = c.server ? isSkip(c.server) : nextSkips.has(c.markId);
          if (skip) {
            if (c.server && isSkip(c.server)) nextSkips.set(c.markId, c.server);
            else nextSkips.delete(c.markId);
          } else if (c.server && !isSkip(c.server)) next.set(c.markId, c.server);
          else next.delete(c.markId);
        }
        setMarks(next);
        setSkips(nextSkips);
        setHistory(forgetMarks(historyRef.current, new Set(conflicts.map((c) => c.markId))));
        setNotice(`${conflicts.length} mark${conflicts.length === 1 ? ' was' : 's were'} changed elsewhere (another tab?) at the same time; the saved version is shown.`);
      },
      onRejected(rejected) {
        setHistory(forgetMarks(historyRef.current, new Set(rejected.map((r) => r.markId))));
      },
      onServerState(state) {
        setRead((r) => ({ ...r, ...state.read, classSet: state.read.classSet ?? r.classSet }));
        if (state.candidates) setCandidates((cur) => keepSameCandidates(cur, state.candidates));
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
        // Skips: the server's copy unless a change of ours waits (only the reader gets them at all).
        const mergedSkips = mergeServerMarks([...skipsRef.current.values()], state.skips ?? [], pending);
        const curSkips = skipsRef.current;
        if (mergedSkips.length !== curSkips.size || mergedSkips.some((k) => curSkips.get(k.id)?.version !== k.version)) setSkips(new Map(mergedSkips.map((k) => [k.id, k])));
        if (stale.size) setHistory(forgetMarks(historyRef.current, stale));
      },
    },
  );

  const canEdit = read.canEdit && read.status === OPEN && !sync.status.locked;

  /** Apply an op locally and queue it for the server; returns the new marks. */
  const apply = useCallback(
    (op: ReadOp): MarkMapState => {
      const ids = { opId: newId(), now: Date.now() };
      if (isSkipOp(op)) {
        const nextSkips = applyOp<SyncRecord>(skipsRef.current, op) as SkipMapState;
        setSkips(nextSkips);
        const change = opToChange<SyncRecord>(op, nextSkips, ids);
        if (change) sync.enqueue({ ...change, entity: 'skip' });
        return marksRef.current;
      }
      const next = applyOp<SyncRecord>(marksRef.current, op) as MarkMapState;
      setMarks(next);
      const change = opToChange<SyncRecord>(op, next, ids);
      if (change) sync.enqueue(change);
      return next;
    },
    [setMarks, setSkips, sync],
  );

  /** A new user action: applied, queued and put on the undo history. */
  const perform = useCallback(
    (op: ReadOp) => {
      setHistory(push(historyRef.current, op));
      return apply(op);
    },
    [apply, setHistory],
  );

  /** Undo or redo one step: the op applied, or null when there is none (or the read is locked). */
  const travel = (way: 'undo' | 'redo'): ReadOp | null => {
    if (!canEdit) return null;
    const step = (way === 'undo' ? undo : redo)(historyRef.current);
    if (!step) return null;
    setHistory(step.history);
    apply(step.op);
    return step.op;
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

  return { read, marks, marksRef, skips, candidates, history, sync, canEdit, notice, dismissNotice: () => setNotice(null), perform, travel, submit };
}
