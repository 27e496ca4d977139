// @bench-runs 1 (npm run bench: its figures are already medians / quantiles of its own rounds)
// @bench-args --placements 20 --frames 20 (under npm run bench: the plain-Konva baseline draws the whole 12-MP image each time, slow without a GPU)
// Scoring canvas benchmark: place-a-mark and pan frame times with 1,000 marks on a
// 12-megapixel field (4000 × 3000), in headless Chromium, timed inside the page.
// Run: npx tsx tests/bench/canvas.bench.ts [--placements N] [--frames N] [--read-back]
//
// - The page is tests/bench/canvas/harness.tsx bundled with esbuild: the real
//   components/scoring/field-canvas.tsx (3 layers, every mark drawn by one shape, image pyramid),
//   fed marks the way the workbench does (a new array with one more mark).
// - "Place + repaint": React commit of the new mark list, a synchronous draw of the
//   marks layer (JavaScript and canvas draw calls).
// - "Pan": one step of the canvas's own panBy (stage transform) and a synchronous
//   draw of every layer. Also the rAF-to-rAF interval while panning every frame, as
//   headless Chromium paces it (software compositing makes that environment-bound).
// - --read-back adds a pessimistic table: both again with a one-pixel read-back after
//   each synchronous draw, so software rasterisation falls inside the timing (slow).
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
import { arg, emitFigures, quantile } from './support';

const here = dirname(fileURLToPath(import.meta.url));
const root = join(here, '..', '..');
const MARKS = 1000;
const TARGET_MS = 16;

interface Timings {
  place: number[];
  commit: number[];
  pan: number[];
  panFrames: number[];
}

