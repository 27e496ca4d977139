import { expect, test, type Page } from '@playwright/test';
import knexFactory, { type Knex } from 'knex';
import { knexConfig } from '../../knexfile';
import { pairingDistancePx } from '../../lib/agreement/pairing';
import { generateField, type FieldCell } from '../../lib/synthetic/generate-field';
import { signIn, USERS } from './support/auth';

// The cell walk against the running app: a generated field of 40 cells (known positions and
// classes), its candidates found by the app's own detection job, then scored by keys alone —
// one class key per cell the detection found, x for a candidate that is no cell.

const CELLS = 40;
const MPP = 0.25;
let db: Knex;

test.beforeAll(() => {
  db = knexFactory(knexConfig());
});
test.afterAll(async () => {
  await db?.destroy();
});

interface ReadBody {
  read: { id: number; classSet: { classes: { key: string; hotkey: string | null }[] } };
  candidates: Record<string, { status: string; points: { x: number; y: number }[] }>;
}

async function walkRead(page: Page, mpp = MPP, look: 'stained' | 'phase' = 'stained') {
  const stallions = (await (await page.request.get('/api/stallions?pageSize=5')).json()) as { rows: { id: number }[] };
  const col = await page.request.post('/api/collections', {
    data: {
      stallionId: stallions.rows[0]!.id, collectedAt: new Date(Date.now() - 3_600_000).toISOString(), concentrationMethod: 'entered',
      preparation: 'eosin_nigrosin', optics: 'bright_field', magnification: 1000, remarks: 'Made by the cell walk browser test',
    },
  });
  expect(col.status(), await col.text()).toBe(201);
  const collectionId = ((await col.json()) as { collection: { id: number } }).collection.id;
  // A fixed field: the same cells (and the same candidates) every run.
  const field = await generateField({ seed: 4040, width: 1600, height: 1200, micronsPerPixel: mpp, cells: CELLS, format: 'jpeg', look });
  const up = await page.request.post(`/api/collections/${collectionId}/images?name=walk.jpg&micronsPerPixel=${mpp}`, { headers: { 'content-type': 'application/octet-stream' }, data: field.image });
  expect(up.status(), await up.text()).toBe(201);
  const imageId = ((await up.json()) as { image: { id: number } }).image.id;
  // The app's worker finds the cells (the upload never waits for it).
  await expect
    .poll(async () => ((await (await page.request.get(`/api/images/${imageId}/candidates`)).json()) as { status: string }).status, { timeout: 60_000, intervals: [500] })
    .toBe('done');
  const read = await page.request.post(`/api/collections/${collectionId}/reads`, { data: { kind: 'first' } });
  const readId = ((await read.json()) as { read: { id: number } }).read.id;
  const body = (await (await page.request.get(`/api/reads/${readId}`)).json()) as ReadBody;
  return { readId, imageId, collectionId, cells: field.cells, body };
}

const target = async (page: Page) => page.getByTestId('field-canvas').getAttribute('data-walk-target');

test.beforeEach(async ({ page }) => {
  await signIn(page, USERS.tech);
});

test('scores a field of 40 cells by the walk alone: one key per found cell, every mark on its cell, saved once', async ({ page }) => {
  test.setTimeout(150_000);
  const { readId, imageId, cells, body } = await walkRead(page);
  const hotkey = new Map(body.read.classSet.classes.map((c) => [c.key, c.hotkey]));
  const found = body.candidates[String(imageId)]!.points;
  expect(found.length).toBeGreaterThan(0);
  const reach = pairingDistancePx(MPP);

  await page.goto(`/reads/${readId}`);
  await expect(page.getByRole('region', { name: 'Field image 1 of 1' })).toBeVisible();
  await expect(page.getByText('Loading image…')).toHaveCount(0);
  const status = page.getByTestId('candidate-status');
  await expect(status).toContainText(`${found.length} found cells not yet judged on this image`);
  await expect(status).toContainText('Suggestions only: you decide every cell.');

  // Key presses spent on the cells the search found (the walk's own key included); x on a
  // candidate that is no cell is counted apart.
  let presses = 0;
  let skipPresses = 0;
  const press = async (key: string) => {
    if (key === 'x') skipPresses++;
    else presses++;
    await page.keyboard.press(key);
  };
  await press('w');
  await expect(page.getByRole('button', { name: 'Stop cell walk' })).toHaveAttribute('aria-pressed', 'true');

  const used = new Set<FieldCell>();
  const expected: { cell: FieldCell; x: number; y: number }[] = [];
  let skipped = 0;
  for (let guard = 0; guard < found.length + 5; guard++) {
    const at = await target(page);
    if (!at) break;
    const [x, y] = at.split(',').map(Number) as [number, number];
    // The reader's judgement: the true cell under the ring, if any is left there.
    let best: FieldCell | null = null;
    for (const c of cells) if (!used.has(c) && Math.hypot(c.x - x, c.y - y) <= reach && (!best || Math.hypot(c.x - x, c.y - y) < Math.hypot(best.x - x, best.y - y))) best = c;
    if (best) {
      used.add(best);
      expected.push({ cell: best, x, y });
      await press(hotkey.get(best.classKey)!);
    } else {
      skipped++;
      await press('x');
    }
    // The view moves on by itself: a new ring, or the walk's end.
    await expect.poll(() => target(page), { timeout: 10_000 }).not.toBe(at);
  }
  expect(await target(page)).toBeNull();
  await expect(page.getByTestId('announcer')).toContainText('every found cell in this read is judged');
  await expect(status).toContainText('0 found cells not yet judged on this image · 0 in the read');
  await expect(page.getByTestId('sync-status')).toHaveText('All changes saved', { timeout: 20_000 });

  const classified = expected.length;
  const perCell = presses / classified;
  console.log(
    `cell walk: ${cells.length} cells, ${found.length} candidates, ${classified} classified with ${presses} key presses (${perCell.toFixed(3)} per cell), ${skipped} skipped with ${skipPresses}`,
  );
  expect(classified).toBeGreaterThanOrEqual(Math.ceil(0.9 * CELLS));
  expect(perCell).toBeLessThanOrEqual(1.05);
  // One x per candidate that is no cell, and few of those.
  expect(skipPresses).toBe(skipped);
  expect(skipped).toBeLessThanOrEqual(Math.ceil(0.1 * found.length));

  // In the database: one mark per classified cell, each at its true cell with the cell's class, none twice.
  const marks = await db('marks').where({ read_id: readId, deleted: false });
  expect(marks).toHaveLength(classified);
  expect(new Set(marks.map((m) => `${Number(m.x)},${Number(m.y)}`)).size).toBe(classified);
  for (const e of expected) {
    const m = marks.find((r) => Math.abs(Number(r.x) - e.x) < 0.01 && Math.abs(Number(r.y) - e.y) < 0.01);
    expect(m, `a mark at the ring (${e.x}, ${e.y})`).toBeTruthy();
    expect(m.class_key).toBe(e.cell.classKey);
    expect(Math.hypot(Number(m.x) - e.cell.x, Number(m.y) - e.cell.y)).toBeLessThanOrEqual(reach);
  }
  expect(await db('mark_ops').where({ read_id: readId })).toHaveLength(classified);
  expect(await db('candidate_skips').where({ read_id: readId, deleted: false })).toHaveLength(skipped);
});

