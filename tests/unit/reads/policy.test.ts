import { describe, expect, it } from 'vitest';
import { READ_KINDS, READ_STATUSES, type ReadRef } from '@/lib/reads/kinds';
import { numberReads, readLabel } from '@/lib/reads/kinds';
import { blindingRead, figuresBasis, mayEditMarks, mayViewRead, readActionsFor, recountAdvised, visibleReads, visibleReadsOfCollections, whyNotStart } from '@/lib/reads/policy';

const tech = { id: 1, role: 'technician' as const };
const otherTech = { id: 2, role: 'technician' as const };
const vet = { id: 3, role: 'veterinarian' as const };
const manager = { id: 4, role: 'lab_manager' as const };
const client = { id: 5, role: 'client' as const };
const read = (over: Partial<ReadRef>): ReadRef => ({ id: 10, kind: 'first', status: 'open', readerId: tech.id, ...over });

describe('read kinds', () => {
  it('names the kinds and states the migrations made', () => {
    // The enums of db/migrations/20261201000400_reads_and_marks.ts.
    expect(READ_KINDS).toEqual(['first', 'second', 'settled']);
    expect(READ_STATUSES).toEqual(['open', 'submitted']);
  });
});

describe('who may start or continue which read', () => {
  it('lets any reader start the first read of a collection without one', () => {
    for (const who of [tech, vet]) expect(readActionsFor(who, [])).toEqual([{ action: 'start', kind: 'first', recount: false }]);
    for (const who of [manager, client]) expect(readActionsFor(who, [])).toEqual([]);
  });

  it('lets only its reader continue an open read', () => {
    const open = read({});
    expect(readActionsFor(tech, [open])).toEqual([{ action: 'continue', kind: 'first', readId: 10 }]);
    expect(readActionsFor(otherTech, [open])).toEqual([]);
    expect(readActionsFor(vet, [open])).toEqual([]);
    const second = read({ id: 11, kind: 'second', readerId: otherTech.id });
    expect(readActionsFor(otherTech, [read({ status: 'submitted' }), second])).toEqual([{ action: 'continue', kind: 'second', readId: 11 }]);
  });

  it('offers the second read to every reader but the first reader once the first read is submitted', () => {
    const submitted = read({ status: 'submitted' });
    expect(readActionsFor(tech, [submitted])).toEqual([]);
    for (const who of [otherTech, vet]) expect(readActionsFor(who, [submitted])).toEqual([{ action: 'start', kind: 'second', recount: false }]);
    expect(readActionsFor(manager, [submitted])).toEqual([]);
  });

  it('refuses a second read with 403 for the first reader and 409 for the collection’s state', () => {
    const first = read({ status: 'submitted' });
    expect(whyNotStart(tech, 'first', [])).toBeNull();
    expect(whyNotStart(manager, 'first', [])).toMatchObject({ status: 403, message: expect.stringMatching(/technicians and veterinarians/) });
    expect(whyNotStart(vet, 'first', [read({})])).toMatchObject({ status: 409, message: expect.stringMatching(/already has a first read/) });
    expect(whyNotStart(otherTech, 'second', [])).toMatchObject({ status: 409, message: expect.stringMatching(/no first read/) });
    // The first reader: 403, whether the first read is open or submitted.
    expect(whyNotStart(tech, 'second', [first])).toMatchObject({ status: 403 });
    expect(whyNotStart(tech, 'second', [read({})])).toMatchObject({ status: 403 });
    // Someone else before the first read is submitted: 409.
    expect(whyNotStart(otherTech, 'second', [read({})])).toMatchObject({ status: 409, message: expect.stringMatching(/not submitted/) });
    expect(whyNotStart(otherTech, 'second', [first])).toBeNull();
    // Another reader's open second read: 409 for a third reader.
    const open2 = read({ id: 11, kind: 'second', readerId: otherTech.id });
    expect(whyNotStart(vet, 'second', [first, open2])).toMatchObject({ status: 409, message: expect.stringMatching(/in progress/) });
    expect(whyNotStart(vet, 'settled', [first])).toMatchObject({ status: 409 });
  });

  it('allows a recount only when advised, and only by someone who read neither', () => {
    const first = read({ id: 1, status: 'submitted' });
    const second = read({ id: 2, kind: 'second', status: 'submitted', readerId: otherTech.id });
    expect(whyNotStart(vet, 'second', [first, second])).toMatchObject({ status: 409, message: expect.stringMatching(/recount is advised/) });
    expect(whyNotStart(vet, 'second', [first, second], { recountAdvised: true })).toBeNull();
    expect(whyNotStart(otherTech, 'second', [first, second], { recountAdvised: true })).toMatchObject({ status: 403 });
    expect(whyNotStart(tech, 'second', [first, second], { recountAdvised: true })).toMatchObject({ status: 403 });
    expect(readActionsFor(vet, [first, second], { recountAdvised: true })).toEqual([{ action: 'start', kind: 'second', recount: true }]);
    // Once settled, no further second read.
    const settled = read({ id: 3, kind: 'settled', status: 'submitted', readerId: otherTech.id });
    expect(whyNotStart(vet, 'second', [first, second, settled], { recountAdvised: true })).toMatchObject({ status: 409, message: expect.stringMatching(/settled/) });
  });

  it('advises a recount when the reads differ beyond the limit and nothing is settled', () => {
    const reads = [read({ id: 1, status: 'submitted' }), read({ id: 2, kind: 'second', status: 'submitted' })];
    expect(recountAdvised(reads, { differ: true })).toBe(true);
    expect(recountAdvised(reads, { differ: false })).toBe(false);
    expect(recountAdvised(reads, null)).toBe(false);
    expect(recountAdvised([...reads, read({ id: 3, kind: 'settled', status: 'submitted' })], { differ: true })).toBe(false);
  });
});

