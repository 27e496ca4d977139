// The report-PDF queue in MariaDB: one job per signed version in report_pdf_jobs, the stored PDF
// on the version's row (object key, SHA-256, size). Takes its database and object store as
// arguments, so the signing transaction, every app instance's worker, the demo seed and the tests
// share it. Kept to itself on purpose (same shape as the candidate-detection queue), so the two
// queues can later become one.
//
// Invariants:
// - A job is taken by one worker at a time: the claim selects a due row FOR UPDATE SKIP LOCKED
//   (other workers skip it rather than wait) and stamps it with a fresh lease token in the same
//   transaction.
// - A result or a failure is written only under the token that took the job; a worker that lost
//   its lease (it ran past it and another took the job) writes nothing.
// - A lease that runs out means the worker died: the job is due again, and its attempt counts.
// - Never silently missing: every signed version has a job from its signing transaction on; a
//   failed attempt keeps its reason on the job (shown on the report page) while the retry waits,
//   and after the last attempt the job stays "failed" with the reason until someone retries it.
// - The PDF is rendered from the frozen snapshot alone, and the stored bytes never change (the
//   database refuses a second PDF for a version).
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import { parseReportSnapshot, type ReportSnapshot } from './snapshot';

export const PDF_JOB_STATUSES = ['waiting', 'running', 'done', 'failed'] as const;
export type PdfJobStatus = (typeof PDF_JOB_STATUSES)[number];

export interface PdfJobOptions {
  /** How long a worker may hold a job before another may take it, ms. */
  leaseMs: number;
  /** Attempts before a job fails for good. */
  maxAttempts: number;
  /** Wait before the first retry, ms; doubled for each later one. */
  retryBaseMs: number;
}

export const PDF_JOB_DEFAULTS: PdfJobOptions = { leaseMs: 120_000, maxAttempts: 4, retryBaseMs: 10_000 };

export interface ClaimedPdfJob {
  reportId: number;
  token: string;
  attempts: number;
}

type K = Knex | Knex.Transaction;

/** Queues the PDF of a signed version, inside the signing transaction (or re-queues a failed one). */
export async function enqueuePdf(trx: K, reportId: number): Promise<void> {
  await trx('report_pdf_jobs')
    .insert({ report_id: reportId, status: 'waiting', attempts: 0, run_after: trx.fn.now(3) })
    .onConflict('report_id')
    .merge({ status: 'waiting', attempts: 0, run_after: trx.fn.now(3), lease_token: null, lease_until: null, worker: null, error: null, started_at: null, finished_at: null });
}

/** Takes the next due job: waiting and due, or running with a lease that ran out. */
export async function claimPdfJob(db: Knex, worker: string, opts: Pick<PdfJobOptions, 'leaseMs'> = PDF_JOB_DEFAULTS): Promise<ClaimedPdfJob | null> {
  return db.transaction(async (trx) => {
    const [rows] = (await trx.raw(
      `select report_id, attempts from report_pdf_jobs
        where (status = 'waiting' and run_after <= now(3)) or (status = 'running' and lease_until < now(3))
        order by run_after, report_id
        limit 1
        for update skip locked`,
    )) as [{ report_id: number; attempts: number }[]];
    const row = rows[0];
    if (!row) return null;
    const token = crypto.randomUUID();
    await trx('report_pdf_jobs')
      .where({ report_id: row.report_id })
      .update({
        status: 'running', attempts: row.attempts + 1, lease_token: token, worker: worker.slice(0, 120),
        lease_until: trx.raw('now(3) + interval ? microsecond', [Math.round(opts.leaseMs * 1000)]), started_at: trx.fn.now(3),
      });
    return { reportId: row.report_id, token, attempts: row.attempts + 1 };
  });
}

export interface StoredPdf {
  key: string;
  sha256: string;
  bytes: number;
  ms: number;
}

/** Records the stored PDF on its version if the job is still ours; false when the lease was lost (nothing written). */
export async function completePdfJob(db: Knex, job: ClaimedPdfJob, pdf: StoredPdf): Promise<boolean> {
  return db.transaction(async (trx) => {
    const own = await trx('report_pdf_jobs').where({ report_id: job.reportId, lease_token: job.token, status: 'running' }).forUpdate().first('report_id');
    if (!own) return false;
    await trx('report_versions').where({ id: job.reportId }).whereNull('pdf_sha256').update({ pdf_key: pdf.key, pdf_sha256: pdf.sha256, pdf_bytes: pdf.bytes, pdf_stored_at: trx.fn.now(3) });
    await trx('report_pdf_jobs')
      .where({ report_id: job.reportId })
      .update({ status: 'done', lease_token: null, lease_until: null, error: null, ms: Math.round(pdf.ms), finished_at: trx.fn.now(3) });
    return true;
  });
}

/**
 * Records a failed attempt if the job is still ours: waits to retry with the reason shown, or
 * fails for good after the last attempt (or at once when `final`, e.g. the snapshot is unreadable).
 */
