import { describe, expect, it } from 'vitest';
import { READ_KINDS, READ_STATUSES, type ReadRef } from '@/lib/reads/kinds';
import { figuresBasis, mayEditMarks, mayViewMarks, readActionsFor, whyNotStart } from '@/lib/reads/policy';

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
    for (const who of [tech, vet]) expect(readActionsFor(who, [])).toEqual([{ action: 'start', kind: 'first' }]);
    for (const who of [manager, client]) expect(readActionsFor(who, [])).toEqual([]);
  });

  it('lets only its reader continue an open first read, and nobody a submitted one', () => {
    const open = read({});
    expect(readActionsFor(tech, [open])).toEqual([{ action: 'continue', kind: 'first', readId: 10 }]);
    expect(readActionsFor(otherTech, [open])).toEqual([]);
    expect(readActionsFor(vet, [open])).toEqual([]);
    expect(readActionsFor(tech, [read({ status: 'submitted' })])).toEqual([]);
  });

  it('says why a read cannot be started', () => {
    expect(whyNotStart(tech, 'first', [])).toBeNull();
    expect(whyNotStart(manager, 'first', [])).toMatch(/technicians and veterinarians/);
    expect(whyNotStart(tech, 'second', [])).toMatch(/Only first reads/);
    expect(whyNotStart(vet, 'first', [read({})])).toMatch(/already has a first read/);
  });
});

describe('who may see and change a read', () => {
  it('keeps an open second read blind to everyone but its reader', () => {
    const second = read({ kind: 'second', readerId: otherTech.id });
    expect(mayViewMarks(otherTech, second)).toBe(true);
    expect(mayViewMarks(tech, second)).toBe(false);
    expect(mayViewMarks(vet, second)).toBe(false);
    expect(mayViewMarks(tech, { ...second, status: 'submitted' })).toBe(true);
    expect(mayViewMarks(otherTech, read({}))).toBe(true);
  });

  it('lets only the reader change an open read', () => {
    expect(mayEditMarks(tech, read({}))).toBe(true);
    expect(mayEditMarks(otherTech, read({}))).toBe(false);
    expect(mayEditMarks(tech, read({ status: 'submitted' }))).toBe(false);
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
  });
});
