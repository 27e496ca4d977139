/**
 * Decisions about reads, as pure functions: who may start or continue which read, who may see
 * a read's marks, and which read the collection's figures (PMMN, the list) are based on.
 * The pages and db/queries ask these; the server still checks the role on every request.
 */
import { READER_ROLES, type Role } from '@/lib/auth/roles';
import { FIRST_READ, OPEN, SECOND_READ, SETTLED_READ, SUBMITTED, type ReadKind, type ReadRef } from './kinds';

export interface Actor {
  id: number;
  role: Role;
}

/** Technicians and veterinarians read slides; lab managers and clients do not. */
export const mayRead = (role: Role): boolean => READER_ROLES.includes(role);

/** Something the actor can do about a collection's reads, as the collection page offers it. */
export type ReadAction = { action: 'start'; kind: ReadKind } | { action: 'continue'; kind: ReadKind; readId: number };

/**
 * What the actor may start or continue on a collection with these reads. Today there is one read
 * to start, the first: any reader may start it while it does not exist, and only its own reader
 * continues it while it is open. (Second reads and settling will add their own entries here.)
 */
export function readActionsFor(actor: Actor, reads: readonly ReadRef[]): ReadAction[] {
  if (!mayRead(actor.role)) return [];
  const first = reads.find((r) => r.kind === FIRST_READ);
  if (!first) return [{ action: 'start', kind: FIRST_READ }];
  if (first.status === OPEN && first.readerId === actor.id) return [{ action: 'continue', kind: FIRST_READ, readId: first.id }];
  return [];
}

/** Why the actor may not start a read of this kind now, or null when they may. */
export function whyNotStart(actor: Actor, kind: ReadKind, reads: readonly ReadRef[]): string | null {
  if (!mayRead(actor.role)) return 'Only technicians and veterinarians read slides.';
  if (kind !== FIRST_READ) return 'Only first reads can be started here.';
  if (reads.some((r) => r.kind === kind)) return 'This collection already has a first read.';
  return null;
}

/**
 * May the actor see this read's marks? A second read is blind: only its reader sees it while it is
 * open. (This checks the one read asked for; hiding the first read from the second reader is the
 * second-read feature's job.)
 */
export function mayViewMarks(actor: Actor, read: ReadRef): boolean {
  return !(read.kind === SECOND_READ && read.readerId !== actor.id && read.status !== SUBMITTED);
}

/** May the actor change this read's marks (or submit it)? Its own reader, while it is open. */
export const mayEditMarks = (actor: Pick<Actor, 'id'>, read: Pick<ReadRef, 'readerId' | 'status'>): boolean =>
  read.readerId === actor.id && read.status === OPEN;

/** Which read a collection's figures rest on, and how the page should name it. */
export type FiguresBasis<R> = { read: R; basis: 'settled' | 'first-unchecked' };

/**
 * The read whose % normal the PMMN (and the other collection figures) use: the submitted settled
 * read when there is one, else the submitted first read, said to be not yet checked by a second
 * reader; null while no read is submitted (an open read's figures still move).
 */
export function figuresBasis<R extends Pick<ReadRef, 'kind' | 'status'>>(reads: readonly R[]): FiguresBasis<R> | null {
  const settled = reads.find((r) => r.kind === SETTLED_READ && r.status === SUBMITTED);
  if (settled) return { read: settled, basis: 'settled' };
  const first = reads.find((r) => r.kind === FIRST_READ && r.status === SUBMITTED);
  return first ? { read: first, basis: 'first-unchecked' } : null;
}
