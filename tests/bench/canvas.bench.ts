// Scoring canvas benchmark: place-a-mark and pan frame times with 1,000 marks on a
// 12-megapixel field (4000 × 3000), in headless Chromium, timed inside the page.
// Run: npx tsx tests/bench/canvas.bench.ts [--placements N] [--frames N] [--no-flush]
//
// - The page is tests/bench/canvas/harness.tsx bundled with esbuild: the real
//   components/scoring/field-canvas.tsx (3 layers, memoised marks, image pyramid),
//   fed marks the way the workbench does (a new array with one more mark).
// - "Place + repaint": React commit of the new mark list, a synchronous draw of the
//   marks layer, and a one-pixel read-back so rasterisation is inside the timing
//   (--no-flush leaves the read-back out: JavaScript and draw calls only).
// - "Pan frame": one viewport step (the canvas's own panBy), a synchronous draw of
//   every layer, read-back of each.
// - Baselines in the same run: the same canvas with 0 marks, and plain Konva without
//   React (one Circle per mark, the full-size image drawn as is, no pyramid).
// Exits 0 whatever the numbers are (a measurement, not a test) unless something fails.
import { createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from '@playwright/test';
import { build } from 'esbuild';
import { generateField } from '@/lib/synthetic/generate-field';

const here = dirname(fileURLToPath(import.meta.url));
const root = join(here, '..', '..');
const MARKS = 1000;
const TARGET_MS = 16;

function arg(name: string, fallback: number): number {
  const i = process.argv.indexOf(`--${name}`);
  const v = i >= 0 ? Number(process.argv[i + 1]) : fallback;
  if (!Number.isInteger(v) || v < 1) throw new Error(`--${name} must be a positive whole number`);
  return v;
}

function quantile(xs: number[], q: number): number {
  const s = [...xs].sort((a, b) => a - b);
  if (s.length === 0) return NaN;
  const pos = (s.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return s[lo]! + (s[hi]! - s[lo]!) * (pos - lo);
}

interface Timings {
  place: number[];
  commit: number[];
  pan: number[];
}

async function main() {
  const placements = arg('placements', 100);
  const frames = arg('frames', 120);

  const t0 = Date.now();
  const field = await generateField({ seed: 4242, width: 4000, height: 3000, cells: 80, format: 'jpeg', quality: 90 });
  const bundle = await build({
    entryPoints: [join(here, 'canvas', 'harness.tsx')],
    bundle: true,
    write: false,
    format: 'esm',
    platform: 'browser',
    target: 'chrome120',
    jsx: 'automatic',
    tsconfig: join(root, 'tsconfig.json'),
    define: { 'process.env.NODE_ENV': '"production"' },
    minify: true,
    logLevel: 'error',
  });
  const js = bundle.outputFiles[0]!.contents;
  const html = '<!doctype html><meta charset="utf-8"><title>canvas bench</title><body style="margin:0"><div id="root"></div><script type="module" src="/harness.js"></script>';
  console.error(`prepared field (${(field.image.length / 1e6).toFixed(1)} MB JPEG) and bundle (${(js.length / 1e3).toFixed(0)} kB) in ${Date.now() - t0} ms`);

  const server = createServer((req, res) => {
    const path = (req.url ?? '/').split('?')[0];
    if (path === '/') res.writeHead(200, { 'content-type': 'text/html' }).end(html);
    else if (path === '/harness.js') res.writeHead(200, { 'content-type': 'text/javascript' }).end(js);
    else if (path === '/field.jpg') res.writeHead(200, { 'content-type': 'image/jpeg' }).end(field.image);
    else res.writeHead(404).end();
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const port = (server.address() as AddressInfo).port;

  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--no-first-run'],
  });
  try {
    const page = await browser.newPage({ viewport: { width: 1200, height: 800 }, deviceScaleFactor: 1 });
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(String(e)));
    await page.goto(`http://127.0.0.1:${port}/${process.argv.includes('--no-flush') ? '?noflush' : ''}`);
    await page.waitForFunction(() => 'ready' in ((window as unknown as { __bench?: object }).__bench ?? {}));
    await page.evaluate(() => (window as unknown as { __bench: { ready(): Promise<void> } }).__bench.ready());
    type Bench = { runOurs(n: number, p: number, f: number): Promise<Timings>; runPlain(n: number, p: number, f: number): Promise<Timings> };
    const run = (fn: 'runOurs' | 'runPlain', n: number) =>
      page.evaluate(([f, n, p, fr]) => (window as unknown as { __bench: Bench }).__bench[f as 'runOurs'](n as number, p as number, fr as number), [fn, n, placements, frames] as const);
    // Warm-up (JIT, image decode caches), not reported.
    await run('runOurs', 200);
    const ours = await run('runOurs', MARKS);
    const empty = await run('runOurs', 0);
    const plain = await run('runPlain', MARKS);
    if (errors.length) throw new Error(`page errors: ${errors.join('; ')}`);

    const f = (v: number) => v.toFixed(2);
    const rows: [string, number[], number[] | null][] = [
      [`Place + repaint, FieldCanvas, ${MARKS} marks`, ours.place, null],
      ['… of which the React commit', ours.commit, null],
      ['Place + repaint, FieldCanvas, 0 marks (baseline)', empty.place, ours.place],
      [`Place + repaint, plain Konva no React, ${MARKS} marks (baseline)`, plain.place, ours.place],
      [`Pan frame, FieldCanvas, ${MARKS} marks`, ours.pan, null],
      ['Pan frame, FieldCanvas, 0 marks (baseline)', empty.pan, ours.pan],
      [`Pan frame, plain Konva no React, full-size image, ${MARKS} marks (baseline)`, plain.pan, ours.pan],
    ];
    console.log(`\n### Scoring canvas, ${MARKS} marks on a 4000 × 3000 field (headless Chromium, --disable-gpu; ${placements} placements, ${frames} pan frames)\n`);
    console.log('| case | n | p50 ms | p95 ms | FieldCanvas 1,000 marks ÷ this (p50 / p95) |');
    console.log('|---|---|---|---|---|');
    for (const [name, xs, cmp] of rows) {
      const ratio = cmp ? `${(quantile(cmp, 0.5) / quantile(xs, 0.5)).toFixed(2)} / ${(quantile(cmp, 0.95) / quantile(xs, 0.95)).toFixed(2)}` : '—';
      console.log(`| ${name} | ${xs.length} | ${f(quantile(xs, 0.5))} | ${f(quantile(xs, 0.95))} | ${ratio} |`);
    }
    const placeP95 = quantile(ours.place, 0.95);
    const panP95 = quantile(ours.pan, 0.95);
    console.log(`\np95 repaint < ${TARGET_MS} ms: ${placeP95 < TARGET_MS ? 'PASS' : 'FAIL'} (place + repaint p95 ${f(placeP95)} ms)`);
    console.log(`p95 pan frame < ${TARGET_MS} ms: ${panP95 < TARGET_MS ? 'PASS' : 'FAIL'} (pan p95 ${f(panP95)} ms)`);
  } finally {
    await browser.close();
    server.close();
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
