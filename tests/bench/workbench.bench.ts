// @bench-runs 1 (npm run bench: its figures are already medians / quantiles of its own rounds)
// The whole scoring workbench, as a technician uses it: a read with 1,000 marks on a
// 12-megapixel field (4000 × 3000) in the running app, marks placed by real mouse clicks in
// headless Chromium. Needs the services and the app running (npm start, or npm run bench).
// Run: npx tsx tests/bench/workbench.bench.ts [--placements N] [--pan-steps N]
//
// Timed inside the page, from the start of the click's pointerup (where a mark is placed)
// until the workbench has committed (tally text changed) and the marks layer has been drawn
// synchronously: the React work of the page (canvas, tally, history, save queue) plus the
// Konva draw. The browser's own frame pacing (slow and environment-bound without a GPU) is
// left out, as in tests/bench/canvas.bench.ts, which times the canvas alone.
// Pan: the view dragged by the mouse, timed from each pointermove to the end of a synchronous
// draw of every layer after the canvas's own handler has moved the stage.
// Baseline in the same run: the same page with no marks on the image.
// The page is scrolled so that the whole canvas is in the 1366 × 900 window before any click (the
// banners and the found-cells bar push its lower edge below the window otherwise).
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
    __panTimes?: number[];
    __panXs?: number[];
    Konva?: { stages: { getLayers(): { draw(): void }[]; x(): number }[] };
  }
}

/** The read's page, loaded and drawn, with the canvas fully in the window; its box and the fitted view. */
async function openRead(page: Page, readId: number) {
  await page.goto(`${APP_URL}/reads/${readId}`);
  const canvas = page.getByTestId('field-canvas');
  await canvas.locator('canvas').first().waitFor();
  await page.waitForFunction(() => (window.Konva?.stages.length ?? 0) > 0, undefined, { timeout: 30_000 });
  await page.getByText('Loading image…').waitFor({ state: 'detached', timeout: 60_000 });
  await page.waitForLoadState('networkidle');
  // The canvas is taller than what is left of a 900-pixel window below the banners, the toolbar
  // and the found-cells bar: a technician scrolls it fully into view first, and so does this (a
  // click below the window's edge never reaches the page, and the tally would wait for it).
  await canvas.scrollIntoViewIfNeeded();
  const box = (await canvas.boundingBox())!;
  const view = page.viewportSize()!;
  if (box.y < 0 || box.y + box.height > view.height) throw new Error(`the canvas (${box.height} px high at ${box.y}) does not fit in the ${view.height}-pixel window`);
  const vp = fitToScreen(W, H, box.width, box.height, FIT_PADDING);
  const toScreen = (p: { x: number; y: number }) => ({ x: box.x + vp.x + p.x * vp.scale, y: box.y + vp.y + p.y * vp.scale });
  return { vp, toScreen };
}

/** Spots of the field clear of every mark (a press near a mark selects or drags it instead). */
function freeSpots(taken: { x: number; y: number }[], scale: number, seed: number) {
  const clearance = 2 * 1.4 * markerRadiusForScale(scale); // twice the canvas's hit radius
  const rnd = mulberry32(seed);
  return () => {
    for (let tries = 0; tries < 10_000; tries++) {
      const p = { x: W * (0.05 + 0.9 * rnd()), y: H * (0.05 + 0.9 * rnd()) };
      if (taken.every((m) => Math.hypot(m.x - p.x, m.y - p.y) > clearance)) {
        taken.push(p);
        return p;
      }
    }
    throw new Error(`no free spot left on the field (${taken.length} marks, clearance ${clearance.toFixed(0)} px, scale ${scale})`);
  };
}

const marksOf = async (s: Session, readId: number) => ((await ok(s.json(`/api/reads/${readId}`), 'read detail')) as { marks: { x: number; y: number }[] }).marks;

/** Clicks `placements` marks onto free spots of the field and returns the in-page times. */
async function placeMarks(s: Session, page: Page, readId: number, placements: number, seed: number): Promise<number[]> {
  const taken = await marksOf(s, readId);
  const { vp, toScreen } = await openRead(page, readId);
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
  const freeSpot = freeSpots(taken, vp.scale, seed);
  for (let i = 0; i < placements; i++) {
    const at = toScreen(freeSpot());
    await page.mouse.click(at.x, at.y);
    await page.waitForFunction((n) => (window.__placeTimes?.length ?? 0) >= n, i + 1, { timeout: 10_000 }).catch(async (err) => {
      if (process.env.BENCH_DEBUG) await page.screenshot({ path: '/tmp/workbench-bench.png' });
      throw err;
    });
    await page.waitForTimeout(30);
  }
  return page.evaluate(() => window.__placeTimes!.slice());
}

/**
 * Pans the view by dragging it with the mouse (`steps` moves of 6 px, back and forth) and returns
 * the in-page time of each move: from the pointermove (capture, before React) to the end of a
 * synchronous draw of every layer after the canvas's own handler has moved the stage.
 */