test('undo steps back through the walk, a click still marks a missed cell, and submitting asks about unjudged cells', async ({ page }) => {
  test.setTimeout(120_000);
  const { readId, imageId, body } = await walkRead(page);
  const found = body.candidates[String(imageId)]!.points;
  await page.goto(`/reads/${readId}`);
  await expect(page.getByText('Loading image…')).toHaveCount(0);
  await page.getByRole('button', { name: 'Cell walk' }).click();
  const first = await target(page);
  expect(first).toBeTruthy();
  await page.keyboard.press('1');
  await expect.poll(() => target(page)).not.toBe(first);
  const second = await target(page);
  await page.keyboard.press('x');
  await expect.poll(() => target(page)).not.toBe(second);
  // The skip is saved through the same queue as the marks, for this read only.
  const saved = page.getByTestId('sync-status');
  await expect(saved).toHaveText('All changes saved', { timeout: 20_000 });
  expect(await db('candidate_skips').where({ read_id: readId, deleted: false })).toHaveLength(1);
  // Undo the skip, then the mark: back to each candidate in turn.
  await page.keyboard.press('Control+z');
  await expect.poll(() => target(page)).toBe(second);
  await expect(saved).toHaveText('All changes saved', { timeout: 20_000 });
  expect(await db('candidate_skips').where({ read_id: readId, deleted: false })).toHaveLength(0);
  await page.keyboard.press('Control+z');
  await expect.poll(() => target(page)).toBe(first);
  await expect(page.getByTestId('candidate-status')).toContainText(`${found.length} found cells not yet judged`);
  // Clicking still places a mark anywhere (here in a corner no cell is drawn in).
  const box = (await page.getByTestId('field-canvas').boundingBox())!;
  await page.getByRole('button', { name: 'Stop cell walk' }).click();
  await page.getByRole('button', { name: 'Fit to screen' }).click();
  await page.mouse.click(box.x + box.width / 2, box.y + box.height / 2);
  await expect(page.getByTestId('sync-status')).toHaveText('All changes saved', { timeout: 20_000 });
  await page.getByRole('button', { name: 'Submit read' }).click();
  const dialog = page.getByRole('dialog', { name: 'Submit this read?' });
  await expect(dialog.getByTestId('open-candidates-warning')).toContainText(/found cells? (is|are) not judged yet/);
  await dialog.getByRole('button', { name: 'Keep scoring' }).click();
  // Hiding the found cells: the read ignores them, and submitting no longer asks.
  await page.getByRole('checkbox', { name: 'Show found cells' }).uncheck();
  await expect(page.getByTestId('candidate-status')).toHaveCount(0);
  await page.getByRole('button', { name: 'Submit read' }).click();
  await expect(dialog.getByTestId('open-candidates-warning')).toHaveCount(0);
  await dialog.getByRole('button', { name: 'Keep scoring' }).click();
  await page.getByRole('checkbox', { name: 'Show found cells' }).check();
});

test('at a scale too coarse to find cells, the canvas and the gallery say so and offer no walk', async ({ page }) => {
  test.setTimeout(120_000);
  // A 6 µm head (from memory) at 0.9 µm/px is 6.7 px long: too few pixels to tell from debris.
  const { readId, imageId, collectionId, body } = await walkRead(page, 0.9, 'phase');
  expect(body.candidates[String(imageId)]).toMatchObject({ status: 'done', points: [] });
  const words = 'Cells are not found automatically at this scale (0.9 µm per pixel): mark them by hand.';
  await page.goto(`/reads/${readId}`);
  await expect(page.getByText('Loading image…')).toHaveCount(0);
  await expect(page.getByTestId('candidate-status')).toHaveText(words);
  await expect(page.getByRole('button', { name: 'Cell walk' })).toBeDisabled();
  await page.keyboard.press('w');
  await expect(page.getByRole('button', { name: 'Stop cell walk' })).toHaveCount(0);
  expect(await target(page)).toBeFalsy();
  await page.goto(`/collections/${collectionId}`);
  await expect(page.getByText(words)).toBeVisible();
  await expect(page.getByRole('button', { name: 'Find cells again on walk.jpg' })).toBeVisible();
});
