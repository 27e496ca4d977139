import { describe, expect, it } from 'vitest';
import {
  backoff,
  ChangeQueue,
  mergeServerMarks,
  opToChange,
  queueStorageKey,
  syncOnce,
  type Change,
  type SendResult,
  type StorageLike,
} from '@/lib/scoring/queue';
import type { ScoringMark } from '@/lib/scoring/types';

class MemoryStorage implements StorageLike {
  data = new Map<string, string>();
  writes = 0;
  getItem(key: string) {
    return this.data.get(key) ?? null;
  }
  setItem(key: string, value: string) {
    this.writes++;
    this.data.set(key, value);
  }
  removeItem(key: string) {
    this.data.delete(key);
  }
}

const READ = 'read-42';
let seq = 0;
const opId = () => `op-${++seq}`;

function mark(id: string, over: Partial<ScoringMark> = {}): ScoringMark {
  return { id, imageId: 'img1', x: 1, y: 2, classKey: 'normal', tags: [], ...over };
}

function upsert(markId: string, over: Partial<ScoringMark> = {}, baseVersion?: number): Change {
  const c: Change = { opId: opId(), markId, kind: 'upsert', payload: mark(markId, over), queuedAt: 1000 + seq };
  return baseVersion === undefined ? c : { ...c, baseVersion };
}

function del(markId: string, baseVersion?: number): Change {
  const c: Change = { opId: opId(), markId, kind: 'delete', payload: null, queuedAt: 1000 + seq };
  return baseVersion === undefined ? c : { ...c, baseVersion };
}

describe('ChangeQueue coalescing', () => {
  it('merges several upserts of an unsent mark into one, keeping the latest payload and first place', () => {
    const q = new ChangeQueue();
    const first = upsert('m1', { x: 1 });
    expect(q.enqueue(first)).toBe('queued');
    q.enqueue(upsert('m2'));
    expect(q.enqueue(upsert('m1', { x: 5 }))).toBe('merged');
    expect(q.enqueue(upsert('m1', { x: 9, classKey: 'acrosome_defect' }))).toBe('merged');
    expect(q.size).toBe(2);
    const [a, b] = q.pending();
    expect(a!.markId).toBe('m1');
    expect(a!.opId).toBe(first.opId);
    expect(a!.payload).toMatchObject({ x: 9, classKey: 'acrosome_defect' });
    expect(b!.markId).toBe('m2');
  });

  it('keeps the first baseVersion when merging (the server still has it)', () => {
    const q = new ChangeQueue();
    q.enqueue(upsert('m1', { x: 1 }, 3));
    q.enqueue(upsert('m1', { x: 2 }, 3));
    q.enqueue(del('m1', 3));
    expect(q.pending()).toMatchObject([{ markId: 'm1', kind: 'delete', baseVersion: 3, payload: null }]);
  });

  it('cancels a create that never left the browser when the mark is deleted', () => {
    const q = new ChangeQueue();
    q.enqueue(upsert('m1'));
    q.enqueue(upsert('m1', { x: 3 }));
    expect(q.enqueue(del('m1'))).toBe('cancelled');
    expect(q.size).toBe(0);
  });

  it('sends the delete when the create is in flight', () => {
    const q = new ChangeQueue();
    const create = upsert('m1');
    q.enqueue(create);
    q.markInFlight([create.opId]);
    expect(q.enqueue(del('m1'))).toBe('queued');
    expect(q.all().map((e) => [e.kind, e.state])).toEqual([
      ['upsert', 'inFlight'],
      ['delete', 'pending'],
    ]);
  });

  it('sends the delete when the create was already sent and acknowledged', () => {
    const q = new ChangeQueue();
    const create = upsert('m1');
    q.enqueue(create);
    q.markInFlight([create.opId]);
    q.ack([create.opId]);
    q.enqueue(upsert('m1', { x: 4 }));
    expect(q.enqueue(del('m1'))).toBe('merged');
    expect(q.pending()).toMatchObject([{ markId: 'm1', kind: 'delete' }]);
  });

  it('sends the delete when a failed attempt of the create may have reached the server', () => {
    const q = new ChangeQueue();
    const create = upsert('m1');
    q.enqueue(create);
    q.markInFlight([create.opId]);
    q.fail([create.opId]);
    expect(q.enqueue(del('m1'))).toBe('queued');
    expect(q.pending().map((e) => e.kind)).toEqual(['upsert', 'delete']);
  });

  it('does not cancel a delete of a mark the server already has (baseVersion set)', () => {
    const q = new ChangeQueue();
    q.enqueue(upsert('m1', { x: 3 }, 2));
    expect(q.enqueue(del('m1', 2))).toBe('merged');
    expect(q.size).toBe(1);
  });

  it('turns a delete followed by a restore into one upsert', () => {
    const q = new ChangeQueue();
    q.enqueue(del('m1', 5));
    q.enqueue(upsert('m1', { x: 8 }));
    expect(q.pending()).toMatchObject([{ kind: 'upsert', baseVersion: 5, payload: { x: 8 } }]);
  });
});

