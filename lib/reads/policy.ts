/**
 * Decisions about reads, as pure functions: who may start or continue which read, what a user
 * may see of which read (blindness), and which read the collection's figures (PMMN, the list)
 * are based on. The pages and db/queries ask these; the server still checks the role on every
 * request.
 */
import { READER_ROLES, type Role } from '@/lib/auth/roles';
import { FIRST_READ, OPEN, SECOND_READ, SETTLED_READ, SUBMITTED, type ReadKind, type ReadRef } from './kinds';

export interface Actor {
  id: number;
  role: Role;
}

/** Technicians and veterinarians read slides; lab managers and clients do not. */
export const mayRead = (role: Role): boolean => READER_ROLES.includes(role);

/** The latest read of a kind (by id), optionally of one status; null when there is none. */
export function latestRead<R extends Pick<ReadRef, 'id' | 'kind' | 'status'>>(reads: readonly R[], kind: ReadKind, status?: ReadRef['status']): R | null {
  let out: R | null = null;
  for (const r of reads) if (r.kind === kind && (status === undefined || r.status === status) && (!out || r.id > out.id)) out = r;
  return out;
}

// ---------------------------------------------------------------------------
// Blindness: the one rule for what a user may see of which read.

/** The actor's own open second read among one collection's reads: while it is open, the actor is blind. */
export function blindingRead<R extends ReadRef>(actor: Pick<Actor, 'id'>, reads: readonly R[]): R | null {
  return reads.find((r) => r.kind === SECOND_READ && r.status === OPEN && r.readerId === actor.id) ?? null;
}

/**
 * May the actor see this read — its marks, counts, % normal, interval, per-image counts, and
 * everything computed from them — given every read of its collection?
 * - Their own read: always.
 * - While the actor's own second read of the collection is open: no other read at all (a blind
 *   re-count sees nothing of the first read, nor of an earlier second read or a settled read).
 * - Someone else's open second read: no (its figures still move, and showing them would tell the
 *   first reader what the check finds before it is done).
 * - Anything else: yes.
 */
export function mayViewRead(actor: Pick<Actor, 'id'>, read: ReadRef, collectionReads: readonly ReadRef[]): boolean {
  if (read.readerId === actor.id) return true;
  if (blindingRead(actor, collectionReads)) return false;
  return !(read.kind === SECOND_READ && read.status === OPEN);
}

/** The reads of one collection the actor may see (mayViewRead), in the order given. */
export function visibleReads<R extends ReadRef>(actor: Pick<Actor, 'id'>, reads: readonly R[]): R[] {
  return reads.filter((r) => mayViewRead(actor, r, reads));
}

/** visibleReads over the reads of many collections at once (a list page, a stallion's history). */
export function visibleReadsOfCollections<R extends ReadRef & { collectionId: number }>(actor: Pick<Actor, 'id'>, reads: readonly R[]): R[] {
  const byCollection = new Map<number, R[]>();
  for (const r of reads) {
    const list = byCollection.get(r.collectionId);
    if (list) list.push(r);
    else byCollection.set(r.collectionId, [r]);
  }
  const keep = new Set<R>();
  for (const list of byCollection.values()) for (const r of visibleReads(actor, list)) keep.add(r);
  return reads.filter((r) => keep.has(r));
}

// ---------------------------------------------------------------------------
// Starting and continuing reads

/** What the lab knows about a collection beyond its reads, for deciding whether a further second read may start. */
export interface StartContext {
  /** The latest submitted first and second reads differ by more than the acceptable difference (lib/agreement). */
  recountAdvised?: boolean;
}

/** Something the actor can do about a collection's reads, as the collection page offers it. */
export type ReadAction =
  | { action: 'start'; kind: ReadKind; recount: boolean }
  | { action: 'continue'; kind: ReadKind; readId: number };

/** Why a read may not start: 403 when it is about who the actor is, 409 when about the collection's state. */
export type StartRefusal = { status: 403 | 409; message: string };

/**
 * Why the actor may not start a read of this kind now, or null when they may.
 * - first: while the collection has no first read.
 * - second: by a reader other than the first reader (403), once the first read is submitted (409),
 *   while no other second read is open (409) and no settled read exists (409). A further second
 *   read (a recount) only when a recount is advised (409 otherwise), and by someone who read
 *   neither the first nor an earlier second read (403).
 * - settled: never started here; settling the disagreements writes it.
 * The actor's own open read is continued, not started: the queries return it before asking this.
 */
