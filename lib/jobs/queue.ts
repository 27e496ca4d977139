// A job queue in a MariaDB table, one row per job keyed by the thing it works on (a field image's
// detection in candidate_jobs, a signed version's PDF in report_pdf_jobs). Both queues share this
// shape; each adds its own enqueue extras and what "done" writes. Takes its database as an
// argument, so the request that queues a job, every worker process and the tests share it.
//
// Invariants:
// - A job is taken by one worker at a time: the claim selects a due row FOR UPDATE SKIP LOCKED
//   (other workers skip it rather than wait) and stamps it with a fresh lease token in the same
//   transaction.
// - A result or a failure is written only under the token that took the job. A worker that lost
//   its lease (it ran past it and another took the job, or a re-run reset it) writes nothing: its
//   work is simply dropped.
// - A lease that runs out means the worker died: the job is due again, and the attempt it spent
//   counts.
// - A failed attempt keeps its reason on the job while the retry waits (doubling waits); after the
//   last attempt the job stays "failed" with the reason until someone queues it again.
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

export interface ClaimedJob {
  /** The key of the job's row (the image id, the signed version's id). */
  id: number;
  token: string;
  attempts: number;
}

type K = Knex | Knex.Transaction;
const micros = (ms: number) => Math.round(ms * 1000);

export interface JobQueue {
  readonly table: string;
  /** Queues (or re-queues, from the start) the job of `id` inside the caller's transaction; `extra` columns go on the row both ways. */
  enqueue(trx: K, id: number, extra?: Record<string, unknown>): Promise<void>;
  /** Takes the next due job: waiting and due, or running with a lease that ran out. */
  claim(db: Knex, worker: string, opts: Pick<JobOptions, 'leaseMs'>): Promise<ClaimedJob | null>;
  /**
   * If the job is still ours: runs `write` and marks the job done (with `done` columns), in one
   * transaction. False when the lease was lost (nothing written).
   */
  complete(db: Knex, job: ClaimedJob, write: (trx: Knex.Transaction) => Promise<void>, done?: Record<string, unknown>): Promise<boolean>;
  /** Records a failed attempt if the job is still ours: waits to retry, or fails for good after the last attempt (or at once when `final`). */
  fail(db: Knex, job: ClaimedJob, reason: string, opts: Pick<JobOptions, 'maxAttempts' | 'retryBaseMs'>, final?: boolean): Promise<'retry' | 'failed' | 'lost'>;
}

export function jobQueue(table: string, idColumn: string): JobQueue {
  const released = { lease_token: null, lease_until: null };
  return {
    table,
    async enqueue(trx, id, extra = {}) {
      const fresh = { status: 'waiting', attempts: 0, run_after: trx.fn.now(3), error: null, ...extra };
      await trx(table)
        .insert({ [idColumn]: id, ...fresh })
        .onConflict(idColumn)
        .merge({ ...fresh, ...released, worker: null, started_at: null, finished_at: null });
    },
    async claim(db, worker, opts) {
      return db.transaction(async (trx) => {
        const [rows] = (await trx.raw(
          `select ?? as id, attempts from ??
            where (status = 'waiting' and run_after <= now(3)) or (status = 'running' and lease_until < now(3))
            order by run_after, ??
            limit 1
            for update skip locked`,
          [idColumn, table, idColumn],
        )) as [{ id: number; attempts: number }[]];
        const row = rows[0];
        if (!row) return null;
        const token = crypto.randomUUID();
        await trx(table)
          .where({ [idColumn]: row.id })
          .update({
            status: 'running', attempts: row.attempts + 1, lease_token: token, worker: worker.slice(0, 120),
            lease_until: trx.raw('now(3) + interval ? microsecond', [micros(opts.leaseMs)]), started_at: trx.fn.now(3),
          });
        return { id: row.id, token, attempts: row.attempts + 1 };
      });
    },
    async complete(db, job, write, done = {}) {
      return db.transaction(async (trx) => {
        const own = await trx(table).where({ [idColumn]: job.id, lease_token: job.token, status: 'running' }).forUpdate().first(idColumn);
        if (!own) return false;
        await write(trx);
        await trx(table).where({ [idColumn]: job.id }).update({ status: 'done', ...released, error: null, finished_at: trx.fn.now(3), ...done });
        return true;
      });
    },
    async fail(db, job, reason, opts, final = false) {
      const last = final || job.attempts >= opts.maxAttempts;
      const delayMs = opts.retryBaseMs * 2 ** Math.max(0, job.attempts - 1);
      const error = reason.slice(0, 500);
      const n = await db(table)
        .where({ [idColumn]: job.id, lease_token: job.token, status: 'running' })
        .update(
          last
            ? { status: 'failed', ...released, error, finished_at: db.fn.now(3) }
            : { status: 'waiting', ...released, error, run_after: db.raw('now(3) + interval ? microsecond', [micros(delayMs)]) },
        );
      if (n === 0) return 'lost';
      return last ? 'failed' : 'retry';
    },
  };
}

/** A short, single-line reason for a job's row; the image library's own errors are numbers, so say which. */
export function errorText(err: unknown): string {
  if (typeof err === 'number') return `image library error ${err}`;
  const text = err instanceof Error ? err.message : String(err);
  return text.replace(/\s+/g, ' ').slice(0, 300) || 'unknown error';
}

export interface RunningJobLoop {
  /** Looks for due jobs now rather than at the next poll (after a request queued one). */
  wake(): void;
  /** Finishes the job in hand (if any) and stops. */
  stop(): Promise<void>;
}

/**
 * Runs `next` (take and run one due job; false when none was due) while there are jobs, and
 * looks again every `pollMs` (or when woken) when there are none. An error of the database (not
 * of a job, which `next` records on the job) is logged and the loop goes on.
 */
export function startJobLoop(next: () => Promise<boolean>, pollMs: number, log?: (message: string) => void): RunningJobLoop {
  let stopped = false;
  let woken = false;
  let timer: NodeJS.Timeout | undefined;
  let resume: (() => void) | undefined;
  const loop = (async () => {
    while (!stopped) {
      let worked = false;
      woken = false;
      try {
        worked = await next();
      } catch (err) {
        log?.(`worker error: ${errorText(err)}`);
      }
      if (worked || stopped || woken) continue;
      await new Promise<void>((resolve) => {
        resume = resolve;
        // A little jitter, so workers started together do not poll in step.
        timer = setTimeout(resolve, pollMs * (0.8 + 0.4 * Math.random()));
        timer.unref?.();
      });
    }
  })();
  const interrupt = () => {
    if (timer) clearTimeout(timer);
    resume?.();
  };
  return {
    wake() {
      woken = true;
      interrupt();
    },
    async stop() {
      stopped = true;
      interrupt();
      await loop;
    },
  };
}