describe('ChangeQueue ordering and flight', () => {
  it('peeks in order, at most max, one change per mark (its oldest)', () => {
    const q = new ChangeQueue();
    const a = upsert('a');
    q.enqueue(a);
    q.markInFlight([a.opId]);
    q.enqueue(upsert('a', { x: 2 })); // waits for the in-flight one
    q.enqueue(upsert('b'));
    q.enqueue(upsert('c'));
    q.enqueue(upsert('d'));
    expect(q.peekBatch(10).map((e) => e.markId)).toEqual(['b', 'c', 'd']);
    expect(q.peekBatch(2).map((e) => e.markId)).toEqual(['b', 'c']);
  });

  it('returns failed changes to their original place', () => {
    const q = new ChangeQueue();
    const changes = ['a', 'b', 'c'].map((id) => upsert(id));
    changes.forEach((c) => q.enqueue(c));
    q.markInFlight([changes[0]!.opId, changes[1]!.opId]);
    expect(q.pending().map((e) => e.markId)).toEqual(['c']);
    q.fail([changes[0]!.opId, changes[1]!.opId]);
    expect(q.pending().map((e) => e.markId)).toEqual(['a', 'b', 'c']);
    expect(q.pending().map((e) => e.attempts)).toEqual([1, 1, 0]);
  });

  it('acks remove changes and rebase the mark’s later changes on the new version', () => {
    const q = new ChangeQueue();
    const create = upsert('m1');
    q.enqueue(create);
    q.markInFlight([create.opId]);
    q.enqueue(upsert('m1', { x: 7 }));
    expect(q.peekBatch(5)).toEqual([]);
    q.ack([create.opId], { m1: 1 });
    expect(q.peekBatch(5)).toMatchObject([{ markId: 'm1', baseVersion: 1, payload: { x: 7 } }]);
  });

  it('lists the ids of marks with unconfirmed changes', () => {
    const q = new ChangeQueue();
    const a = upsert('a');
    q.enqueue(a);
    q.enqueue(del('b', 1));
    q.markInFlight([a.opId]);
    expect([...q.pendingMarkIds()].sort()).toEqual(['a', 'b']);
    expect(q.inFlight().map((e) => e.markId)).toEqual(['a']);
  });
});

