// Runs once when a server instance boots, before it answers anything (Next.js instrumentation,
// Node.js runtime only). It refuses an unsafe production start, then starts the instance's
// background workers, which take their jobs from the database: candidate detection
// (lib/candidates/app-worker.ts) and signed-report PDFs (lib/reports/pdf-worker-app.ts).
// Nothing runs during the build.
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME !== 'nodejs') return;
  const { refuseUnsafeProductionStart } = await import('./lib/config/refuse-unsafe-start');
  refuseUnsafeProductionStart();
  if (process.env.NEXT_PHASE === 'phase-production-build') return;
  const [{ startCandidateWorker }, { startReportPdfWorker }] = await Promise.all([import('./lib/candidates/app-worker'), import('./lib/reports/pdf-worker-app')]);
  startCandidateWorker();
  startReportPdfWorker();
}
