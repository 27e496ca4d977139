import type { ScoringMark } from './types';

/*
 * The wire contract of POST /api/reads/:id/sync, shared by the server (db/queries/mark-sync.ts)
 * and the browser's change queue (lib/scoring/queue.ts), so neither imports the other.
 */

/** What the server answered for one batch. Changes it does not mention count as failed. */
export interface SendResult<P = ScoringMark> {
  acked: { opId: string; markId: string; version?: number }[];
  /** 409: the server's copy (null if the mark is gone) replaces ours. */
  conflicts?: { opId: string; markId: string; server: P | null }[];
  /** 4xx other than 409: retrying cannot help; shown to the user, then dropped. */
  rejected?: { opId: string; markId: string; message: string }[];
}