export async function failPdfJob(db: Knex, job: ClaimedPdfJob, reason: string, opts: Pick<PdfJobOptions, 'maxAttempts' | 'retryBaseMs'> = PDF_JOB_DEFAULTS, final = false): Promise<'retry' | 'failed' | 'lost'> {
  const last = final || job.attempts >= opts.maxAttempts;
  const delayMs = opts.retryBaseMs * 2 ** Math.max(0, job.attempts - 1);
  const n = await db('report_pdf_jobs')
    .where({ report_id: job.reportId, lease_token: job.token, status: 'running' })
    .update(
      last
        ? { status: 'failed', lease_token: null, lease_until: null, error: reason.slice(0, 500), finished_at: db.fn.now(3) }
        : { status: 'waiting', lease_token: null, lease_until: null, error: reason.slice(0, 500), run_after: db.raw('now(3) + interval ? microsecond', [Math.round(delayMs * 1000)]) },
    );
  if (n === 0) return 'lost';
  return last ? 'failed' : 'retry';
}

/** The object key of a version's PDF (with a random part: a re-render after a lost lease never overwrites another's object). */
export const pdfObjectKey = (r: { collectionId: number; reportId: number; version: number }) =>
  `reports/${r.collectionId}/${r.reportId}-v${r.version}-${crypto.randomUUID().slice(0, 8)}.pdf`;

export const sha256Hex = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex');

export interface PdfWorkerDeps {
  db: Knex;
  /** Stores the PDF's bytes in the object store. */
  put: (key: string, body: Buffer, contentType: string) => Promise<void>;
  /** Renders the frozen snapshot (lib/reports/pdf/render.tsx in the app). */
  render: (snapshot: ReportSnapshot) => Promise<Buffer>;
  /** Shown on the job while it runs (which instance has it). */
  name: string;
  options?: Partial<PdfJobOptions>;
  log?: (message: string) => void;
}

export type PdfOutcome = { reportId: number; outcome: 'done' | 'retry' | 'failed' | 'lost' };

/** A short, single-line reason. */
function errorText(err: unknown): string {
  const text = err instanceof Error ? err.message : String(err);
  return text.replace(/\s+/g, ' ').slice(0, 300) || 'unknown error';
}

/** Takes and runs one due job; null when none is due. */
export async function processNextPdfJob(deps: PdfWorkerDeps): Promise<PdfOutcome | null> {
  const opts = { ...PDF_JOB_DEFAULTS, ...deps.options };
  const job = await claimPdfJob(deps.db, deps.name, opts);
  if (!job) return null;
  const fail = async (reason: string, final = false): Promise<PdfOutcome> => {
    const outcome = await failPdfJob(deps.db, job, reason, opts, final);
    deps.log?.(`report ${job.reportId}: ${reason} (${outcome})`);
    return { reportId: job.reportId, outcome };
  };

  const row = await deps.db('report_versions').where({ id: job.reportId }).first('id', 'collection_id', 'version', 'snapshot', 'pdf_sha256');
  if (!row) return fail('The signed version no longer exists.', true);
  if (row.pdf_sha256) {
    // Stored already (e.g. by a worker whose lease ran out just after): nothing to redo.
    await completePdfJob(deps.db, job, { key: '', sha256: row.pdf_sha256, bytes: 0, ms: 0 });
    return { reportId: job.reportId, outcome: 'done' };
  }
  let snapshot: ReportSnapshot;
  try {
    snapshot = parseReportSnapshot(row.snapshot);
  } catch (err) {
    return fail(`The signed snapshot cannot be read: ${errorText(err)}`, true);
  }
  const t0 = performance.now();
  let pdf: Buffer;
  try {
    pdf = await deps.render(snapshot);
  } catch (err) {
    return fail(`The PDF could not be rendered: ${errorText(err)}`);
  }
  const key = pdfObjectKey({ collectionId: row.collection_id, reportId: row.id, version: row.version });
  try {
    await deps.put(key, pdf, 'application/pdf');
  } catch (err) {
    return fail(`The PDF could not be stored in the object store: ${errorText(err)}`);
  }
  const stored = await completePdfJob(deps.db, job, { key, sha256: sha256Hex(pdf), bytes: pdf.length, ms: performance.now() - t0 });
  return { reportId: job.reportId, outcome: stored ? 'done' : 'lost' };
}

export interface RunningPdfWorker {
  /** Looks for due jobs now rather than at the next poll (after a signing commits). */
  wake(): void;
  /** Finishes the job in hand (if any) and stops. */
  stop(): Promise<void>;
}

/**
 * Runs jobs one after another while there are any, and looks again every `pollMs` (or when woken)
 * when there are none. An error of the database (not of a job) is logged and the loop goes on.
 */
export function startPdfWorker(deps: PdfWorkerDeps & { pollMs: number }): RunningPdfWorker {
  let stopped = false;
  let timer: NodeJS.Timeout | undefined;
  let wake: (() => void) | undefined;
  let woken = false;
  const loop = (async () => {
    while (!stopped) {
      let worked = false;
      woken = false;
      try {
        worked = (await processNextPdfJob(deps)) !== null;
      } catch (err) {
        deps.log?.(`worker error: ${errorText(err)}`);
      }
      if (worked || stopped || woken) continue;
      await new Promise<void>((resolve) => {
        wake = resolve;
        // A little jitter, so instances started together do not poll in step.
        timer = setTimeout(resolve, deps.pollMs * (0.8 + 0.4 * Math.random()));
        timer.unref?.();
      });
    }
  })();
  return {
    wake() {
      woken = true;
      if (timer) clearTimeout(timer);
      wake?.();
    },
    async stop() {
      stopped = true;
      if (timer) clearTimeout(timer);
      wake?.();
      await loop;
    },
  };
}