describe('who may see which read (blindness)', () => {
  const first = read({ id: 1, status: 'submitted' });
  const openSecond = read({ id: 2, kind: 'second', readerId: otherTech.id });

  it('shows the second reader nothing but their own read while it is open', () => {
    expect(blindingRead(otherTech, [first, openSecond])).toBe(openSecond);
    expect(visibleReads(otherTech, [first, openSecond])).toEqual([openSecond]);
    expect(mayViewRead(otherTech, first, [first, openSecond])).toBe(false);
    // Once submitted, both reads are open to them.
    const submitted = { ...openSecond, status: 'submitted' as const };
    expect(visibleReads(otherTech, [first, submitted])).toEqual([first, submitted]);
  });

  it('shows the first reader and everyone else nothing of an open second read', () => {
    for (const who of [tech, vet, manager]) expect(visibleReads(who, [first, openSecond])).toEqual([first]);
    const submitted = { ...openSecond, status: 'submitted' as const };
    for (const who of [tech, vet, manager]) expect(visibleReads(who, [first, submitted])).toEqual([first, submitted]);
  });

  it('keeps a recount blind to the first read, the earlier second read and a settled read', () => {
    const second = read({ id: 2, kind: 'second', status: 'submitted', readerId: otherTech.id });
    const recount = read({ id: 3, kind: 'second', readerId: vet.id });
    expect(visibleReads(vet, [first, second, recount])).toEqual([recount]);
    expect(visibleReads(otherTech, [first, second, recount])).toEqual([first, second]);
    expect(visibleReads(tech, [first, second, recount])).toEqual([first, second]);
  });

  it('decides per collection when reads of many are given', () => {
    const a = [{ ...first, collectionId: 1 }, { ...openSecond, collectionId: 1 }];
    const b = [{ ...first, id: 5, collectionId: 2 }];
    // Blind on collection 1 only: collection 2's first read stays visible to the same reader.
    expect(visibleReadsOfCollections(otherTech, [...a, ...b]).map((r) => r.id)).toEqual([2, 5]);
  });

  it('lets only the reader change an open read', () => {
    expect(mayEditMarks(tech, read({}))).toBe(true);
    expect(mayEditMarks(otherTech, read({}))).toBe(false);
    expect(mayEditMarks(tech, read({ status: 'submitted' }))).toBe(false);
  });
});

describe('read numbers', () => {
  it('numbers a collection’s reads by the order they were started', () => {
    const n = numberReads([{ id: 40 }, { id: 12 }, { id: 33 }]);
    expect([n.get(12), n.get(33), n.get(40)]).toEqual([1, 2, 3]);
    expect(readLabel({ kind: 'second', number: 3 })).toBe('Read 3 · Second read');
  });
});

describe('which read the collection figures use', () => {
  it('prefers the submitted settled read, else the submitted first read, else none', () => {
    const first = read({ id: 1, status: 'submitted' });
    const second = read({ id: 2, kind: 'second', status: 'submitted' });
    const settled = read({ id: 3, kind: 'settled', status: 'submitted' });
    expect(figuresBasis([first, second, settled])).toEqual({ read: settled, basis: 'settled' });
    expect(figuresBasis([first, second, { ...settled, status: 'open' }])).toEqual({ read: first, basis: 'first-unchecked' });
    // an open read's figures still move: no basis
    expect(figuresBasis([read({ id: 1 })])).toBeNull();
    expect(figuresBasis([])).toBeNull();
    // a second read alone is never the basis
    expect(figuresBasis([second])).toBeNull();
    // several of a kind: the latest submitted
    const settled2 = read({ id: 4, kind: 'settled', status: 'submitted' });
    expect(figuresBasis([first, second, settled, settled2])).toEqual({ read: settled2, basis: 'settled' });
  });
});
