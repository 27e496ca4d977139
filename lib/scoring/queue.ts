import { z } from 'zod';
import type { MarkOp } from './history';
import type { SendResult } from './sync-contract';
import type { HasId, ScoringMark } from './types';

export type { SendResult } from './sync-contract';

/*
 * The outbound change queue of the scoring canvas.
 *
 * How the canvas drives it (see syncOnce):
 *   - every mark op becomes a Change (opToChange) and is enqueued; the queue
 *     persists itself to localStorage under fieldmark:queue:<readId> at once;
 *   - while online and not already sending: syncOnce(queue, send) takes a batch,
 *     marks it in flight, POSTs it, then acks, fails or drops each change;
 *   - after a failed round wait backoff(attempt) (attempt = consecutive failed
 *     rounds, reset on success) and try again; the 'online' event retries at once;
 *   - on reload ChangeQueue.load() puts in-flight changes back to pending. Resending
 *     is safe: the server stores marks by their client-made id and remembers the
 *     last applied opId per mark, so a repeat of an applied op is answered, not re-applied.
 *
 * Server contract assumed here: upsert = create-or-update-or-restore by mark id;
 * with baseVersion it answers 409 (and its current copy, or null if deleted) when
 * the mark's version differs; without baseVersion it writes unconditionally. A
 * delete of a missing id succeeds. Each stored change returns the mark's new version.
 */

export type ChangeKind = 'upsert' | 'delete';

export interface Change<P = ScoringMark> {
  /** UUID v4 of this change: the server's idempotency key. */
  opId: string;
  markId: string;
  kind: ChangeKind;
  /** The full mark for an upsert; null for a delete. */
  payload: P | null;
  /** Server version the change was made against; absent for a create or restore. */
  baseVersion?: number;
  /** ms since the epoch. */
  queuedAt: number;
  /** Set for a skipped candidate of the cell walk (then `markId` is the skip's id); absent for a mark. */
  entity?: 'skip';
}

export interface QueueEntry<P = ScoringMark> extends Change<P> {
  state: 'pending' | 'inFlight';
  /** How many times it was put in flight. */
  attempts: number;
}

/** The subset of the Web Storage API the queue needs, so tests can pass a Map-backed fake. */
export interface StorageLike {
  getItem(key: string): string | null;
  setItem(key: string, value: string): void;
  removeItem(key: string): void;
}

export type EnqueueResult = 'queued' | 'merged' | 'cancelled';

export function queueStorageKey(readId: string): string {
  return `fieldmark:queue:${readId}`;
}

const FORMAT_VERSION = 1;

const entrySchema = z.object({
  opId: z.string().min(1),
  markId: z.string().min(1),
  kind: z.enum(['upsert', 'delete']),
  payload: z.unknown(),
  baseVersion: z.number().int().optional(),
  queuedAt: z.number(),
  entity: z.literal('skip').optional(),
  state: z.enum(['pending', 'inFlight']),
  attempts: z.number().int().min(0),
});
const storedSchema = z.object({
  format: z.literal(FORMAT_VERSION),
  entries: z.array(entrySchema),
  everSent: z.array(z.string()),
});

export interface ChangeQueueOptions {
  storage?: StorageLike;
  readId?: string;
}

export class ChangeQueue<P = ScoringMark> {
  private entries: QueueEntry<P>[] = [];
  /** Marks the server may know: once a change went out, a later delete must go out too. */
  private everSent = new Set<string>();
  private readonly storage?: StorageLike;
  private readonly key?: string;
  /** Set when the last write to storage threw (quota, private mode): the UI should warn. */
  persistError: unknown = null;

  constructor(options: ChangeQueueOptions = {}) {
    if (options.storage && !options.readId) throw new Error('A persisted queue needs a readId');
    this.storage = options.storage;
    this.key = options.readId ? queueStorageKey(options.readId) : undefined;
  }

  get size(): number {
    return this.entries.length;
  }

  /**
   * Add a change, folding it into the mark's last unsent change when there is one.
   * A delete of a mark whose create never left the browser cancels both.
   */
  enqueue(change: Change<P>): EnqueueResult {
    const last = this.lastEntryFor(change.markId);
    // Only a change never put in flight may be rewritten: an attempted one may already
    // be stored under its opId, and the server would ignore a resend carrying new content.
    if (last && last.state === 'pending' && last.attempts === 0) {
      if (
        change.kind === 'delete' &&
        last.kind === 'upsert' &&
        last.baseVersion === undefined &&
        !this.everSent.has(change.markId)
      ) {
        this.entries = this.entries.filter((e) => e !== last);
        this.persist();
        return 'cancelled';
      }
      const merged: QueueEntry<P> = {
        ...last,
        kind: change.kind,
        payload: change.payload,
        baseVersion: last.baseVersion ?? change.baseVersion,
      };
      this.entries = this.entries.map((e) => (e === last ? merged : e));
      this.persist();
      return 'merged';
    }
    this.entries = [...this.entries, { ...change, state: 'pending', attempts: 0 }];
    this.persist();
    return 'queued';
  }

