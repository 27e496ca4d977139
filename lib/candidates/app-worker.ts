// Starts this app instance's detection worker (from instrumentation.ts, Node.js runtime
// only). It has its own small database pool so a burst of jobs never takes connections
// from requests; CANDIDATE_WORKER=0 leaves an instance out (another must run one).
// Jobs run one at a time per instance. An instance stopped mid-job leaves the job under a
// lease; when the lease runs out another instance takes it again.
import { hostname } from 'node:os';
import knexFactory, { type Knex } from 'knex';
import { knexConfig } from '@/knexfile';
import { env } from '@/lib/env';
import { getBuffer } from '@/storage/s3-core';
import { startWorker, type RunningWorker } from './worker';

const globalForWorker = globalThis as unknown as { fieldmarkCandidateWorker?: { worker: RunningWorker; db: Knex } };

export function startCandidateWorker(): void {
  const e = env();
  if (e.CANDIDATE_WORKER !== '1' || globalForWorker.fieldmarkCandidateWorker) return;
  const base = knexConfig();
  const db = knexFactory({ ...base, pool: { min: 0, max: 2 } });
  const name = `${hostname()}:${process.pid}`;
  const worker = startWorker({
    db,
    readObject: getBuffer,
    name,
    pollMs: e.CANDIDATE_POLL_MS,
    options: { leaseMs: e.CANDIDATE_LEASE_MS, maxAttempts: e.CANDIDATE_MAX_ATTEMPTS, retryBaseMs: e.CANDIDATE_RETRY_MS },
    log: (m) => console.warn(`[fieldmark] candidates: ${m}`),
  });
  globalForWorker.fieldmarkCandidateWorker = { worker, db };
}
