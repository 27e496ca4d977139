'use client';

import { useCallback, useEffect, useLayoutEffect, useRef, useState } from 'react';
import { backoff, ChangeQueue, syncOnce, type Change, type SendResult, type StorageLike } from '@/lib/scoring/queue';
import type { SettleDecisionKind, SettleProgress } from '@/lib/settling/settle';
import { useLatest } from './use-latest';

/*
 * Saves the settle view's decisions with the scoring canvas's no-loss queue (lib/scoring/queue.ts):
 * one queue entry per disagreement key (a change of mind before it is sent replaces the unsent
 * one), kept in localStorage under fieldmark:queue:settle-<collectionId> at once, sent in batches
 * to POST /api/collections/:id/settle, retried with backoff, resumed on 'online'. Each decision
 * carries a client-made op id, so a resend is answered, not applied twice.
 */

export interface DecisionPayload {
  decision: SettleDecisionKind;
  classKey: string | null;
}

export interface DecisionSyncStatus {
  waiting: number;
  lastError: string | null;
  rejections: string[];
  /** The server refuses further decisions (settled, or a read reopened): nothing more is sent. */
  locked: boolean;
  storageProblem: boolean;
}

type Answer = SendResult<never> & { progress: SettleProgress; settledReadId: number | null };

class HttpError extends Error {
  constructor(
    public status: number,
    message: string,
  ) {
    super(message);
  }
}

function browserStorage(): StorageLike | null {
  try {
    const s = window.localStorage;
    s.setItem('fieldmark:probe', '1');
    s.removeItem('fieldmark:probe');
    return s;
  } catch {
    return null;
  }
}

export function useDecisionSync(collectionId: number, handlers: { onRestore(pending: Change<DecisionPayload>[]): void; onAnswer(a: Answer): void; onRejected(keys: string[]): void }) {
  const handlersRef = useLatest(handlers);
  const queueRef = useRef<ChangeQueue<DecisionPayload> | null>(null);
  const running = useRef(false);
  const locked = useRef(false);
  const attempt = useRef(0);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const persisted = useRef(true);
  /** The latest `round`, for the timers and the retry that call it again. */
  const roundRef = useRef<() => Promise<void>>(async () => {});
  const [status, setStatus] = useState<DecisionSyncStatus>({ waiting: 0, lastError: null, rejections: [], locked: false, storageProblem: false });

  const queue = useCallback(() => {
    if (!queueRef.current) {
      const storage = browserStorage();
      persisted.current = storage !== null;
      queueRef.current = storage ? ChangeQueue.load<DecisionPayload>(storage, `settle-${collectionId}`) : new ChangeQueue<DecisionPayload>();
    }
    return queueRef.current;
  }, [collectionId]);

  const update = useCallback(
    (patch: Partial<DecisionSyncStatus> = {}) =>
      setStatus((s) => ({ ...s, waiting: queue().size, locked: locked.current, storageProblem: !persisted.current || Boolean(queue().persistError), ...patch })),
    [queue],
  );

  const send = useCallback(
    async (batch: Change<DecisionPayload>[]): Promise<Answer> => {
      const res = await fetch(`/api/collections/${collectionId}/settle`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        cache: 'no-store',
        body: JSON.stringify({ decisions: batch.map((c) => ({ opId: c.opId, key: c.markId, decision: c.payload!.decision, classKey: c.payload!.classKey })) }),
      });
      const body = (await res.json().catch(() => null)) as (Answer & { error?: { message?: string } }) | null;
      if (!res.ok) throw new HttpError(res.status, body?.error?.message ?? `The server answered ${res.status}.`);
      handlersRef.current.onAnswer(body!);
      return body!;
    },
    [collectionId, handlersRef],
  );

  const round = useCallback(async (): Promise<void> => {
    const q = queue();
    if (running.current || locked.current || q.pending().length === 0 || !navigator.onLine) return update();
    running.current = true;
    const outcome = await syncOnce(q, send, 100);
    running.current = false;
    const rejections = outcome.rejected.map((r) => r.message);
    if (outcome.rejected.length) handlersRef.current.onRejected(outcome.rejected.map((r) => r.markId));
    if (outcome.failed.length) {
      const err = outcome.error;
      if (err instanceof HttpError && (err.status === 409 || err.status === 403)) {
        locked.current = true;
        return update({ lastError: err.message });
      }
      const message = err instanceof HttpError ? (err.status === 401 ? 'You are signed out. Sign in again in another tab; your decisions are kept in this browser.' : err.message) : 'The server could not be reached.';
      const wait = backoff(attempt.current++);
      if (timer.current) clearTimeout(timer.current);
      timer.current = setTimeout(() => {
        timer.current = null;
        void roundRef.current();
      }, wait);
      return update({ lastError: message });
    }
    attempt.current = 0;
    setStatus((s) => ({ ...s, rejections: rejections.length ? [...s.rejections, ...rejections].slice(-5) : s.rejections }));
    update({ lastError: null });
    if (q.pending().length > 0) void roundRef.current();
  }, [queue, send, update, handlersRef]);
  useLayoutEffect(() => {
    roundRef.current = round;
  }, [round]);

  const enqueue = useCallback(
    (key: string, payload: DecisionPayload) => {
      queue().enqueue({ opId: crypto.randomUUID(), markId: key, kind: 'upsert', payload, queuedAt: Date.now() });
      update();
      if (!timer.current) void round();
    },
    [queue, update, round],
  );

  useEffect(() => {
    const q = queue();
    handlersRef.current.onRestore(q.all());
    update();
    if (q.size) void round();
    const online = () => {
      attempt.current = 0;
      void round();
    };
    window.addEventListener('online', online);
    const sweep = setInterval(() => {
      if (!running.current && !timer.current && queue().pending().length > 0) void round();
    }, 3000);
    return () => {
      window.removeEventListener('online', online);
      clearInterval(sweep);
      if (timer.current) clearTimeout(timer.current);
    };
  }, [queue, update, round, handlersRef]);

  return { status, enqueue };
}

/** The words the view shows for the save status. */
export function decisionStatusText(s: DecisionSyncStatus): string {
  const n = s.waiting;
  const what = `${n} decision${n === 1 ? '' : 's'}`;
  if (s.locked) return s.lastError ?? 'Settling is closed.';
  if (n === 0) return 'All decisions saved';
  if (s.lastError) return `${what} not saved yet: ${s.lastError} Retrying…`;
  return `Saving ${what}…`;
}
