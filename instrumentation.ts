// Runs once when a server instance boots, before it answers anything (Next.js instrumentation,
// Node.js runtime only). It refuses an unsafe production start, then starts the instance's
// candidate-detection worker, which takes jobs from the database (lib/candidates/app-worker.ts).
// Nothing runs during the build.
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME !== 'nodejs') return;
  const { refuseUnsafeProductionStart } = await import('./lib/config/refuse-unsafe-start');
  refuseUnsafeProductionStart();
  if (process.env.NEXT_PHASE === 'phase-production-build') return;
  const { startCandidateWorker } = await import('./lib/candidates/app-worker');
  startCandidateWorker();
}
