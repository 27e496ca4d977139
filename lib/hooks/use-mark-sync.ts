'use client';

import { useCallback, useEffect, useLayoutEffect, useRef, useState } from 'react';
import { backoff, ChangeQueue, syncOnce, type Change, type SendResult, type StorageLike } from '@/lib/scoring/queue';
import type { CandidateSkip, ScoringMark, SyncRecord } from '@/lib/scoring/types';
import { SUBMITTED, type ReadStatus } from '@/lib/reads/kinds';
import { useLatest } from './use-latest';

/*
 * Drives the scoring canvas's change queue: every mark change is queued (and kept in
 * localStorage at once), sent in batches to POST /api/reads/:id/sync, retried with
 * backoff, paused while the browser is offline, and resumed on 'online'. The read is
 * also polled (and re-read on focus) so marks made in another tab appear.
 */

export interface ServerReadState {
  read: { status: ReadStatus; canEdit: boolean };
  marks: ScoringMark[];
  skips: CandidateSkip[];
}

export interface MarkSyncHandlers<S extends ServerReadState> {
  /** Once, after the queue is loaded from storage: rebuild local state from it. */
  onRestore(queue: ChangeQueue<SyncRecord>): void;
  onAcked(acks: { markId: string; version?: number }[]): void;
  onConflicts(conflicts: { markId: string; server: SyncRecord | null }[]): void;
  onRejected(rejected: { markId: string; message: string }[]): void;
  /** A fresh copy of the read from the server (poll, focus, after a rejection). */
  onServerState(state: S): void;
}

export interface MarkSyncStatus {
  online: boolean;
  sending: boolean;
  /** Changes not yet confirmed by the server (in flight included). */
  waiting: number;
  /** Why the last round failed, while changes still wait. */
  lastError: string | null;
  /** Messages of changes the server refused (newest last). */
  rejections: string[];
  /** The read was submitted elsewhere: nothing more can be saved. */
  locked: boolean;
  /** localStorage refused the queue (full or disabled): changes live only in this tab. */
  storageProblem: boolean;
}

export interface MarkSyncOptions {
  enabled: boolean;
  /** Retry sweep while changes wait (ms). */
  sweepMs?: number;
  /** Re-read the server's marks (ms). */
  pollMs?: number;
}

class SyncHttpError extends Error {
  constructor(
    public status: number,
    message: string,
  ) {
    super(message);
  }
}

const BATCH = 100;

function browserStorage(): StorageLike | null {
  try {
    const s = window.localStorage;
    const probe = 'fieldmark:probe';
    s.setItem(probe, '1');
    s.removeItem(probe);
    return s;
  } catch {
    return null;
  }
}

/** Only the contract's fields go on the wire. */
function wireChange(c: Change<SyncRecord>): Omit<Change<unknown>, 'queuedAt'> {
  const out: Omit<Change<unknown>, 'queuedAt'> = { opId: c.opId, markId: c.markId, kind: c.kind, payload: null };
  if (c.entity) out.entity = c.entity;
  const p = c.payload;
  if (p && 'skip' in p) out.payload = { id: p.id, imageId: p.imageId, x: p.x, y: p.y };
  else if (p) {
    const { id, imageId, x, y, classKey, tags } = p;
    out.payload = { id, imageId, x, y, classKey, tags };
  }
  if (c.baseVersion !== undefined) out.baseVersion = c.baseVersion;
  return out;
}

async function errorMessage(res: Response): Promise<string> {
  try {
    const body = (await res.json()) as { error?: { message?: string } };
    if (body?.error?.message) return body.error.message;
  } catch {
    // not JSON
  }
  return `The server answered ${res.status}.`;
}