async function main() {
  const placements = arg('placements', 50);
  const frames = arg('frames', 50);

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
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-background-networking',
      '--disable-component-update',
      '--no-first-run',
      ...(process.env.BENCH_CHROMIUM_ARGS ?? '').split(' ').filter(Boolean),
    ],
  });
  try {
    const page = await browser.newPage({ viewport: { width: 1200, height: 800 }, deviceScaleFactor: 1 });
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(String(e)));
    if (process.env.BENCH_DEBUG) page.on('console', (m) => console.error(`page: ${m.text()}`));
    await page.goto(`http://127.0.0.1:${port}/`);
    await page.waitForFunction(() => 'ready' in ((window as unknown as { __bench?: object }).__bench ?? {}));
    await page.evaluate(() => (window as unknown as { __bench: { ready(): Promise<void> } }).__bench.ready());
    type Bench = Record<'runOurs' | 'runPlain', (n: number, p: number, f: number, flush: boolean) => Promise<Timings>>;
    const run = (fn: 'runOurs' | 'runPlain', n: number, flush: boolean, p = placements, fr = frames) => {
      console.error(`running ${fn} with ${n} marks${flush ? ', read-back' : ''}`);
      return page.evaluate(
        ([f, n, p, fr, fl]) => (window as unknown as { __bench: Bench }).__bench[f as 'runOurs'](n as number, p as number, fr as number, fl as boolean),
        [fn, n, p, fr, flush] as const,
      );
    };
    // Warm-up (JIT, image caches), not reported. Runs without read-back first: once a
    // canvas has been read back, the browser may keep it in a slower mode.
    await run('runOurs', 200, false, 10, 10);
    const ours = await run('runOurs', MARKS, false);
    const empty = await run('runOurs', 0, false);
    const plain = await run('runPlain', MARKS, false);
    // Read-back runs are slow here (minutes): only on request.
    const readBack = process.argv.includes('--read-back');
    const none: Timings = { place: [], commit: [], pan: [], panFrames: [] };
    const oursR = readBack ? await run('runOurs', MARKS, true) : none;
    const emptyR = readBack ? await run('runOurs', 0, true) : none;
    const plainR = readBack ? await run('runPlain', MARKS, true) : none;
    if (errors.length) throw new Error(`page errors: ${errors.join('; ')}`);

    const f = (v: number) => v.toFixed(2);
    const q = (xs: number[], p: number) => quantile(xs, p);
    type Row = [string, number[], number[] | null];
    const table = (title: string, rows: Row[]) => {
      console.log(`\n#### ${title}\n`);
      console.log('| case | n | p50 ms | p95 ms | FieldCanvas 1,000 marks ÷ this (p50 / p95) |');
      console.log('|---|---|---|---|---|');
      for (const [name, xs, cmp] of rows) {
        if (xs.length === 0) continue;
        const ratio = cmp ? `${(q(cmp, 0.5) / q(xs, 0.5)).toFixed(2)} / ${(q(cmp, 0.95) / q(xs, 0.95)).toFixed(2)}` : '—';
        console.log(`| ${name} | ${xs.length} | ${f(q(xs, 0.5))} | ${f(q(xs, 0.95))} | ${ratio} |`);
      }
    };
    console.log(`\n### Scoring canvas, ${MARKS} marks on a 4000 × 3000 field (headless Chromium, --disable-gpu, 1100 × 720 canvas; ${placements} placements, ${frames} pan frames)`);
    table('Place a mark + repaint (React commit + synchronous Konva draw of the marks layer)', [
      [`FieldCanvas, ${MARKS} marks`, ours.place, null],
      ['… of which the React commit', ours.commit, null],
      ['FieldCanvas, 0 marks (baseline)', empty.place, ours.place],
      [`plain Konva without React, ${MARKS} Circles (baseline)`, plain.place, ours.place],
    ]);
    table('Pan one step + synchronous Konva draw of every layer (the canvas\'s own panBy)', [
      [`FieldCanvas, ${MARKS} marks`, ours.pan, null],
      ['FieldCanvas, 0 marks (baseline)', empty.pan, ours.pan],
      [`plain Konva without React, full-size image, ${MARKS} Circles (baseline)`, plain.pan, ours.pan],
    ]);
    table('Pan as headless Chromium paces it: rAF-to-rAF interval while panning every frame (environment-bound: compare with the 0-mark row)', [
      [`FieldCanvas, ${MARKS} marks`, ours.panFrames, null],
      ['FieldCanvas, 0 marks (baseline)', empty.panFrames, ours.panFrames],
      [`plain Konva without React, full-size image, ${MARKS} Circles (baseline)`, plain.panFrames, ours.panFrames],
    ]);
    if (readBack) table('Pessimistic: the same with a one-pixel read-back after each draw, forcing software rasterisation inside the timing', [
      [`Place + repaint, FieldCanvas, ${MARKS} marks`, oursR.place, null],
      ['Place + repaint, FieldCanvas, 0 marks (baseline: fixed read-back cost)', emptyR.place, oursR.place],
      [`Place + repaint, plain Konva, ${MARKS} Circles (baseline)`, plainR.place, oursR.place],
      [`Pan step + draw of every layer, FieldCanvas, ${MARKS} marks`, oursR.pan, null],
      ['Pan step, FieldCanvas, 0 marks (baseline)', emptyR.pan, oursR.pan],
      [`Pan step, plain Konva, full-size image, ${MARKS} Circles (baseline)`, plainR.pan, oursR.pan],
    ]);
    const placeP95 = q(ours.place, 0.95);
    const panP95 = q(ours.pan, 0.95);
    console.log(`\np95 repaint < ${TARGET_MS} ms: ${placeP95 < TARGET_MS ? 'PASS' : 'FAIL'} (place + repaint p95 ${f(placeP95)} ms)`);
    console.log(`p95 pan frame < ${TARGET_MS} ms: ${panP95 < TARGET_MS ? 'PASS' : 'FAIL'} (pan step + draw p95 ${f(panP95)} ms)`);
    emitFigures('canvas', [
      { name: `canvas place + repaint, ${MARKS} marks, p95`, unit: 'ms', value: placeP95, baseline: { name: '0 marks', value: q(empty.place, 0.95) }, better: 'lower', target: { on: 'value', max: TARGET_MS }, details: { p50_ms: q(ours.place, 0.5), plain_konva_p95_ms: q(plain.place, 0.95) } },
      { name: `canvas pan step + draw, ${MARKS} marks, p95`, unit: 'ms', value: panP95, baseline: { name: '0 marks', value: q(empty.pan, 0.95) }, better: 'lower', target: { on: 'value', max: TARGET_MS }, details: { p50_ms: q(ours.pan, 0.5), plain_konva_p95_ms: q(plain.pan, 0.95) } },
    ]);
  } finally {
    await browser.close();
    server.close();
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
