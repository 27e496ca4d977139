// @bench-runs 1 (npm run bench: its figures are already medians / quantiles of its own presses)
// The cell walk in the running app: from a class key pressed on a candidate until the view is
// centred on the next candidate and drawn. Headless Chromium (Debian's) through Playwright, a
// read of a generated 12-megapixel field (4000 × 3000, 200 cells) whose candidates the app's
// own detection job found. Needs the services and the app running (npm start, or npm run bench).
// Run: npx tsx tests/bench/walk.bench.ts [--presses N]
//
// Timed inside the page, from just before the key's keydown is dispatched on the window (where
// the workbench listens) until the walk's ring has moved (the canvas's data-walk-target), the
// stage is centred on it, and every layer has been drawn synchronously: the React work (mark,
// history, save queue, candidate states, tally) plus the Konva draw. The browser's frame pacing
// (slow and environment-bound without a GPU) is left out, as in the other canvas benches.
// Baseline in the same run, same page: an arrow key panning the view, with the same drawing.
// Exits 0 whatever the numbers are (a measurement, not a test) unless something fails.
import type { Page } from '@playwright/test';
import knexFactory from 'knex';
import { knexConfig } from '../../knexfile';
import { generateField } from '@/lib/synthetic/generate-field';
import { APP_URL, signedIn, USERS, type Session } from '../integration/support/http';
import { arg, signedInPage, benchRead, emitFigures, ok, quantile, removeBenchReads, type BenchRead } from './support';

const TARGET_MS = 50;

declare global {
  interface Window {
    __timeKey?: (key: string, waitForRing: boolean) => Promise<number>;
  }
}
/** The part of Konva's global the harness uses (workbench.bench.ts declares a narrower one on Window). */
type KonvaStages = { stages: { x(): number; y(): number; scaleX(): number; width(): number; height(): number; getLayers(): { draw(): void }[] }[] };

async function makeRead(s: Session): Promise<BenchRead> {
  const field = await generateField({ seed: 7301, width: 4000, height: 3000, cells: 200, format: 'jpeg', quality: 90 });
  const made = await benchRead(s, new Uint8Array(field.image), 'walk-bench.jpg');
  for (const until = Date.now() + 120_000; ; ) {
    const c = (await ok(s.json(`/api/images/${made.imageId}/candidates`), 'candidates')) as { status: string; candidates: unknown[] };
    if (c.status === 'done') {
      console.error(`${c.candidates.length} candidates found by the app's detection job`);
      break;
    }
    if (c.status === 'failed' || Date.now() > until) throw new Error(`detection did not finish: ${c.status}`);
    await new Promise((r) => setTimeout(r, 500));
  }
  return made;
}

async function openWalk(page: Page, readId: number) {
  await page.goto(`${APP_URL}/reads/${readId}`);
  await page.getByTestId('field-canvas').locator('canvas').first().waitFor();
  await page.waitForFunction(() => (window.Konva?.stages.length ?? 0) > 0, undefined, { timeout: 30_000 });
  await page.getByText('Loading image…').waitFor({ state: 'detached', timeout: 60_000 });
  await page.waitForLoadState('networkidle');
  await page.keyboard.press('w');
  await page.waitForFunction(() => document.querySelector('[data-testid="field-canvas"]')?.hasAttribute('data-walk-target'));
  // tsx names the harness's functions with a helper of its own, which the page lacks.
  await page.evaluate('window.__name = (f) => f');
  await page.evaluate(() => {
    const el = document.querySelector<HTMLElement>('[data-testid="field-canvas"]')!;
    const stage = () => (window as unknown as { Konva: KonvaStages }).Konva.stages[0]!;
    const drawAll = () => {
      for (const l of stage().getLayers()) l.draw();
    };
    const centred = () => {
      const [x, y] = el.getAttribute('data-walk-target')!.split(',').map(Number) as [number, number];
      const st = stage();
      return Math.abs(st.x() + x * st.scaleX() - st.width() / 2) < 1 && Math.abs(st.y() + y * st.scaleX() - st.height() / 2) < 1;
    };
    window.__timeKey = (key, waitForRing) =>
      new Promise<number>((resolve, reject) => {
        const before = el.getAttribute('data-walk-target');
        const t0 = performance.now();
        const finish = () => {
          drawAll();
          resolve(performance.now() - t0);
        };
        if (!waitForRing) {
          window.dispatchEvent(new KeyboardEvent('keydown', { key, bubbles: true, cancelable: true }));
          finish();
          return;
        }
        const timer = setTimeout(() => reject(new Error(`the ring did not move after “${key}”`)), 5000);
        const check = () => {
          if (el.getAttribute('data-walk-target') === before) return false;
          if (!centred()) return false;
          clearTimeout(timer);
          obs.disconnect();
          finish();
          return true;
        };
        const obs = new MutationObserver(() => {
          // Centring runs in the same commit's effects; if not yet, try once more on the next frame.
          if (!check()) requestAnimationFrame(() => void check());
        });
        obs.observe(el, { attributes: true, attributeFilter: ['data-walk-target'] });
        window.dispatchEvent(new KeyboardEvent('keydown', { key, bubbles: true, cancelable: true }));
      });
  });
}

