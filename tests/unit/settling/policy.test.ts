import { describe, expect, it } from 'vitest';
import type { ReadRef } from '@/lib/reads/kinds';
import { settleReads, whySettleRefused } from '@/lib/settling/policy';

const tech = { id: 1, role: 'technician' as const };
const reader = { id: 2, role: 'technician' as const };
const vet = { id: 3, role: 'veterinarian' as const };
const manager = { id: 4, role: 'lab_manager' as const };
const read = (id: number, kind: ReadRef['kind'], readerId: number, status: ReadRef['status'] = 'submitted'): ReadRef => ({ id, kind, readerId, status });
const both = [read(10, 'first', 1), read(11, 'second', 2)];

describe('who may settle, and when', () => {
  it('the second reader or a veterinarian, once both reads are submitted', () => {
    expect(whySettleRefused(reader, both)).toBeNull();
    expect(whySettleRefused(vet, both)).toBeNull();
    expect(whySettleRefused(tech, both, { secondReader: 'Orrin Halvard' })).toEqual({ status: 403, message: 'Only the second reader (Orrin Halvard) or a veterinarian may settle this collection.' });
    expect(whySettleRefused(manager, both)?.status).toBe(403);
  });

  it('nobody while a first or second read is open, or before both are submitted', () => {
    expect(whySettleRefused(vet, [read(10, 'first', 1), read(11, 'second', 2, 'open')])).toEqual({ status: 409, message: 'The second read is still open: settle once it is submitted.' });
    expect(whySettleRefused(reader, [read(10, 'first', 1)])?.status).toBe(409);
  });

  it('nobody once a settled read is written after both reads; an older one does not count', () => {
    expect(whySettleRefused(reader, [...both, read(12, 'settled', 2)])?.message).toMatch(/settled already/);
    // A settled read older than the second read it would settle (a later re-read) leaves settling open.
    expect(settleReads([read(10, 'first', 1), read(11, 'settled', 2), read(13, 'second', 2)]).settled).toBeNull();
    expect(whySettleRefused(reader, [read(10, 'first', 1), read(11, 'settled', 2), read(13, 'second', 2)])).toBeNull();
  });
});