  /**
   * Up to `max` pending changes in queue order, at most one per mark and only the
   * mark's oldest, so a mark's changes reach the server in the order they were made.
   */
  peekBatch(max: number): QueueEntry<P>[] {
    const seen = new Set<string>();
    const out: QueueEntry<P>[] = [];
    for (const e of this.entries) {
      if (out.length >= max) break;
      const first = !seen.has(e.markId);
      seen.add(e.markId);
      if (first && e.state === 'pending') out.push({ ...e });
    }
    return out;
  }

  markInFlight(opIds: readonly string[]): void {
    const ids = new Set(opIds);
    this.entries = this.entries.map((e) => {
      if (!ids.has(e.opId) || e.state !== 'pending') return e;
      this.everSent.add(e.markId);
      return { ...e, state: 'inFlight', attempts: e.attempts + 1 };
    });
    this.persist();
  }

  /**
   * Remove stored changes. `versions` (mark id → new server version) rebases the
   * mark's later queued changes onto the version the server now has.
   */
  ack(opIds: readonly string[], versions?: Readonly<Record<string, number>>): void {
    const ids = new Set(opIds);
    this.entries = this.entries
      .filter((e) => !ids.has(e.opId))
      .map((e) => {
        const v = versions?.[e.markId];
        return v === undefined ? e : { ...e, baseVersion: v };
      });
    this.persist();
  }

  /** Return in-flight changes to pending, in their original place. */
  fail(opIds: readonly string[]): void {
    const ids = new Set(opIds);
    this.entries = this.entries.map((e) => (ids.has(e.opId) && e.state === 'inFlight' ? { ...e, state: 'pending' } : e));
    this.persist();
  }

  /** Forget every queued change of a mark (after a 409 the server's copy wins). */
  dropMark(markId: string): void {
    this.entries = this.entries.filter((e) => e.markId !== markId);
    this.persist();
  }

  pending(): QueueEntry<P>[] {
    return this.entries.filter((e) => e.state === 'pending').map((e) => ({ ...e }));
  }

  inFlight(): QueueEntry<P>[] {
    return this.entries.filter((e) => e.state === 'inFlight').map((e) => ({ ...e }));
  }

  all(): QueueEntry<P>[] {
    return this.entries.map((e) => ({ ...e }));
  }

  /** Ids of marks with any unconfirmed change (for mergeServerMarks). */
  pendingMarkIds(): Set<string> {
    return new Set(this.entries.map((e) => e.markId));
  }

  serialize(): string {
    return JSON.stringify({ format: FORMAT_VERSION, entries: this.entries, everSent: [...this.everSent] });
  }

  /**
   * Rebuild a queue. In-flight changes go back to pending: a reload mid-request
   * cannot know whether the server stored them, and resending is idempotent.
   * Throws on text that is not a queue.
   */
  static deserialize<P = ScoringMark>(text: string, options: ChangeQueueOptions = {}): ChangeQueue<P> {
    const parsed = storedSchema.parse(JSON.parse(text));
    const q = new ChangeQueue<P>(options);
    q.entries = parsed.entries.map((e) => ({ ...(e as QueueEntry<P>), state: 'pending' as const }));
    q.everSent = new Set(parsed.everSent);
    for (const e of q.entries) if (e.attempts > 0) q.everSent.add(e.markId);
    return q;
  }

  /**
   * The read's queue from storage (empty if none). Unreadable data is moved aside to
   * <key>:corrupt rather than overwritten, so nothing is destroyed silently.
   */
  static load<P = ScoringMark>(storage: StorageLike, readId: string): ChangeQueue<P> {
    const key = queueStorageKey(readId);
    const text = storage.getItem(key);
    if (text === null) return new ChangeQueue<P>({ storage, readId });
    try {
      const q = ChangeQueue.deserialize<P>(text, { storage, readId });
      q.persist();
      return q;
    } catch {
      try {
        storage.setItem(`${key}:corrupt`, text);
        storage.removeItem(key);
      } catch {
        // storage unusable: the fresh queue below still works in memory
      }
      return new ChangeQueue<P>({ storage, readId });
    }
  }

  private lastEntryFor(markId: string): QueueEntry<P> | undefined {
    for (let i = this.entries.length - 1; i >= 0; i--) {
      const e = this.entries[i];
      if (e && e.markId === markId) return e;
    }
    return undefined;
  }

  private persist(): void {
    if (!this.storage || !this.key) return;
    try {
      if (this.entries.length === 0) this.storage.removeItem(this.key);
      else this.storage.setItem(this.key, this.serialize());
      this.persistError = null;
    } catch (err) {
      this.persistError = err;
    }
  }
}

