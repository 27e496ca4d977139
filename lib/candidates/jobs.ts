// The candidate-detection queue: one job per field image in candidate_jobs (the shared queue's
// shape and invariants are in lib/jobs/queue.ts), its result in candidates. A re-run clears the
// previous result, so an image never shows candidates of a run it no longer has.
import type { Knex } from 'knex';
import { jobQueue, type ClaimedJob, type JobOptions } from '@/lib/jobs/queue';

export { JOB_STATUSES, type JobStatus, type JobOptions, type ClaimedJob } from '@/lib/jobs/queue';

export const JOB_DEFAULTS: JobOptions = { leaseMs: 120_000, maxAttempts: 3, retryBaseMs: 30_000 };

export const detectionQueue = jobQueue('candidate_jobs', 'image_id');

export interface JobResult {
  candidates: { x: number; y: number; score: number }[];
  method: string;
  params: unknown;
  ms: number;
}

/** A job's stored params (a JSON column: a string or, from some drivers, the object). */
export const parseParams = (value: unknown): unknown => (typeof value === 'string' ? JSON.parse(value) : (value ?? null));

/** Queues (or re-queues) detection for an image, inside the caller's transaction. */
export async function enqueueDetection(trx: Knex | Knex.Transaction, imageId: number, requestedBy: number | null = null): Promise<void> {
  await trx('candidates').where({ image_id: imageId }).delete();
  await detectionQueue.enqueue(trx, imageId, { requested_by: requestedBy, method: null, params: null, ms: null });
}

/** Stores the result if the job is still ours; false when the lease was lost (nothing written). */
export async function completeJob(db: Knex, job: ClaimedJob, result: JobResult): Promise<boolean> {
  const write = async (trx: Knex.Transaction) => {
    await trx('candidates').where({ image_id: job.id }).delete();
    const rows = result.candidates.map((c) => ({ image_id: job.id, x: c.x, y: c.y, score: c.score }));
    for (let i = 0; i < rows.length; i += 500) await trx('candidates').insert(rows.slice(i, i + 500));
  };
  return detectionQueue.complete(db, job, write, { method: result.method, params: JSON.stringify(result.params), ms: Math.round(result.ms) });
}
