// Starts this app instance's report-PDF worker (from instrumentation.ts, Node.js runtime only),
// with a small database pool of its own so rendering never takes connections from requests.
// REPORT_PDF_WORKER=0 leaves an instance out (another must run one). The signing route wakes it
// after its transaction commits, so a PDF is usually stored a second or two after signing.
import { hostname } from 'node:os';
import knexFactory, { type Knex } from 'knex';
import { knexConfig } from '@/knexfile';
import { env } from '@/lib/env';
import { put } from '@/storage/s3-core';
import { startPdfWorker, type RunningPdfWorker } from './pdf-jobs';

const globalForWorker = globalThis as unknown as { fieldmarkPdfWorker?: { worker: RunningPdfWorker; db: Knex } };

export function startReportPdfWorker(): void {
  const e = env();
  if (e.REPORT_PDF_WORKER !== '1' || globalForWorker.fieldmarkPdfWorker) return;
  const db = knexFactory({ ...knexConfig(), pool: { min: 0, max: 2 } });
  const worker = startPdfWorker({
    db,
    put,
    // Loaded on first use: react-pdf and the fonts are not needed until a report is signed.
    render: async (snapshot) => (await import('./pdf/render')).renderReportPdf(snapshot, { appUrl: e.APP_URL }),
    name: `${hostname()}:${process.pid}`,
    pollMs: e.REPORT_PDF_POLL_MS,
    options: { leaseMs: e.REPORT_PDF_LEASE_MS, maxAttempts: e.REPORT_PDF_MAX_ATTEMPTS, retryBaseMs: e.REPORT_PDF_RETRY_MS },
    log: (m) => console.warn(`[fieldmark] report PDFs: ${m}`),
  });
  globalForWorker.fieldmarkPdfWorker = { worker, db };
}

/** After a signing commits: look for the new job now (a no-op where this instance runs no worker). */
export function wakeReportPdfWorker(): void {
  globalForWorker.fieldmarkPdfWorker?.worker.wake();
}