/**
 * Turn a history op into a queue change. Updates and deletes carry the mark's
 * version so another tab's edit is refused (409); creates, which include undoing a
 * delete, carry none: a restore by id writes unconditionally. Returns null for an
 * update of a mark no longer present (another tab deleted it).
 */
export function opToChange<M extends HasId & { version?: number }>(
  op: MarkOp<M>,
  marksAfter: ReadonlyMap<string, M>,
  ids: { opId: string; now: number },
): Change<M> | null {
  switch (op.type) {
    case 'create':
      return { opId: ids.opId, markId: op.mark.id, kind: 'upsert', payload: op.mark, queuedAt: ids.now };
    case 'update': {
      const mark = marksAfter.get(op.id);
      if (!mark) return null;
      return withBase({ opId: ids.opId, markId: op.id, kind: 'upsert', payload: mark, queuedAt: ids.now }, mark.version);
    }
    case 'delete':
      return withBase<M>({ opId: ids.opId, markId: op.mark.id, kind: 'delete', payload: null, queuedAt: ids.now }, op.mark.version);
  }
}

function withBase<P>(c: Change<P>, baseVersion: number | undefined): Change<P> {
  return baseVersion === undefined ? c : { ...c, baseVersion };
}

export interface BackoffOptions {
  baseMs?: number;
  capMs?: number;
  /** Returns [0, 1); injected so tests are deterministic. */
  random?: () => number;
}

/**
 * Delay before retry number `attempt` (0 = first retry): exponential, capped, with
 * "equal jitter" (half fixed, half random) so many tabs coming back online at once
 * do not retry in step, yet no retry is immediate.
 */
export function backoff(attempt: number, { baseMs = 1000, capMs = 30_000, random = Math.random }: BackoffOptions = {}): number {
  const n = Math.max(0, Math.floor(attempt));
  const ceiling = Math.min(capMs, baseMs * Math.pow(2, Math.min(n, 30)));
  return ceiling / 2 + random() * (ceiling / 2);
}

export interface SyncOutcome<P = ScoringMark> {
  sent: number;
  acked: SendResult<P>['acked'];
  conflicts: NonNullable<SendResult<P>['conflicts']>;
  rejected: NonNullable<SendResult<P>['rejected']>;
  /** opIds returned to the queue; non-empty means: wait backoff(attempt), then retry. */
  failed: string[];
  error?: unknown;
}

/** One round: take a batch, send it, settle each change. Never throws for a failed send. */
export async function syncOnce<P>(
  queue: ChangeQueue<P>,
  send: (batch: Change<P>[]) => Promise<SendResult<P>>,
  max = 50,
): Promise<SyncOutcome<P>> {
  const batch = queue.peekBatch(max);
  const outcome: SyncOutcome<P> = { sent: batch.length, acked: [], conflicts: [], rejected: [], failed: [] };
  if (batch.length === 0) return outcome;
  const opIds = batch.map((e) => e.opId);
  queue.markInFlight(opIds);
  let result: SendResult<P>;
  try {
    result = await send(batch.map(({ state: _s, attempts: _a, ...change }) => change));
  } catch (error) {
    queue.fail(opIds);
    return { ...outcome, failed: opIds, error };
  }
  const inBatch = new Set(opIds);
  const settled = new Set<string>();
  const acked = result.acked.filter((a) => inBatch.has(a.opId));
  const versions: Record<string, number> = {};
  for (const a of acked) {
    settled.add(a.opId);
    if (a.version !== undefined) versions[a.markId] = a.version;
  }
  queue.ack(
    acked.map((a) => a.opId),
    versions,
  );
  for (const c of result.conflicts ?? []) {
    if (!inBatch.has(c.opId)) continue;
    settled.add(c.opId);
    queue.dropMark(c.markId);
    outcome.conflicts.push(c);
  }
  for (const r of result.rejected ?? []) {
    if (!inBatch.has(r.opId)) continue;
    settled.add(r.opId);
    queue.ack([r.opId]);
    outcome.rejected.push(r);
  }
  const failed = opIds.filter((id) => !settled.has(id));
  queue.fail(failed);
  return { ...outcome, acked, failed };
}

/**
 * The list the canvas should show after fetching the server's marks: the server's
 * copy of every mark, except marks with unconfirmed local changes, where the local
 * state wins (a pending create stays, a pending delete stays deleted). Marks another
 * tab added appear; marks another tab deleted disappear unless we changed them.
 */
export function mergeServerMarks<M extends HasId>(
  local: readonly M[],
  server: readonly M[],
  pendingIds: ReadonlySet<string>,
): M[] {
  const localById = new Map(local.map((m) => [m.id, m]));
  const out: M[] = [];
  const placed = new Set<string>();
  for (const s of server) {
    if (pendingIds.has(s.id)) {
      const mine = localById.get(s.id);
      if (mine) out.push(mine);
    } else out.push(s);
    placed.add(s.id);
  }
  for (const m of local) {
    if (!placed.has(m.id) && pendingIds.has(m.id)) out.push(m);
  }
  return out;
}