export function whyNotStart(actor: Actor, kind: ReadKind, reads: readonly ReadRef[], ctx: StartContext = {}): StartRefusal | null {
  if (!mayRead(actor.role)) return { status: 403, message: 'Only technicians and veterinarians read slides.' };
  if (kind === FIRST_READ) return reads.some((r) => r.kind === FIRST_READ) ? { status: 409, message: 'This collection already has a first read.' } : null;
  if (kind !== SECOND_READ) return { status: 409, message: 'A settled read is written by settling the disagreements, not started here.' };
  const first = latestRead(reads, FIRST_READ);
  if (!first) return { status: 409, message: 'This collection has no first read yet; the second read starts once the first read is submitted.' };
  if (reads.some((r) => r.kind === FIRST_READ && r.readerId === actor.id)) {
    return { status: 403, message: 'You made the first read of this collection; its second read must be made by another reader.' };
  }
  if (first.status !== SUBMITTED) return { status: 409, message: 'The first read is not submitted yet; the second read starts once it is.' };
  if (reads.some((r) => r.kind === SECOND_READ && r.status === OPEN)) {
    return { status: 409, message: 'Another reader’s second read of this collection is in progress; only one second read is open at a time.' };
  }
  if (latestRead(reads, SETTLED_READ)) return { status: 409, message: 'This collection’s disagreements are settled; no further second read is made.' };
  const seconds = reads.filter((r) => r.kind === SECOND_READ);
  if (seconds.length === 0) return null;
  if (!ctx.recountAdvised) {
    return { status: 409, message: 'This collection has its second read, and the two reads agree within the acceptable difference; a further read is started only when a recount is advised.' };
  }
  if (seconds.some((r) => r.readerId === actor.id)) {
    return { status: 403, message: 'You made a second read of this collection; the recount is made by a reader who read neither the first nor the second read.' };
  }
  return null;
}

/**
 * What the actor may start or continue on a collection with these reads: their own open read
 * first (only its reader continues it); else the first read while there is none; else the second
 * read (or a recount) when whyNotStart allows it.
 */
export function readActionsFor(actor: Actor, reads: readonly ReadRef[], ctx: StartContext = {}): ReadAction[] {
  if (!mayRead(actor.role)) return [];
  const own = reads.filter((r) => r.readerId === actor.id && r.status === OPEN).sort((a, b) => b.id - a.id)[0];
  if (own) return [{ action: 'continue', kind: own.kind, readId: own.id }];
  if (!whyNotStart(actor, FIRST_READ, reads, ctx)) return [{ action: 'start', kind: FIRST_READ, recount: false }];
  if (!whyNotStart(actor, SECOND_READ, reads, ctx)) return [{ action: 'start', kind: SECOND_READ, recount: reads.some((r) => r.kind === SECOND_READ) }];
  return [];
}

/**
 * "Recount advised": the latest submitted first and second reads' % normal differ by more than
 * the acceptable difference, and no settled read has been written since (a settled read stands
 * for the collection once the disagreements are decided).
 */
export function recountAdvised(reads: readonly Pick<ReadRef, 'id' | 'kind' | 'status'>[], difference: { differ: boolean } | null | undefined): boolean {
  if (!difference?.differ) return false;
  return latestRead(reads, SETTLED_READ, SUBMITTED) === null;
}

/** May the actor change this read's marks (or submit it)? Its own reader, while it is open. */
export const mayEditMarks = (actor: Pick<Actor, 'id'>, read: Pick<ReadRef, 'readerId' | 'status'>): boolean =>
  read.readerId === actor.id && read.status === OPEN;

/** Which read a collection's figures rest on, and how the page should name it. */
export type FiguresBasis<R> = { read: R; basis: 'settled' | 'first-unchecked' };

/**
 * The read whose % normal the PMMN (and the other collection figures) use, among the reads the
 * actor may see, given in the order they were started (by id, as every query returns them): the
 * latest submitted settled read when there is one, else the latest submitted first read, said to
 * be not yet checked by a second reader; null while no read is submitted (an open read's figures
 * still move).
 */
export function figuresBasis<R extends Pick<ReadRef, 'kind' | 'status'>>(reads: readonly R[]): FiguresBasis<R> | null {
  const settled = reads.findLast((r) => r.kind === SETTLED_READ && r.status === SUBMITTED);
  if (settled) return { read: settled, basis: 'settled' };
  const first = reads.findLast((r) => r.kind === FIRST_READ && r.status === SUBMITTED);
  return first ? { read: first, basis: 'first-unchecked' } : null;
}
