// Serves the app: Next's own request handler behind a plain Node HTTP server. Next gives route
// handlers no way to learn the socket's address (its x-forwarded-for is whatever the client sent,
// when it sent one), and the sign-in limits key on that address, so this server passes it on in
// a header of its own that no client can set. It also runs the instance's worker process
// (candidate detection and report PDFs, scripts/workers.ts), so that their computing never holds
// up a request. Usage: node server.mjs [--dev]  (HOST, PORT; CANDIDATE_WORKER=0 and
// REPORT_PDF_WORKER=0 leave the worker process out)
import { fork } from 'node:child_process';
import { createServer } from 'node:http';
import { fileURLToPath } from 'node:url';

const dev = process.argv.includes('--dev');
process.env.NODE_ENV ??= dev ? 'development' : 'production';
const PEER_HEADER = 'x-fieldmark-peer';
// Tells the app (same process) that PEER_HEADER was written by this server, not by a client.
process.env.FIELDMARK_PEER_HEADER = PEER_HEADER;

const { default: next } = await import('next');
const hostname = process.env.HOST ?? '127.0.0.1';
const port = Number(process.env.PORT ?? 3000);
const app = next({ dev, hostname, port, turbopack: dev });
const handle = app.getRequestHandler();
await app.prepare();

const server = createServer((req, res) => {
  // Whatever a client sent under this name is replaced by the address of its socket.
  req.headers[PEER_HEADER] = req.socket.remoteAddress ?? '';
  handle(req, res);
});
// Idle keep-alive connections stay open longer than a load balancer's usual idle timeout (60 s),
// so the balancer, not the app, closes them: a client never sends on a socket the app is closing
// that moment (Node's default of 5 s makes that race common; common practice behind balancers).
server.keepAliveTimeout = 65_000;
server.headersTimeout = 66_000;
if (dev) server.on('upgrade', app.getUpgradeHandler());
server.listen(port, hostname, () => console.log(`[fieldmark] serving on http://${hostname}:${port} (${dev ? 'development' : 'production'})`));

// The worker process: restarted (after a pause) if it dies, told at once when a request queued a
// job (lib/workers/wake.ts), stopped with the server. It exits by itself if this process dies.
const root = fileURLToPath(new URL('.', import.meta.url));
const wantWorkers = process.env.CANDIDATE_WORKER !== '0' || process.env.REPORT_PDF_WORKER !== '0';
let workers = null;
let stopping = false;
function startWorkers() {
  workers = fork(`${root}scripts/workers.ts`, [], {
    cwd: root,
    execArgv: ['--import', 'tsx'],
    env: { ...process.env, FIELDMARK_INSTANCE: String(process.pid) },
  });
  workers.on('exit', (code, signal) => {
    workers = null;
    if (stopping) return;
    console.warn(`[fieldmark] the worker process stopped (${signal ?? `exit ${code}`}); starting it again in 2 s`);
    setTimeout(() => stopping || startWorkers(), 2000).unref();
  });
}
process.on('fieldmark:wake-worker', (kind) => {
  if (workers?.connected) workers.send({ wake: kind }, () => undefined);
});
if (wantWorkers && process.env.NEXT_PHASE !== 'phase-production-build') startWorkers();

const stop = () => {
  stopping = true;
  workers?.kill('SIGTERM');
  server.close(() => process.exit(0));
};
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