async function timeKeys(page: Page, key: string, n: number, waitForRing: boolean): Promise<number[]> {
  const out: number[] = [];
  for (let i = 0; i < n; i++) {
    out.push(await page.evaluate(([k, w]) => window.__timeKey!(k, w), [key, waitForRing] as [string, boolean]));
    await page.waitForTimeout(30);
  }
  return out;
}

async function main() {
  const presses = arg('presses', 60);
  const s = await signedIn(USERS.tech);
  console.error('preparing a read on a generated 4000 × 3000 field (200 cells) and waiting for its candidates…');
  const made = await makeRead(s);
  const { browser, page, errors } = await signedInPage(s);
  try {
    await openWalk(page, made.readId);
    await timeKeys(page, '1', 5, true); // warm-up (JIT, caches), not reported
    await timeKeys(page, 'ArrowRight', 5, false);
    // Interleaved halves, so a slow spell of the machine hits both cases.
    const walk: number[] = [];
    const pan: number[] = [];
    for (let half = 0; half < 2; half++) {
      walk.push(...(await timeKeys(page, '1', presses / 2, true)));
      pan.push(...(await timeKeys(page, half ? 'ArrowLeft' : 'ArrowRight', presses / 2, false)));
    }
    if (errors.length) throw new Error(`page errors: ${errors.join('; ')}`);
    const f = (v: number) => v.toFixed(2);
    console.log(`\n### Cell walk in the app: class key → next candidate centred and drawn (headless Chromium, --disable-gpu, ${presses} presses each)\n`);
    console.log('| case | n | p50 ms | p95 ms | ÷ baseline (p50 / p95) |');
    console.log('|---|---|---|---|---|');
    console.log(`| class key on a candidate: mark saved to the queue, view moves to the next candidate | ${walk.length} | ${f(quantile(walk, 0.5))} | ${f(quantile(walk, 0.95))} | ${(quantile(walk, 0.5) / quantile(pan, 0.5)).toFixed(2)} / ${(quantile(walk, 0.95) / quantile(pan, 0.95)).toFixed(2)} |`);
    console.log(`| arrow key panning the view (baseline) | ${pan.length} | ${f(quantile(pan, 0.5))} | ${f(quantile(pan, 0.95))} | — |`);
    const p95 = quantile(walk, 0.95);
    console.log(`\np95 key press → next candidate centred and drawn < ${TARGET_MS} ms: ${p95 < TARGET_MS ? 'PASS' : 'FAIL'} (${f(p95)} ms)`);
    emitFigures('walk', [
      { name: 'cell walk: class key to next candidate centred and drawn, p95', unit: 'ms', value: p95, baseline: { name: 'arrow-key pan', value: quantile(pan, 0.95) }, better: 'lower', target: { on: 'value', max: TARGET_MS }, details: { p50_ms: quantile(walk, 0.5), presses: walk.length } },
    ]);
  } finally {
    await browser.close();
    const db = knexFactory(knexConfig());
    try {
      await removeBenchReads(s, db, [made]);
    } finally {
      await db.destroy();
    }
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
