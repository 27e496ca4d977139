// @bench-runs 1 (npm run bench: its figures are already medians / quantiles of its own rounds)
// server.mjs (what npm start serves: Next's handler behind a Node server that passes the socket's
// address on) against Next's own `next start`, on the same build, in the same run, rounds
// interleaved. The request is a mark sync without a session (answered 401 by route(), after its
// cross-site check): the whole framework path, no database work.
// Needs the app running (npm start). Usage: npx tsx tests/bench/server.bench.ts [--rounds 10] [--requests 300] [--concurrency 20]
import { spawn } from 'node:child_process';
import { arg, emitFigures, quantile } from './support';

const APP_URL = process.env.APP_URL ?? 'http://localhost:3000';
const rounds = arg('rounds', 10);
const requests = arg('requests', 300);
const concurrency = arg('concurrency', 20);
const otherPort = Number(new URL(APP_URL).port || 3000) + 50;

async function round(base: string): Promise<number> {
  let sent = 0;
  const t0 = performance.now();
  await Promise.all(
    Array.from({ length: concurrency }, async () => {
      while (sent++ < requests) {
        const r = await fetch(`${base}/api/reads/1/sync`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{"changes":[]}' });
        await r.arrayBuffer();
        if (r.status !== 401) throw new Error(`${base} answered ${r.status}, not 401`);
      }
    }),
  );
  return requests / ((performance.now() - t0) / 1000);
}

async function waitFor(base: string) {
  for (let i = 0; i < 120; i++) {
    if (await fetch(`${base}/api/health`).then((r) => r.ok, () => false)) return;
    await new Promise((r) => setTimeout(r, 500));
  }
  throw new Error(`${base} did not come up`);
}

const nextStart = spawn('npx', ['next', 'start', '-H', '127.0.0.1', '-p', String(otherPort)], { stdio: 'ignore', detached: true });
try {
  const other = `http://127.0.0.1:${otherPort}`;
  await Promise.all([waitFor(APP_URL), waitFor(other)]);
  const rate = { served: [] as number[], next: [] as number[] };
  for (let i = 0; i < rounds; i++) {
    rate.served.push(await round(APP_URL));
    rate.next.push(await round(other));
  }
  const med = (xs: number[]) => quantile(xs, 0.5);
  console.log(`Requests per second, ${rounds} interleaved rounds of ${requests} requests, ${concurrency} at a time`);
  console.log('| server | median req/s | p10 | p90 | vs next start |');
  console.log('|---|---|---|---|---|');
  for (const [name, xs] of [['next start (baseline)', rate.next], ['server.mjs (npm start)', rate.served]] as const) {
    console.log(`| ${name} | ${med(xs).toFixed(0)} | ${quantile(xs, 0.1).toFixed(0)} | ${quantile(xs, 0.9).toFixed(0)} | ${(med(xs) / med(rate.next)).toFixed(2)} |`);
  }
  emitFigures('server', [
    { name: 'server.mjs req/s (401 path)', unit: 'req/s', value: med(rate.served), baseline: { name: 'next start', value: med(rate.next) }, better: 'higher', target: { on: 'ratio', min: 0.9 }, details: { p10: quantile(rate.served, 0.1), p90: quantile(rate.served, 0.9) } },
  ]);
} finally {
  if (nextStart.pid) process.kill(-nextStart.pid);
}
