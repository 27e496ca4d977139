/**
 * A read's kind and status, named once. Zod schemas, queries and components take these
 * constants; nothing spells the strings out again.
 *
 * The database columns `reads.kind` and `reads.status` are enums written by a landed migration
 * (20261201000400), which is never edited. A new kind or status therefore needs a new migration
 * that widens the column; tests/integration/db/read-kinds.test.ts fails until the two agree.
 */

/** first: the technician's read; second: a blind re-count by another reader; settled: the second reader's decisions on the disagreements. */
export const READ_KINDS = ['first', 'second', 'settled'] as const;
export type ReadKind = (typeof READ_KINDS)[number];

/** open: marks can change; submitted: locked for good. */
export const READ_STATUSES = ['open', 'submitted'] as const;
export type ReadStatus = (typeof READ_STATUSES)[number];

export const FIRST_READ = 'first' satisfies ReadKind;
export const SECOND_READ = 'second' satisfies ReadKind;
export const SETTLED_READ = 'settled' satisfies ReadKind;
export const OPEN = 'open' satisfies ReadStatus;
export const SUBMITTED = 'submitted' satisfies ReadStatus;

export const READ_KIND_LABELS: Record<ReadKind, string> = { first: 'First read', second: 'Second read', settled: 'Settled read' };
export const READ_STATUS_LABELS: Record<ReadStatus, string> = { open: 'In progress', submitted: 'Submitted' };

export const isReadKind = (v: unknown): v is ReadKind => (READ_KINDS as readonly unknown[]).includes(v);
export const isReadStatus = (v: unknown): v is ReadStatus => (READ_STATUSES as readonly unknown[]).includes(v);

/** What every decision about reads needs to know of one read. */
export interface ReadRef {
  id: number;
  kind: ReadKind;
  status: ReadStatus;
  readerId: number;
}

/**
 * A read's number: its place among its collection's reads in the order they were started (by
 * id), from 1. Derived, never stored, so a read written by any code path is numbered the same.
 */
export function numberReads(reads: readonly Pick<ReadRef, 'id'>[]): Map<number, number> {
  return new Map([...reads].sort((a, b) => a.id - b.id).map((r, i) => [r.id, i + 1]));
}

/** "Read 3 · Second read", the name a numbered read goes by on the pages. */
export const readLabel = (r: { kind: ReadKind; number: number }): string => `Read ${r.number} · ${READ_KIND_LABELS[r.kind]}`;