export function useMarkSync<S extends ServerReadState>(readId: string, options: MarkSyncOptions, handlers: MarkSyncHandlers<S>) {
  const { enabled, sweepMs = 3000, pollMs = 10_000 } = options;
  const handlersRef = useLatest(handlers);

  const queueRef = useRef<ChangeQueue<SyncRecord> | null>(null);
  const persistedRef = useRef(true);
  const runningRef = useRef(false);
  const retryTimer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const kickTimer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const attemptRef = useRef(0);
  const ackGen = useRef(0);
  const lockedRef = useRef(false);
  const enabledRef = useLatest(enabled);
  /** The latest `round`, for the retry timer it sets itself. */
  const roundRef = useRef<() => Promise<void>>(async () => {});

  const [status, setStatus] = useState<MarkSyncStatus>({
    online: true,
    sending: false,
    waiting: 0,
    lastError: null,
    rejections: [],
    locked: false,
    storageProblem: false,
  });

  /** The queue, loaded from storage on first use in the browser. */
  const getQueue = useCallback((): ChangeQueue<SyncRecord> => {
    if (!queueRef.current) {
      const storage = browserStorage();
      persistedRef.current = storage !== null;
      queueRef.current = storage ? ChangeQueue.load<SyncRecord>(storage, readId) : new ChangeQueue<SyncRecord>();
    }
    return queueRef.current;
  }, [readId]);

  const refreshStatus = useCallback((patch: Partial<MarkSyncStatus> = {}) => {
    const q = queueRef.current;
    setStatus((s) => ({
      ...s,
      online: typeof navigator === 'undefined' ? true : navigator.onLine,
      waiting: q ? q.size : 0,
      sending: runningRef.current,
      locked: lockedRef.current,
      storageProblem: !persistedRef.current || Boolean(q?.persistError),
      ...patch,
    }));
  }, []);

  const send = useCallback(
    async (batch: Change<SyncRecord>[]): Promise<SendResult<SyncRecord>> => {
      const res = await fetch(`/api/reads/${encodeURIComponent(readId)}/sync`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ changes: batch.map(wireChange) }),
        cache: 'no-store',
      });
      if (!res.ok) throw new SyncHttpError(res.status, await errorMessage(res));
      return (await res.json()) as SendResult<SyncRecord>;
    },
    [readId],
  );

  const refresh = useCallback(async () => {
    if (runningRef.current) return;
    const gen = ackGen.current;
    try {
      const res = await fetch(`/api/reads/${encodeURIComponent(readId)}`, { cache: 'no-store', headers: { accept: 'application/json' } });
      if (!res.ok) return;
      const body = (await res.json()) as S;
      // An ack landed while we were asking: this copy may predate it, so wait for the next one.
      if (gen !== ackGen.current || runningRef.current) return;
      if (body.read.status === SUBMITTED) lockedRef.current = true;
      handlersRef.current.onServerState(body);
      refreshStatus();
    } catch {
      // offline or server away: the next poll tries again
    }
  }, [readId, refreshStatus, handlersRef]);

  const round = useCallback(async (): Promise<void> => {
    if (runningRef.current || lockedRef.current || !enabledRef.current) return;
    const q = getQueue();
    if (q.pending().length === 0 || (typeof navigator !== 'undefined' && !navigator.onLine)) {
      refreshStatus();
      return;
    }
    runningRef.current = true;
    refreshStatus({ sending: true });
    const outcome = await syncOnce(q, send, BATCH);
    runningRef.current = false;
    if (outcome.acked.length) {
      ackGen.current++;
      handlersRef.current.onAcked(outcome.acked);
    }
    if (outcome.conflicts.length) {
      ackGen.current++;
      handlersRef.current.onConflicts(outcome.conflicts);
    }
    let rejections: string[] | undefined;
    if (outcome.rejected.length) {
      ackGen.current++;
      handlersRef.current.onRejected(outcome.rejected);
      rejections = outcome.rejected.map((r) => r.message);
    }
    if (outcome.failed.length) {
      const err = outcome.error;
      if (err instanceof SyncHttpError && err.status === 409) {
        // The read was submitted (another tab or person): stop sending, show why.
        lockedRef.current = true;
        refreshStatus({ lastError: err.message });
        void refresh();
        return;
      }
      const message =
        err instanceof SyncHttpError
          ? err.status === 401
            ? 'You are signed out. Sign in again in another tab; your changes are kept in this browser.'
            : err.message
          : 'The server could not be reached.';
      const wait = backoff(attemptRef.current);
      attemptRef.current++;
      if (retryTimer.current) clearTimeout(retryTimer.current);
      retryTimer.current = setTimeout(() => {
        retryTimer.current = null;
        void roundRef.current();
      }, wait);
      setStatus((s) => ({ ...s, rejections: rejections ? [...s.rejections, ...rejections].slice(-5) : s.rejections }));
      refreshStatus({ lastError: message });
      return;
    }
    attemptRef.current = 0;
    setStatus((s) => ({ ...s, rejections: rejections ? [...s.rejections, ...rejections].slice(-5) : s.rejections }));
    refreshStatus({ lastError: null });
    if (rejections) void refresh();
    if (q.pending().length > 0) void roundRef.current();
  }, [getQueue, send, refresh, refreshStatus, enabledRef, handlersRef]);
  useLayoutEffect(() => {
    roundRef.current = round;
  }, [round]);

  /** Queue a change and send it soon (changes made within the same moment share a request). */
  const enqueue = useCallback(
    (change: Change<SyncRecord>) => {
      getQueue().enqueue(change);
      refreshStatus();
      if (!kickTimer.current && !retryTimer.current) {
        kickTimer.current = setTimeout(() => {
          kickTimer.current = null;
          void round();
        }, 40);
      }
    },
    [getQueue, refreshStatus, round],
  );

  /** Send everything now; resolves true when nothing waits (used before submitting). */
  const flush = useCallback(
    async (timeoutMs = 15_000): Promise<boolean> => {
      const until = Date.now() + timeoutMs;
      attemptRef.current = 0;
      while (Date.now() < until) {
        const q = getQueue();
        if (q.size === 0) return true;
        if (lockedRef.current || !navigator.onLine) return false;
        if (!runningRef.current) await round();
        else await new Promise((r) => setTimeout(r, 100));
        if (getQueue().size > 0) await new Promise((r) => setTimeout(r, 200));
      }
      return getQueue().size === 0;
    },
    [getQueue, round],
  );

  // Load the queue and let the workbench restore unsent changes (also those made offline before a reload).
  useEffect(() => {
    const q = getQueue();
    handlersRef.current.onRestore(q);
    refreshStatus();
    if (q.size > 0) void round();
  }, [getQueue, refreshStatus, round, handlersRef]);

  useEffect(() => {
    if (!enabled) return;
    const onOnline = () => {
      attemptRef.current = 0;
      if (retryTimer.current) {
        clearTimeout(retryTimer.current);
        retryTimer.current = null;
      }
      refreshStatus();
      void round().then(() => refresh());
    };
    const onOffline = () => refreshStatus();
    const onFocus = () => void refresh();
    const onVisible = () => {
      if (document.visibilityState === 'visible') void refresh();
    };
    window.addEventListener('online', onOnline);
    window.addEventListener('offline', onOffline);
    window.addEventListener('focus', onFocus);
    document.addEventListener('visibilitychange', onVisible);
    const sweep = setInterval(() => {
      if (!runningRef.current && !retryTimer.current && (queueRef.current?.pending().length ?? 0) > 0) void round();
    }, sweepMs);
    const poll = setInterval(() => {
      if (document.visibilityState === 'visible' && navigator.onLine) void refresh();
    }, pollMs);
    return () => {
      window.removeEventListener('online', onOnline);
      window.removeEventListener('offline', onOffline);
      window.removeEventListener('focus', onFocus);
      document.removeEventListener('visibilitychange', onVisible);
      clearInterval(sweep);
      clearInterval(poll);
    };
  }, [enabled, sweepMs, pollMs, round, refresh, refreshStatus]);

  useEffect(
    () => () => {
      if (retryTimer.current) clearTimeout(retryTimer.current);
      if (kickTimer.current) clearTimeout(kickTimer.current);
    },
    [],
  );

  return { status, enqueue, flush, refresh, getQueue };
}

/** The words the panel shows for a sync status. */
export function syncStatusText(s: MarkSyncStatus): string {
  const n = s.waiting;
  const changes = `${n} change${n === 1 ? '' : 's'}`;
  if (s.locked) return n > 0 ? `This read is submitted and locked: ${changes} could not be saved.` : 'All changes saved';
  if (!s.online) {
    return n > 0
      ? `Offline — ${changes} waiting; keep working, they will be sent when the connection is back`
      : 'Offline — everything so far is saved; keep working, new changes will be sent when the connection is back';
  }
  if (n === 0) return 'All changes saved';
  if (s.lastError) return `${changes} not saved yet: ${s.lastError} Retrying…`;
  return `Saving ${changes}…`;
}
