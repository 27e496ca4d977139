// The candidate-detection queue in MariaDB: one row per field image in candidate_jobs, its
// result in candidates. Takes its database as an argument so the upload path, the demo
// seed, every app instance's worker and the tests share it.
//
// Invariants:
// - A job is taken by one worker at a time: the claim selects a due row FOR UPDATE SKIP
//   LOCKED (other workers skip it rather than wait) and stamps it with a fresh lease token
//   in the same transaction.
// - A result or a failure is written only under the token that took the job. A worker that
//   lost its lease (it ran past it and another took the job, or a re-run reset it) writes
//   nothing: its work is simply dropped.
// - A lease that runs out means the worker died: the job is due again, and the attempt it
//   spent counts.
import type { Knex } from 'knex';

export const JOB_STATUSES = ['waiting', 'running', 'done', 'failed'] as const;
export type JobStatus = (typeof JOB_STATUSES)[number];

export interface JobOptions {
  /** How long a worker may hold a job before another may take it, ms. */
  leaseMs: number;
  /** Attempts before a job fails for good. */
  maxAttempts: number;
  /** Wait before the first retry, ms; doubled for each later one. */
  retryBaseMs: number;
}

export const JOB_DEFAULTS: JobOptions = { leaseMs: 120_000, maxAttempts: 3, retryBaseMs: 30_000 };

export interface ClaimedJob {
  imageId: number;
  token: string;
  attempts: number;
}

export interface JobResult {
  candidates: { x: number; y: number; score: number }[];
  method: string;
  params: unknown;
  ms: number;
}

/**
 * Queues (or re-queues) detection for an image, inside the caller's transaction. A re-run
 * clears the previous result, so an image never shows candidates of a run it no longer has.
 */
export async function enqueueDetection(trx: Knex | Knex.Transaction, imageId: number, requestedBy: number | null = null): Promise<void> {
  await trx('candidates').where({ image_id: imageId }).delete();
  await trx('candidate_jobs')
    .insert({ image_id: imageId, status: 'waiting', attempts: 0, run_after: trx.fn.now(3), requested_by: requestedBy })
    .onConflict('image_id')
    .merge({
      status: 'waiting', attempts: 0, run_after: trx.fn.now(3), lease_token: null, lease_until: null, worker: null, error: null,
      method: null, params: null, ms: null, started_at: null, finished_at: null, requested_by: requestedBy,
    });
}

/** Takes the next due job: waiting and due, or running with a lease that ran out. */
export async function claimJob(db: Knex, worker: string, opts: Pick<JobOptions, 'leaseMs'> = JOB_DEFAULTS): Promise<ClaimedJob | null> {
  return db.transaction(async (trx) => {
    const [rows] = (await trx.raw(
      `select image_id, attempts from candidate_jobs
        where (status = 'waiting' and run_after <= now(3)) or (status = 'running' and lease_until < now(3))
        order by run_after, image_id
        limit 1
        for update skip locked`,
    )) as [{ image_id: number; attempts: number }[]];
    const row = rows[0];
    if (!row) return null;
    const token = crypto.randomUUID();
    await trx('candidate_jobs')
      .where({ image_id: row.image_id })
      .update({
        status: 'running', attempts: row.attempts + 1, lease_token: token, worker: worker.slice(0, 120),
        lease_until: trx.raw('now(3) + interval ? microsecond', [Math.round(opts.leaseMs * 1000)]), started_at: trx.fn.now(3),
      });
    return { imageId: row.image_id, token, attempts: row.attempts + 1 };
  });
}

/** Stores the result if the job is still ours; false when the lease was lost (nothing written). */
export async function completeJob(db: Knex, job: ClaimedJob, result: JobResult): Promise<boolean> {
  return db.transaction(async (trx) => {
    const own = await trx('candidate_jobs').where({ image_id: job.imageId, lease_token: job.token, status: 'running' }).forUpdate().first('image_id');
    if (!own) return false;
    await trx('candidates').where({ image_id: job.imageId }).delete();
    const rows = result.candidates.map((c) => ({ image_id: job.imageId, x: c.x, y: c.y, score: c.score }));
    for (let i = 0; i < rows.length; i += 500) await trx('candidates').insert(rows.slice(i, i + 500));
    await trx('candidate_jobs')
      .where({ image_id: job.imageId })
      .update({
        status: 'done', lease_token: null, lease_until: null, error: null, method: result.method, params: JSON.stringify(result.params),
        ms: Math.round(result.ms), finished_at: trx.fn.now(3),
      });
    return true;
  });
}

/**
 * Records a failed attempt if the job is still ours: waits to retry with the reason shown,
 * or fails for good after the last attempt (or at once when `final`, e.g. the image is gone).
 */
export async function failJob(
  db: Knex,
  job: ClaimedJob,
  reason: string,
  opts: Pick<JobOptions, 'maxAttempts' | 'retryBaseMs'> = JOB_DEFAULTS,
  final = false,
): Promise<'retry' | 'failed' | 'lost'> {
  const last = final || job.attempts >= opts.maxAttempts;
  const delayMs = opts.retryBaseMs * 2 ** Math.max(0, job.attempts - 1);
  const n = await db('candidate_jobs')
    .where({ image_id: job.imageId, lease_token: job.token, status: 'running' })
    .update(
      last
        ? { status: 'failed', lease_token: null, lease_until: null, error: reason.slice(0, 500), finished_at: db.fn.now(3) }
        : { status: 'waiting', lease_token: null, lease_until: null, error: reason.slice(0, 500), run_after: db.raw('now(3) + interval ? microsecond', [Math.round(delayMs * 1000)]) },
    );
  if (n === 0) return 'lost';
  return last ? 'failed' : 'retry';
}
