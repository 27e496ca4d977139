// Runs once when a server instance boots, before it answers anything (Next.js instrumentation,
// Node.js runtime only): it refuses an unsafe production start. The instance's background
// workers (candidate detection, signed-report PDFs) run in a process of their own, started by
// server.mjs (scripts/workers.ts). Nothing runs during the build.
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME !== 'nodejs') return;
  const { refuseUnsafeProductionStart } = await import('./lib/config/refuse-unsafe-start');
  refuseUnsafeProductionStart();
}
