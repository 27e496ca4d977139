/**
 * Who may settle a collection's disagreements, and when. Pure: db/queries/settle-core.ts asks it
 * inside the settling transaction, the settle page asks it to say why it offers no decisions.
 */
import type { Actor } from '@/lib/reads/policy';
import { FIRST_READ, OPEN, SECOND_READ, SETTLED_READ, SUBMITTED, type ReadRef } from '@/lib/reads/kinds';

export interface SettleReads<R extends ReadRef = ReadRef> {
  /** The latest submitted first and second reads (the ones the disagreements are between). */
  first: R | null;
  second: R | null;
  /** A submitted settled read made after both of them: settling is done. */
  settled: R | null;
}

/** The reads settling works on, from all of a collection's reads. */
export function settleReads<R extends ReadRef>(reads: readonly R[]): SettleReads<R> {
  const latest = (kind: string) => reads.filter((r) => r.kind === kind && r.status === SUBMITTED).sort((a, b) => b.id - a.id)[0] ?? null;
  const first = latest(FIRST_READ);
  const second = latest(SECOND_READ);
  const s = latest(SETTLED_READ);
  const settled = s && first && second && s.id > Math.max(first.id, second.id) ? s : null;
  return { first, second, settled };
}

/** A first or second read still open (settling waits for it, and shows neither read's marks meanwhile). */
export const openReadOf = <R extends ReadRef>(reads: readonly R[]): R | null =>
  reads.find((r) => (r.kind === FIRST_READ || r.kind === SECOND_READ) && r.status === OPEN) ?? null;

export type SettleRefusal = { status: 403 | 409; message: string };

/**
 * Why the actor may not decide disagreements now (null when they may). The second reader or a
 * veterinarian settles; nobody does while a first or second read is open, before both are
 * submitted, or once the settled read is written.
 */
export function whySettleRefused(actor: Actor, reads: readonly ReadRef[], names: { secondReader?: string } = {}): SettleRefusal | null {
  if (actor.role !== 'technician' && actor.role !== 'veterinarian') return { status: 403, message: 'Only the second reader or a veterinarian settles disagreements.' };
  const open = openReadOf(reads);
  if (open) return { status: 409, message: `The ${open.kind} read is still open: settle once it is submitted.` };
  const { first, second, settled } = settleReads(reads);
  if (!first || !second) return { status: 409, message: 'Both the first and the second read must be submitted before their disagreements can be settled.' };
  if (actor.id !== second.readerId && actor.role !== 'veterinarian') {
    return { status: 403, message: `Only the second reader${names.secondReader ? ` (${names.secondReader})` : ''} or a veterinarian may settle this collection.` };
  }
  if (settled) return { status: 409, message: 'This collection is settled already: its settled read is written and cannot change.' };
  return null;
}
