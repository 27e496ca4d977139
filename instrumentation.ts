// Runs once when the server boots, before it answers anything (Node.js runtime only).
export async function register() {
  if (process.env.NEXT_RUNTIME === 'nodejs') {
    const { refuseUnsafeProductionStart } = await import('./lib/config/refuse-unsafe-start');
    refuseUnsafeProductionStart();
  }
}
