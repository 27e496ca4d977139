// The worker process of an app instance: candidate detection and report PDFs (lib/workers/
// instance.ts). server.mjs starts it beside the HTTP server (node --import tsx), passes on
// "a job was queued" messages, restarts it if it dies and stops it with the server. It stops by
// itself when the server goes (the IPC channel closes), so it never outlives its instance.
// Run alone (npm run workers) it serves as a worker-only instance.
import { startInstanceWorkers } from '@/lib/workers/instance';
import type { WorkerKind } from '@/lib/workers/wake';

const workers = startInstanceWorkers(process.env.FIELDMARK_INSTANCE ?? String(process.ppid));
console.log(`[fieldmark] worker process ${process.pid}: ${workers.kinds.join(', ') || 'no workers (CANDIDATE_WORKER=0, REPORT_PDF_WORKER=0)'}`);

process.on('message', (m: { wake?: WorkerKind }) => {
  if (m?.wake) workers.wake(m.wake);
});

let stopping = false;
async function stop() {
  if (stopping) return;
  stopping = true;
  // A job in hand is finished first; one that takes too long is left to its lease.
  const timer = setTimeout(() => process.exit(0), 10_000);
  await workers.stop().catch(() => undefined);
  clearTimeout(timer);
  process.exit(0);
}
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
process.on('disconnect', stop);