describe('ChangeQueue persistence', () => {
  it('writes to storage on every change under fieldmark:queue:<readId> and removes the key when empty', () => {
    const storage = new MemoryStorage();
    const q = new ChangeQueue({ storage, readId: READ });
    expect(queueStorageKey(READ)).toBe('fieldmark:queue:read-42');
    const c = upsert('m1');
    q.enqueue(c);
    expect(storage.getItem('fieldmark:queue:read-42')).toContain('"m1"');
    const writes = storage.writes;
    q.markInFlight([c.opId]);
    expect(storage.writes).toBe(writes + 1);
    q.ack([c.opId]);
    expect(storage.getItem('fieldmark:queue:read-42')).toBeNull();
  });

  it('round-trips through serialize/deserialize', () => {
    const q = new ChangeQueue();
    q.enqueue(upsert('a', { x: 3 }, 2));
    q.enqueue(del('b', 4));
    const back = ChangeQueue.deserialize(q.serialize());
    expect(back.all()).toEqual(q.all());
  });

  it('puts in-flight changes back to pending after a reload, in order', () => {
    const storage = new MemoryStorage();
    const q = ChangeQueue.load(storage, READ);
    const a = upsert('a');
    const b = upsert('b');
    q.enqueue(a);
    q.enqueue(b);
    q.markInFlight([a.opId]);
    // page reload: a new queue from the same storage
    const r = ChangeQueue.load(storage, READ);
    expect(r.all().map((e) => [e.markId, e.state, e.attempts])).toEqual([
      ['a', 'pending', 1],
      ['b', 'pending', 0],
    ]);
    expect(r.peekBatch(10).map((e) => e.opId)).toEqual([a.opId, b.opId]);
    // the reloaded create had been sent: a delete must now go out too
    expect(r.enqueue(del('a'))).toBe('queued');
    expect(r.size).toBe(3);
  });

  it('keeps separate queues per read', () => {
    const storage = new MemoryStorage();
    ChangeQueue.load(storage, 'r1').enqueue(upsert('x'));
    expect(ChangeQueue.load(storage, 'r2').size).toBe(0);
    expect(ChangeQueue.load(storage, 'r1').size).toBe(1);
  });

  it('moves unreadable data aside and starts empty', () => {
    const storage = new MemoryStorage();
    storage.setItem(queueStorageKey(READ), '{not json');
    const q = ChangeQueue.load(storage, READ);
    expect(q.size).toBe(0);
    expect(storage.getItem(`${queueStorageKey(READ)}:corrupt`)).toBe('{not json');
    expect(() => ChangeQueue.deserialize('{"format":99,"entries":[],"everSent":[]}')).toThrow();
  });

  it('keeps working in memory when storage refuses writes', () => {
    const storage = new MemoryStorage();
    storage.setItem = () => {
      throw new Error('QuotaExceededError');
    };
    const q = new ChangeQueue({ storage, readId: READ });
    q.enqueue(upsert('a'));
    expect(q.size).toBe(1);
    expect(q.persistError).toBeInstanceOf(Error);
  });
});

describe('backoff', () => {
  it('doubles from 1 s to a 30 s cap with equal jitter (computed: ceiling = min(30000, 1000 × 2^n), delay in [ceiling/2, ceiling))', () => {
    expect(backoff(0, { random: () => 0 })).toBe(500);
    expect(backoff(0, { random: () => 0.999999 })).toBeCloseTo(1000, 0);
    expect(backoff(3, { random: () => 0 })).toBe(4000);
    expect(backoff(3, { random: () => 0.5 })).toBe(6000);
    expect(backoff(10, { random: () => 0 })).toBe(15000);
    expect(backoff(1000, { random: () => 0.999999 })).toBeLessThan(30000);
    expect(backoff(2, { baseMs: 200, capMs: 500, random: () => 1 })).toBe(500);
  });
});

describe('opToChange', () => {
  const A = mark('A', { version: 4 });
  it('maps create to an unconditional upsert, update and delete to versioned ones', () => {
    const ids = { opId: 'o1', now: 5 };
    expect(opToChange({ type: 'create', mark: mark('N') }, new Map(), ids)).toEqual({
      opId: 'o1', markId: 'N', kind: 'upsert', payload: mark('N'), queuedAt: 5,
    });
    const restored = opToChange({ type: 'create', mark: A }, new Map(), ids)!;
    expect(restored.baseVersion).toBeUndefined();
    const after = new Map([[A.id, { ...A, x: 9 }]]);
    expect(opToChange({ type: 'update', id: A.id, before: { x: 1 }, after: { x: 9 } }, after, ids)).toMatchObject({
      kind: 'upsert', baseVersion: 4, payload: { x: 9 },
    });
    expect(opToChange({ type: 'delete', mark: A }, new Map(), ids)).toMatchObject({ kind: 'delete', baseVersion: 4, payload: null });
    expect(opToChange({ type: 'update', id: 'gone', before: {}, after: {} }, new Map(), ids)).toBeNull();
  });
});