async function panView(s: Session, page: Page, readId: number, steps: number, seed: number): Promise<number[]> {
  const taken = await marksOf(s, readId);
  const { vp, toScreen } = await openRead(page, readId);
  await page.evaluate(() => {
    const times: number[] = [];
    const xs: number[] = [];
    window.__panTimes = times;
    window.__panXs = xs;
    let start = 0;
    window.addEventListener('pointermove', () => (start = performance.now()), { capture: true });
    // The window's bubbling listener runs after React's own (on the page's root).
    window.addEventListener('pointermove', (e) => {
      if (!start || e.buttons !== 1) return;
      const stage = window.Konva!.stages[0]!;
      for (const l of stage.getLayers()) l.draw();
      times.push(performance.now() - start);
      xs.push(stage.x());
      start = 0;
    });
  });
  const at = toScreen(freeSpots(taken, vp.scale, seed)());
  await page.mouse.move(at.x, at.y);
  await page.mouse.down();
  let x = at.x;
  for (let i = 0; i < steps; i++) {
    x += (Math.floor(i / 10) % 2 === 0 ? 1 : -1) * 6; // ten steps right, ten left, …
    await page.mouse.move(x, at.y);
    await page.waitForTimeout(15);
  }
  await page.mouse.up();
  const [times, xs] = await page.evaluate(() => [window.__panTimes!.slice(), window.__panXs!.slice()]);
  if (times.length < steps * 0.9) throw new Error(`only ${times.length} of ${steps} pan moves timed`);
  // The view must have followed the mouse (60 px right and back), not a mark been dragged.
  if (Math.max(...xs) - Math.min(...xs) < 40) throw new Error(`the view did not pan (stage x ${Math.min(...xs)}–${Math.max(...xs)})`);
  return times.slice(1); // the first move only crosses the click slop and starts the pan
}

async function main() {
  const placements = arg('placements', 40);
  const panSteps = arg('pan-steps', 40);
  const s = await signedIn(USERS.tech);
  console.error('preparing two reads (1,000 marks and none) on generated 4000 × 3000 fields…');
  const full = await makeRead(s, MARKS, 9001);
  const empty = await makeRead(s, 0, 9002);
  const { browser, page, errors } = await signedInPage(s);
  try {
    await placeMarks(s, page, empty.readId, 5, 1); // warm-up (JIT, caches), not reported
    const withMarks = await placeMarks(s, page, full.readId, placements, 2);
    const noMarks = await placeMarks(s, page, empty.readId, placements, 3);
    // Pans interleaved in halves, so a slow spell of the machine hits both cases.
    const panFull: number[] = [];
    const panEmpty: number[] = [];
    for (let half = 0; half < 2; half++) {
      panFull.push(...(await panView(s, page, full.readId, panSteps / 2, 10 + half)));
      panEmpty.push(...(await panView(s, page, empty.readId, panSteps / 2, 20 + half)));
    }
    if (errors.length) throw new Error(`page errors: ${errors.join('; ')}`);
    const f = (v: number) => v.toFixed(2);
    const row = (what: string, xs: number[], base?: number[]) =>
      `| ${what} | ${xs.length} | ${f(quantile(xs, 0.5))} | ${f(quantile(xs, 0.95))} | ${base ? `${(quantile(xs, 0.5) / quantile(base, 0.5)).toFixed(2)} / ${(quantile(xs, 0.95) / quantile(base, 0.95)).toFixed(2)}` : '—'} |`;
    console.log(`\n### Scoring workbench in the app (headless Chromium, --disable-gpu): a mark placed by mouse click + repaint (${placements} placements), the view dragged by the mouse + every layer drawn (${panFull.length} moves)\n`);
    console.log('| case | n | p50 ms | p95 ms | ÷ no marks (p50 / p95) |');
    console.log('|---|---|---|---|---|');
    console.log(row(`click to mark, read with ${MARKS} marks on a 4000 × 3000 field`, withMarks, noMarks));
    console.log(row('click to mark, read with no marks (baseline)', noMarks));
    console.log(row(`drag to pan, read with ${MARKS} marks`, panFull, panEmpty));
    console.log(row('drag to pan, read with no marks (baseline)', panEmpty));
    const p95 = quantile(withMarks, 0.95);
    const panP95 = quantile(panFull, 0.95);
    console.log(`\np95 place + repaint in the workbench < ${TARGET_MS} ms: ${p95 < TARGET_MS ? 'PASS' : 'FAIL'} (${f(p95)} ms)`);
    console.log(`p95 pan step + draw in the workbench < ${TARGET_MS} ms: ${panP95 < TARGET_MS ? 'PASS' : 'FAIL'} (${f(panP95)} ms)`);
    emitFigures('workbench', [
      { name: `workbench click-to-mark + repaint, ${MARKS} marks, p95`, unit: 'ms', value: p95, baseline: { name: 'no marks', value: quantile(noMarks, 0.95) }, better: 'lower', target: { on: 'value', max: TARGET_MS }, details: { p50_ms: quantile(withMarks, 0.5) } },
      { name: `workbench drag-to-pan + draw, ${MARKS} marks, p95`, unit: 'ms', value: panP95, baseline: { name: 'no marks', value: quantile(panEmpty, 0.95) }, better: 'lower', target: { on: 'value', max: TARGET_MS }, details: { p50_ms: quantile(panFull, 0.5) } },
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
