// The background workers of one app instance, run in a process of their own (scripts/workers.ts,
// started and restarted by server.mjs) so that detection and PDF rendering never hold up the
// instance's requests: both compute for hundreds of milliseconds at a time. Each worker has its
// own small database pool. CANDIDATE_WORKER=0 / REPORT_PDF_WORKER=0 leave an instance's process
// without that worker (another instance must run one). Jobs run one at a time per worker; an
// instance stopped mid-job leaves the job under a lease, and when the lease runs out any worker
// takes it again.
import { hostname } from 'node:os';
import knexFactory, { type Knex } from 'knex';
import { knexConfig } from '@/knexfile';
import { startWorker } from '@/lib/candidates/worker';
import { env } from '@/lib/env';
import type { RunningJobLoop } from '@/lib/jobs/queue';
import { startPdfWorker } from '@/lib/reports/pdf-jobs';
import { getBuffer, put } from '@/storage/s3-core';
import type { WorkerKind } from './wake';

export interface InstanceWorkers {
  /** Which workers run here. */
  kinds: WorkerKind[];
  wake(kind: WorkerKind): void;
  /** Finishes the jobs in hand and closes the pools. */
  stop(): Promise<void>;
}

/** `instance` names the app instance (its pid) on the jobs this process takes: host:instance:worker pid. */
export function startInstanceWorkers(instance: string): InstanceWorkers {
  const e = env();
  const name = `${hostname()}:${instance}:${process.pid}`;
  const running = new Map<WorkerKind, { loop: RunningJobLoop; db: Knex }>();
  const pool = () => knexFactory({ ...knexConfig(), pool: { min: 0, max: 2 } });
  if (e.CANDIDATE_WORKER === '1') {
    const db = pool();
    const loop = startWorker({
      db,
      readObject: getBuffer,
      name,
      pollMs: e.CANDIDATE_POLL_MS,
      options: { leaseMs: e.CANDIDATE_LEASE_MS, maxAttempts: e.CANDIDATE_MAX_ATTEMPTS, retryBaseMs: e.CANDIDATE_RETRY_MS },
      log: (m) => console.warn(`[fieldmark] candidates: ${m}`),
    });
    running.set('candidates', { loop, db });
  }
  if (e.REPORT_PDF_WORKER === '1') {
    const db = pool();
    const loop = startPdfWorker({
      db,
      put,
      // Loaded on first use: react-pdf and the fonts are not needed until a report is signed.
      render: async (snapshot) => (await import('@/lib/reports/pdf/render')).renderReportPdf(snapshot, { appUrl: e.APP_URL }),
      name,
      pollMs: e.REPORT_PDF_POLL_MS,
      options: { leaseMs: e.REPORT_PDF_LEASE_MS, maxAttempts: e.REPORT_PDF_MAX_ATTEMPTS, retryBaseMs: e.REPORT_PDF_RETRY_MS },
      log: (m) => console.warn(`[fieldmark] report PDFs: ${m}`),
    });
    running.set('report-pdf', { loop, db });
  }
  return {
    kinds: [...running.keys()],
    wake: (kind) => running.get(kind)?.loop.wake(),
    async stop() {
      await Promise.all(
        [...running.values()].map(async ({ loop, db }) => {
          await loop.stop();
          await db.destroy();
        }),
      );
    },
  };
}
