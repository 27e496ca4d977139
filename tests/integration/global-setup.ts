// Refuses to run against anything but the local test services, and waits for the app.
export default async function setup() {
  const host = process.env.DB_HOST ?? '';
  if (!['127.0.0.1', 'localhost'].includes(host)) throw new Error(`Integration tests only run against a local database (DB_HOST=${host}).`);
  if (process.env.FIELDMARK_PROFILE !== 'test') throw new Error('Run integration tests through `npm test` (FIELDMARK_PROFILE=test), never on the demo data.');
  const url = process.env.APP_URL;
  if (!url) throw new Error('APP_URL is not set; run through npm test.');
  for (let i = 0; i < 60; i++) {
    try {
      const r = await fetch(`${url}/api/health`);
      if (r.ok) return;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 1000));
  }
  throw new Error(`The app at ${url} did not answer /api/health.`);
}
