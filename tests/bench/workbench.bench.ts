// @bench-runs 1 (npm run bench: its figures are already medians / quantiles of its own rounds)
// The whole scoring workbench, as a technician uses it: a read with 1,000 marks on a
// 12-megapixel field (4000 × 3000) in the running app, marks placed by real mouse clicks in
// headless Chromium. Needs the services and the app running (npm start, or npm run bench).
// Run: npx tsx tests/bench/workbench.bench.ts [--placements N]
//
// Timed inside the page, from the start of the click's pointerup (where a mark is placed)
// until the workbench has committed (tally text changed) and the marks layer has been drawn
// synchronously: the React work of the page (canvas, tally, history, save queue) plus the
// Konva draw. The browser's own frame pacing (slow and environment-bound without a GPU) is
// left out, as in tests/bench/canvas.bench.ts, which times the canvas alone.
// Baseline in the same run: the same page with no marks on the image.
// Exits 0 whatever the numbers are (a measurement, not a test) unless something fails.
import type { Page } from '@playwright/test';
import knexFactory from 'knex';
import { knexConfig } from '../../knexfile';
import { generateField } from '@/lib/synthetic/generate-field';
import { markerRadiusForScale } from '@/lib/scoring/marker-draw';
import { fitToScreen } from '@/lib/scoring/viewport';
import { mulberry32 } from '@/lib/synthetic/prng';
import { APP_URL, signedIn, USERS, type Session } from '../integration/support/http';
import { arg, signedInPage, benchRead, emitFigures, ok, quantile, removeBenchReads, type BenchRead } from './support';

const W = 4000;
const H = 3000;
const MARKS = 1000;
const TARGET_MS = 16;
/** Must match FIT_PADDING in components/scoring/field-canvas.tsx. */
const FIT_PADDING = 12;

/** A collection with one generated 4000 × 3000 field and a first read holding `marks` marks. */
async function makeRead(s: Session, marks: number, seed: number): Promise<BenchRead> {
  const field = await generateField({ seed, width: W, height: H, cells: 80, format: 'jpeg', quality: 90 });
  const made = await benchRead(s, new Uint8Array(field.image), `bench-${seed}.jpg`);
  const detail = (await ok(s.json(`/api/reads/${made.readId}`), 'read detail')) as { read: { classSet: { classes: { key: string }[] } } };
  const keys = detail.read.classSet.classes.map((c) => c.key);
  const rnd = mulberry32(seed);
  for (let done = 0; done < marks; done += 100) {
    const changes = Array.from({ length: Math.min(100, marks - done) }, () => ({
      opId: crypto.randomUUID(), markId: crypto.randomUUID(), kind: 'upsert',
      payload: { imageId: String(made.imageId), x: rnd() * (W - 1), y: rnd() * (H - 1), classKey: keys[Math.floor(rnd() * keys.length)], tags: [] },
    }));
    const r = (await ok(s.json(`/api/reads/${made.readId}/sync`, 'POST', { changes }), 'marks')) as { acked: unknown[] };
    if (r.acked.length !== changes.length) throw new Error(`only ${r.acked.length} of ${changes.length} marks stored`);
  }
  return made;
}

declare global {
  interface Window {
    __placeTimes?: number[];
    Konva?: { stages: { getLayers(): { draw(): void }[] }[] };
  }
}

