// Runs once when a server instance starts (Next.js instrumentation). Every instance runs
// a candidate-detection worker that takes jobs from the database (lib/candidates/app-worker.ts);
// nothing runs during the build.
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME !== 'nodejs' || process.env.NEXT_PHASE === 'phase-production-build') return;
  const { startCandidateWorker } = await import('./lib/candidates/app-worker');
  startCandidateWorker();
}
