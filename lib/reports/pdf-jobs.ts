// The report-PDF queue: one job per signed version in report_pdf_jobs (the shared queue's shape
// and invariants are in lib/jobs/queue.ts), the stored PDF on the version's row (object key,
// SHA-256, size). Takes its database and object store as arguments, so the signing transaction,
// every app instance's worker process, the demo seed and the tests share it.
//
// Beyond the shared invariants:
// - Never silently missing: every signed version has a job from its signing transaction on; a
//   failed attempt's reason is shown on the report page while the retry waits.
// - The PDF is rendered from the frozen snapshot alone, and the stored bytes never change (the
//   database refuses a second PDF for a version).
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import { errorText, jobQueue, startJobLoop, type ClaimedJob, type JobOptions, type RunningJobLoop } from '@/lib/jobs/queue';
import { parseReportSnapshot, type ReportSnapshot } from './snapshot';

export const PDF_JOB_DEFAULTS: JobOptions = { leaseMs: 120_000, maxAttempts: 4, retryBaseMs: 10_000 };

export const pdfQueue = jobQueue('report_pdf_jobs', 'report_id');

type K = Knex | Knex.Transaction;

/** Queues the PDF of a signed version, inside the signing transaction (or re-queues a failed one). */
export async function enqueuePdf(trx: K, reportId: number): Promise<void> {
  await pdfQueue.enqueue(trx, reportId, { ms: null });
}

/** Takes the next due job: waiting and due, or running with a lease that ran out. */
export const claimPdfJob = (db: Knex, worker: string, opts: Pick<JobOptions, 'leaseMs'> = PDF_JOB_DEFAULTS) => pdfQueue.claim(db, worker, opts);

export interface StoredPdf {
  key: string;
  sha256: string;
  bytes: number;
  ms: number;
}

/** Records the stored PDF on its version if the job is still ours; false when the lease was lost (nothing written). */
export async function completePdfJob(db: Knex, job: ClaimedJob, pdf: StoredPdf): Promise<boolean> {
  const write = async (trx: Knex.Transaction) => {
    await trx('report_versions').where({ id: job.id }).whereNull('pdf_sha256').update({ pdf_key: pdf.key, pdf_sha256: pdf.sha256, pdf_bytes: pdf.bytes, pdf_stored_at: trx.fn.now(3) });
  };
  return pdfQueue.complete(db, job, write, { ms: Math.round(pdf.ms) });
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
  options?: Partial<JobOptions>;
  log?: (message: string) => void;
}

export type PdfOutcome = { reportId: number; outcome: 'done' | 'retry' | 'failed' | 'lost' };

/** Takes and runs one due job; null when none is due. */
export async function processNextPdfJob(deps: PdfWorkerDeps): Promise<PdfOutcome | null> {
  const opts = { ...PDF_JOB_DEFAULTS, ...deps.options };
  const job = await pdfQueue.claim(deps.db, deps.name, opts);
  if (!job) return null;
  const fail = async (reason: string, final = false): Promise<PdfOutcome> => {
    const outcome = await pdfQueue.fail(deps.db, job, reason, opts, final);
    deps.log?.(`report ${job.id}: ${reason} (${outcome})`);
    return { reportId: job.id, outcome };
  };

  const row = await deps.db('report_versions').where({ id: job.id }).first('id', 'collection_id', 'version', 'snapshot', 'pdf_sha256');
  if (!row) return fail('The signed version no longer exists.', true);
  if (row.pdf_sha256) {
    // Stored already (e.g. by a worker whose lease ran out just after): nothing to redo.
    await completePdfJob(deps.db, job, { key: '', sha256: row.pdf_sha256, bytes: 0, ms: 0 });
    return { reportId: job.id, outcome: 'done' };
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
  return { reportId: job.id, outcome: stored ? 'done' : 'lost' };
}

export type RunningPdfWorker = RunningJobLoop;

/** Runs jobs one after another while there are any, and looks again every `pollMs` (or when woken) when there are none. */
export function startPdfWorker(deps: PdfWorkerDeps & { pollMs: number }): RunningPdfWorker {
  return startJobLoop(async () => (await processNextPdfJob(deps)) !== null, deps.pollMs, deps.log);
}