describe('syncOnce', () => {
  it('sends a batch and acks it', async () => {
    const q = new ChangeQueue();
    q.enqueue(upsert('a'));
    q.enqueue(upsert('b'));
    let seen: Change[] = [];
    const out = await syncOnce(q, async (batch) => {
      seen = batch;
      expect(q.inFlight()).toHaveLength(2);
      return { acked: batch.map((c, i) => ({ opId: c.opId, markId: c.markId, version: i + 1 })) };
    });
    expect(seen.map((c) => c.markId)).toEqual(['a', 'b']);
    expect(seen[0]).not.toHaveProperty('state');
    expect(out).toMatchObject({ sent: 2, failed: [] });
    expect(out.acked.map((a) => a.version)).toEqual([1, 2]);
    expect(q.size).toBe(0);
  });

  it('returns everything to the queue when the request throws', async () => {
    const q = new ChangeQueue();
    q.enqueue(upsert('a'));
    const out = await syncOnce(q, async () => {
      throw new TypeError('Failed to fetch');
    });
    expect(out.failed).toHaveLength(1);
    expect(out.error).toBeInstanceOf(TypeError);
    expect(q.pending()).toHaveLength(1);
  });

  it('fails changes the server did not mention, drops conflicts and rejections', async () => {
    const q = new ChangeQueue();
    const a = upsert('a', {}, 1);
    const b = upsert('b', {}, 1);
    const c = upsert('c');
    const d = upsert('d', { x: -1 });
    [a, b, c, d].forEach((ch) => q.enqueue(ch));
    const serverB = mark('b', { classKey: 'leukocyte', version: 2 });
    const result: SendResult = {
      acked: [{ opId: a.opId, markId: 'a', version: 2 }, { opId: 'unknown', markId: 'zz', version: 9 }],
      conflicts: [{ opId: b.opId, markId: 'b', server: serverB }],
      rejected: [{ opId: d.opId, markId: 'd', message: 'x must be inside the image' }],
    };
    const out = await syncOnce(q, async () => result, 10);
    expect(out.acked.map((x) => x.markId)).toEqual(['a']);
    expect(out.conflicts).toEqual([{ opId: b.opId, markId: 'b', server: serverB }]);
    expect(out.rejected.map((x) => x.markId)).toEqual(['d']);
    expect(out.failed).toEqual([c.opId]);
    expect(q.all().map((e) => [e.markId, e.state])).toEqual([['c', 'pending']]);
  });

  it('does nothing on an empty queue', async () => {
    const q = new ChangeQueue();
    let called = false;
    const out = await syncOnce(q, async () => {
      called = true;
      return { acked: [] };
    });
    expect(called).toBe(false);
    expect(out.sent).toBe(0);
  });
});

describe('mergeServerMarks', () => {
  it('takes the server copy unless the mark has pending local changes', () => {
    const local = [mark('a', { x: 1, version: 1 }), mark('b', { x: 2, version: 1 }), mark('new', { x: 3 })];
    const server = [
      mark('a', { x: 100, version: 2 }), // another tab moved it, nothing pending here → take it
      mark('b', { x: 200, version: 2 }), // we have a pending change → keep ours
      mark('other-tab', { x: 5, version: 1 }), // another tab's new mark appears
    ];
    const merged = mergeServerMarks(local, server, new Set(['b', 'new']));
    expect(merged.map((m) => [m.id, m.x])).toEqual([
      ['a', 100],
      ['b', 2],
      ['other-tab', 5],
      ['new', 3],
    ]);
  });

  it('keeps a pending delete deleted and drops marks another tab deleted', () => {
    const local = [mark('kept', { version: 1 }), mark('gone-elsewhere', { version: 1 })];
    const server = [mark('kept', { version: 1 }), mark('deleted-here', { version: 3 })];
    const merged = mergeServerMarks(local, server, new Set(['deleted-here']));
    expect(merged.map((m) => m.id)).toEqual(['kept']);
  });

  it('loses nobody’s marks: both tabs’ new marks survive', () => {
    const mine = mark('mine');
    const theirs = mark('theirs', { version: 1 });
    const merged = mergeServerMarks([mine], [theirs], new Set(['mine']));
    expect(merged.map((m) => m.id).sort()).toEqual(['mine', 'theirs']);
  });
});