/** Clicks `placements` marks onto free spots of the field and returns the in-page times. */
async function placeMarks(s: Session, page: Page, readId: number, placements: number, seed: number): Promise<number[]> {
  const taken = ((await ok(s.json(`/api/reads/${readId}`), 'read detail')) as { marks: { x: number; y: number }[] }).marks;
  await page.goto(`${APP_URL}/reads/${readId}`);
  const canvas = page.getByTestId('field-canvas');
  await canvas.locator('canvas').first().waitFor();
  await page.waitForFunction(() => (window.Konva?.stages.length ?? 0) > 0, undefined, { timeout: 30_000 });
  await page.getByText('Loading image…').waitFor({ state: 'detached', timeout: 60_000 });
  await page.waitForLoadState('networkidle');
  // Timing hooks: pointerup (capture, before React sees it) starts the clock; the first DOM
  // change of the tally after it means React has committed; then the marks layer is drawn.
  await page.evaluate(() => {
    const times: number[] = [];
    window.__placeTimes = times;
    let start = 0;
    window.addEventListener('pointerup', () => (start = performance.now()), { capture: true });
    const tally = document.querySelector('section[aria-labelledby="tally-heading"]') ?? document.body;
    new MutationObserver(() => {
      if (!start) return;
      const layers = window.Konva!.stages[0]!.getLayers();
      layers[1]!.draw();
      times.push(performance.now() - start);
      start = 0;
    }).observe(tally, { subtree: true, childList: true, characterData: true });
  });
  const box = (await canvas.boundingBox())!;
  const vp = fitToScreen(W, H, box.width, box.height, FIT_PADDING);
  // A click near a mark selects it instead of placing one: pick spots clear of every mark.
  const clearance = 2 * 1.4 * markerRadiusForScale(vp.scale); // twice the canvas's hit radius
  const rnd = mulberry32(seed);
  const freeSpot = () => {
    for (let tries = 0; tries < 10_000; tries++) {
      const p = { x: W * (0.05 + 0.9 * rnd()), y: H * (0.05 + 0.9 * rnd()) };
      if (taken.every((m) => Math.hypot(m.x - p.x, m.y - p.y) > clearance)) return p;
    }
    throw new Error(`no free spot left on the field (${taken.length} marks, clearance ${clearance.toFixed(0)} px, scale ${vp.scale})`);
  };
  for (let i = 0; i < placements; i++) {
    const p = freeSpot();
    taken.push(p);
    await page.mouse.click(box.x + vp.x + p.x * vp.scale, box.y + vp.y + p.y * vp.scale);
    await page.waitForFunction((n) => (window.__placeTimes?.length ?? 0) >= n, i + 1, { timeout: 10_000 }).catch(async (err) => {
      if (process.env.BENCH_DEBUG) await page.screenshot({ path: '/tmp/workbench-bench.png' });
      throw err;
    });
    await page.waitForTimeout(30);
  }
  return page.evaluate(() => window.__placeTimes!.slice());
}

async function main() {
  const placements = arg('placements', 40);
  const s = await signedIn(USERS.tech);
  console.error('preparing two reads (1,000 marks and none) on generated 4000 × 3000 fields…');
  const full = await makeRead(s, MARKS, 9001);
  const empty = await makeRead(s, 0, 9002);
  const { browser, page, errors } = await signedInPage(s);
  try {
    await placeMarks(s, page, empty.readId, 5, 1); // warm-up (JIT, caches), not reported
    const withMarks = await placeMarks(s, page, full.readId, placements, 2);
    const noMarks = await placeMarks(s, page, empty.readId, placements, 3);
    if (errors.length) throw new Error(`page errors: ${errors.join('; ')}`);
    const f = (v: number) => v.toFixed(2);
    console.log(`\n### Scoring workbench in the app: place a mark by mouse click + repaint (headless Chromium, --disable-gpu, ${placements} placements)\n`);
    console.log('| case | n | p50 ms | p95 ms | 1,000 marks ÷ this (p50 / p95) |');
    console.log('|---|---|---|---|---|');
    console.log(`| read with ${MARKS} marks on a 4000 × 3000 field | ${withMarks.length} | ${f(quantile(withMarks, 0.5))} | ${f(quantile(withMarks, 0.95))} | — |`);
    console.log(`| read with no marks (baseline) | ${noMarks.length} | ${f(quantile(noMarks, 0.5))} | ${f(quantile(noMarks, 0.95))} | ${(quantile(withMarks, 0.5) / quantile(noMarks, 0.5)).toFixed(2)} / ${(quantile(withMarks, 0.95) / quantile(noMarks, 0.95)).toFixed(2)} |`);
    const p95 = quantile(withMarks, 0.95);
    console.log(`\np95 place + repaint in the workbench < ${TARGET_MS} ms: ${p95 < TARGET_MS ? 'PASS' : 'FAIL'} (${f(p95)} ms)`);
    emitFigures('workbench', [
      { name: `workbench click-to-mark + repaint, ${MARKS} marks, p95`, unit: 'ms', value: p95, baseline: { name: 'no marks', value: quantile(noMarks, 0.95) }, better: 'lower', target: { on: 'value', max: TARGET_MS }, details: { p50_ms: quantile(withMarks, 0.5) } },
    ]);
  } finally {
    await browser.close();
    // The benchmark's rows stay out of the demo.
    const db = knexFactory(knexConfig());
    try {
      await removeBenchReads(s, db, [full, empty]);
    } finally {
      await db.destroy();
    }
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
