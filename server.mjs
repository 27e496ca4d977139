// Serves the app: Next's own request handler behind a plain Node HTTP server. Next gives route
// handlers no way to learn the socket's address (its x-forwarded-for is whatever the client sent,
// when it sent one), and the sign-in limits key on that address, so this server passes it on in
// a header of its own that no client can set. Usage: node server.mjs [--dev]  (HOST, PORT)
import { createServer } from 'node:http';

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

const stop = () => server.close(() => process.exit(0));
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
