import { expect, test, type Page } from '@playwright/test';
import { generateField } from '../../lib/synthetic/generate-field';
import { fitToScreen } from '../../lib/scoring/viewport';
import { signIn, USERS } from './support/auth';

// The scoring canvas against the running app: a fresh collection, one generated field
// image and a first read per test, made through the JSON API, then scored in the page.

const W = 1600;
const H = 1200;
/** Must match FIT_PADDING in components/scoring/field-canvas.tsx. */
const FIT_PADDING = 12;
let seedCounter = Date.now() % 100_000;

interface ClassInfo {
  key: string;
  name: string;
  group: string;
  hotkey: string | null;
  countsAsSperm: boolean;
}
interface ReadBody {
  read: { id: number; status: string; canEdit: boolean; classSet: { classes: ClassInfo[] } };
  marks: { id: string; classKey: string; x: number; y: number }[];
}

/**
 * The read's own classes, picked by role rather than by name: other tests may edit the
 * lab's class sets while this file runs, and a read keeps the set it started with.
 */
async function classesOf(page: Page, readId: number) {
  const { classes } = (await serverRead(page, readId)).read.classSet;
  const withKey = classes.filter((c) => c.hotkey !== null);
  const normal = withKey.find((c) => c.group === 'normal' && c.countsAsSperm)!;
  const [defectA, defectB] = withKey.filter((c) => c.countsAsSperm && c.group !== 'normal');
  const nonSperm = classes.find((c) => !c.countsAsSperm)!;
  expect(normal && defectA && defectB && nonSperm, 'the class set has a normal, two defect and one non-sperm class').toBeTruthy();
  return { normal, defectA: defectA!, defectB: defectB!, nonSperm };
}
const paletteName = (c: ClassInfo) => (c.hotkey ? `${c.name} (key ${c.hotkey})` : c.name);
const escapeRe = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

async function newRead(page: Page): Promise<number> {
  const stallions = await page.request.get('/api/stallions?pageSize=5');
  expect(stallions.ok()).toBe(true);
  const stallionId = ((await stallions.json()) as { rows: { id: number }[] }).rows[0]!.id;
  const col = await page.request.post('/api/collections', {
    data: {
      stallionId,
      collectedAt: new Date(Date.now() - 3_600_000).toISOString(),
      concentrationMethod: 'entered',
      preparation: 'eosin_nigrosin',
      optics: 'bright_field',
      magnification: 1000,
      remarks: 'Made by the scoring canvas browser test',
    },
  });
  expect(col.status(), await col.text()).toBe(201);
  const collectionId = ((await col.json()) as { collection: { id: number } }).collection.id;
  const field = await generateField({ seed: seedCounter++, width: W, height: H, cells: 6, format: 'jpeg' });
  const up = await page.request.post(`/api/collections/${collectionId}/images?name=field-${seedCounter}.jpg&micronsPerPixel=0.25`, {
    headers: { 'content-type': 'application/octet-stream' },
    data: field.image,
  });
  expect(up.status(), await up.text()).toBe(201);
  const read = await page.request.post(`/api/collections/${collectionId}/reads`, { data: { kind: 'first' } });
  expect([200, 201]).toContain(read.status());
  return ((await read.json()) as { read: { id: number } }).read.id;
}

async function serverRead(page: Page, readId: number): Promise<ReadBody> {
  const res = await page.request.get(`/api/reads/${readId}`);
  expect(res.ok()).toBe(true);
  return (await res.json()) as ReadBody;
}

async function openRead(page: Page, readId: number) {
  await page.goto(`/reads/${readId}`);
  await expect(page.getByRole('region', { name: 'Field image 1 of 1' })).toBeVisible();
  await expect(page.getByText('Loading image…')).toHaveCount(0);
  await expect(page.getByTestId('field-canvas')).toBeVisible();
}

/** Click at an image-pixel point of the fitted field image. */
async function clickImage(page: Page, x: number, y: number) {
  const box = (await page.getByTestId('field-canvas').boundingBox())!;
  const vp = fitToScreen(W, H, box.width, box.height, FIT_PADDING);
  await page.mouse.click(box.x + vp.x + x * vp.scale, box.y + vp.y + y * vp.scale);
}

const cells = (page: Page) => page.getByRole('progressbar', { name: 'Cells counted' });
const status = (page: Page) => page.getByTestId('sync-status');
const tallyRow = (page: Page, name: RegExp) => page.getByRole('table', { name: 'Tally by class' }).getByRole('row', { name });

/** Points far apart, so a click never lands on an earlier mark. */
const spot = (i: number) => ({ x: 150 + (i % 6) * 240, y: 150 + Math.floor(i / 6) * 220 });

test.beforeEach(async ({ page }) => {
  await signIn(page, USERS.tech);
});

test('scores cells by key and by click, with a running tally and % normal', async ({ page }) => {
  const readId = await newRead(page);
  const { normal, defectA, defectB, nonSperm } = await classesOf(page, readId);
  await openRead(page, readId);
  await expect(status(page)).toHaveText('All changes saved');

  // Three normal cells, chosen by key.
  await page.keyboard.press(normal.hotkey!);
  for (let i = 0; i < 3; i++) await clickImage(page, spot(i).x, spot(i).y);
  await expect(page.getByTestId('announcer')).toHaveText(`Marked cell as ${normal.name} (3 of 200)`);
  // One cell with a defect, chosen by key.
  await page.keyboard.press(defectA.hotkey!);
  await clickImage(page, spot(3).x, spot(3).y);
  // A non-sperm cell chosen from the palette: tallied apart.
  await page.getByRole('button', { name: paletteName(nonSperm) }).click();
  await clickImage(page, spot(4).x, spot(4).y);

  await expect(cells(page)).toHaveAttribute('aria-valuenow', '4');
  await expect(page.getByText('4 of 200 cells', { exact: true })).toBeVisible();
  // 3 normal of 4 sperm cells = 75.0 % (computed from % normal = normal / cells counted);
  // Wilson 95 % interval for 3/4: 30.1–95.4 % (computed with Newcombe 1998, method 3).
  await expect(page.getByTestId('pct-normal')).toContainText('75.0 % normal');
  await expect(page.getByTestId('pct-normal')).toContainText('30.1–95.4 %');
  await expect(tallyRow(page, new RegExp(`^${escapeRe(normal.name)}`))).toContainText('75.0 %');
  await expect(tallyRow(page, new RegExp(`^${escapeRe(defectA.name)}`))).toContainText('25.0 %');
  await expect(tallyRow(page, new RegExp(`^${escapeRe(nonSperm.name)}`))).toContainText('1');

  // Click the defect mark to select it; the other defect's key reclassifies it.
  await clickImage(page, spot(3).x, spot(3).y);
  await expect(page.getByRole('heading', { name: `Selected mark: ${defectA.name}` })).toBeVisible();
  await page.keyboard.press(defectB.hotkey!);
  await expect(page.getByRole('heading', { name: `Selected mark: ${defectB.name}` })).toBeVisible();
  await expect(tallyRow(page, new RegExp(`^${escapeRe(defectB.name)}`))).toContainText('25.0 %');
  // Delete removes the selected mark: 3 of 3 normal → 100.0 % (computed).
  await page.keyboard.press('Delete');
  await expect(cells(page)).toHaveAttribute('aria-valuenow', '3');
  await expect(page.getByTestId('pct-normal')).toContainText('100.0 % normal');

  await expect(status(page)).toHaveText('All changes saved');
  const body = await serverRead(page, readId);
  expect(body.marks.filter((m) => m.classKey === normal.key)).toHaveLength(3);
  expect(body.marks.filter((m) => m.classKey === nonSperm.key)).toHaveLength(1);
  expect(body.marks).toHaveLength(4);
});

test('marks and selects cells without a mouse: Tab to the image, pan under the centre cross, Enter', async ({ page }) => {
  const readId = await newRead(page);
  const { defectA } = await classesOf(page, readId);
  await openRead(page, readId);
  await page.keyboard.press(defectA.hotkey!);
  const canvas = page.getByTestId('field-canvas');
  for (let i = 0; i < 30 && !(await canvas.evaluate((el) => el === document.activeElement)); i++) await page.keyboard.press('Tab');
  await expect(canvas).toBeFocused();
  await expect(page.getByTestId('centre-cross')).toBeVisible();

  // The fitted image is centred, so the cross sits on the middle of the field.
  await page.keyboard.press('Enter');
  await expect(cells(page)).toHaveAttribute('aria-valuenow', '1');
  // Arrow right brings the image's right-hand part under the cross; Enter marks that spot.
  await page.keyboard.press('ArrowRight');
  await page.keyboard.press('ArrowRight');
  await page.keyboard.press('Enter');
  await expect(cells(page)).toHaveAttribute('aria-valuenow', '2');
  await expect(page.getByTestId('announcer')).toHaveText(`Marked cell as ${defectA.name} (2 of 200)`);
  // Back over the first mark, Enter selects it instead of placing a second one there.
  await page.keyboard.press('ArrowLeft');
  await page.keyboard.press('ArrowLeft');
  await page.keyboard.press('Enter');
  await expect(page.getByRole('heading', { name: `Selected mark: ${defectA.name}` })).toBeVisible();
  await expect(cells(page)).toHaveAttribute('aria-valuenow', '2');

  await expect(status(page)).toHaveText('All changes saved');
  const marks = (await serverRead(page, readId)).marks.sort((a, b) => a.x - b.x);
  expect(marks).toHaveLength(2);
  expect(marks.every((m) => m.classKey === defectA.key)).toBe(true);
  expect(Math.abs(marks[0]!.x - W / 2)).toBeLessThan(2);
  expect(Math.abs(marks[0]!.y - H / 2)).toBeLessThan(2);
  expect(marks[1]!.x - marks[0]!.x).toBeGreaterThan(20);
  expect(Math.abs(marks[1]!.y - marks[0]!.y)).toBeLessThan(2);
});

test('on an upright tablet the classes sit in a strip above the canvas', async ({ page }) => {
  await page.setViewportSize({ width: 820, height: 1180 });
  const readId = await newRead(page);
  const { defectA } = await classesOf(page, readId);
  await openRead(page, readId);
  const strip = page.getByRole('group', { name: 'Class for new marks (strip)' });
  await expect(strip).toBeInViewport();
  await strip.getByRole('button', { name: defectA.name }).click();
  await expect(strip.getByRole('button', { name: defectA.name })).toHaveAttribute('aria-pressed', 'true');
  await expect(page.getByTestId('field-canvas')).toBeInViewport({ ratio: 0.9 });
  await clickImage(page, spot(0).x, spot(0).y);
  await expect(cells(page)).toHaveAttribute('aria-valuenow', '1');
  // The tally's headline stays in view above the canvas (the panel itself is further down).
  await expect(page.getByTestId('tally-headline')).toHaveText('Cells 1/200 · 0.0 % normal');
  await expect(page.getByTestId('tally-headline')).toBeInViewport();
  await expect(status(page)).toHaveText('All changes saved');
  const marks = (await serverRead(page, readId)).marks;
  expect(marks.map((m) => m.classKey)).toEqual([defectA.key]);
  // On a laptop the palette beside the canvas is enough: no strip.
  await page.setViewportSize({ width: 1366, height: 820 });
  await expect(strip).toBeHidden();
});

test('a reload mid-read restores every mark, also changes that had not reached the server', async ({ page }) => {
  const readId = await newRead(page);
  const { defectA } = await classesOf(page, readId);
  await openRead(page, readId);
  for (let i = 0; i < 3; i++) await clickImage(page, spot(i).x, spot(i).y);
  await expect(status(page)).toHaveText('All changes saved');

  // The server stops answering: two more marks wait in the browser, then the page reloads.
  await page.route('**/api/reads/*/sync', (route) => route.abort('connectionreset'));
  await page.keyboard.press(defectA.hotkey!);
  for (let i = 3; i < 5; i++) await clickImage(page, spot(i).x, spot(i).y);
  await expect(status(page)).toContainText('2 changes');
  await page.unroute('**/api/reads/*/sync');
  await page.reload();

  await expect(cells(page)).toHaveAttribute('aria-valuenow', '5');
  await expect(tallyRow(page, new RegExp(`^${escapeRe(defectA.name)}`))).toContainText('2');
  await expect(status(page)).toHaveText('All changes saved');
  const body = await serverRead(page, readId);
  expect(body.marks).toHaveLength(5);
  expect(body.marks.filter((m) => m.classKey === defectA.key)).toHaveLength(2);
  expect(new Set(body.marks.map((m) => m.id)).size).toBe(5);
});

test('offline, marks wait in the browser and are saved exactly once when the connection is back', async ({ page, context }) => {
  const readId = await newRead(page);
  await openRead(page, readId);
  await clickImage(page, spot(0).x, spot(0).y);
  await expect(status(page)).toHaveText('All changes saved');

  await context.setOffline(true);
  for (let i = 1; i < 6; i++) await clickImage(page, spot(i).x, spot(i).y);
  await expect(status(page)).toHaveText('Offline — 5 changes waiting; keep working, they will be sent when the connection is back');
  await expect(cells(page)).toHaveAttribute('aria-valuenow', '6');

  await context.setOffline(false);
  await expect(status(page)).toHaveText('All changes saved', { timeout: 20_000 });
  const body = await serverRead(page, readId);
  expect(body.marks).toHaveLength(6);
  expect(new Set(body.marks.map((m) => m.id)).size).toBe(6);

  // A reload shows the same six, no more.
  await page.reload();
  await expect(cells(page)).toHaveAttribute('aria-valuenow', '6');
});

test('undo and redo by key and button, and the server follows', async ({ page }) => {
  const readId = await newRead(page);
  await openRead(page, readId);
  for (let i = 0; i < 3; i++) await clickImage(page, spot(i).x, spot(i).y);
  await expect(cells(page)).toHaveAttribute('aria-valuenow', '3');

  await page.keyboard.press('Control+z');
  await page.keyboard.press('Control+z');
  await expect(cells(page)).toHaveAttribute('aria-valuenow', '1');
  await page.keyboard.press('Control+Shift+z');
  await expect(cells(page)).toHaveAttribute('aria-valuenow', '2');
  await page.getByRole('button', { name: 'Redo' }).click();
  await expect(cells(page)).toHaveAttribute('aria-valuenow', '3');
  await expect(page.getByRole('button', { name: 'Redo' })).toBeDisabled();
  await page.getByRole('button', { name: 'Undo' }).click();
  await expect(cells(page)).toHaveAttribute('aria-valuenow', '2');

  await expect(status(page)).toHaveText('All changes saved');
  const body = await serverRead(page, readId);
  expect(body.marks).toHaveLength(2);
});

test('submitting locks the read', async ({ page }) => {
  const readId = await newRead(page);
  const { normal } = await classesOf(page, readId);
  await openRead(page, readId);
  for (let i = 0; i < 2; i++) await clickImage(page, spot(i).x, spot(i).y);
  await expect(cells(page)).toHaveAttribute('aria-valuenow', '2');

  await page.getByRole('button', { name: 'Submit read' }).click();
  const dialog = page.getByRole('dialog', { name: 'Submit this read?' });
  await expect(dialog).toContainText('2 of 200 cells counted');
  await dialog.getByRole('button', { name: 'Submit and lock' }).click();
  await expect(page.getByTestId('locked-banner')).toHaveText(/Submitted — locked/);
  await expect(page.getByRole('button', { name: 'Submit read' })).toHaveCount(0);
  await expect(page.getByRole('button', { name: paletteName(normal) })).toBeDisabled();

  // Clicks and keys no longer change anything.
  await clickImage(page, spot(5).x, spot(5).y);
  await page.keyboard.press('Control+z');
  await expect(cells(page)).toHaveAttribute('aria-valuenow', '2');
  const body = await serverRead(page, readId);
  expect(body.read.status).toBe('submitted');
  expect(body.read.canEdit).toBe(false);
  expect(body.marks).toHaveLength(2);
  const refused = await page.request.post(`/api/reads/${readId}/sync`, {
    data: {
      changes: [
        {
          opId: '6f1c1d52-1111-4a2b-8c3d-000000000001',
          markId: '6f1c1d52-2222-4a2b-8c3d-000000000002',
          kind: 'upsert',
          payload: { id: '6f1c1d52-2222-4a2b-8c3d-000000000002', imageId: '1', x: 10, y: 10, classKey: normal.key, tags: [] },
        },
      ],
    },
  });
  expect(refused.status()).toBe(409);
});

test('the canvas fills the window below the bars on a laptop, and follows a change of window size', async ({ page }) => {
  const readId = await newRead(page);
  await openRead(page, readId);
  const region = page.getByRole('region', { name: 'Field image 1 of 1' });
  for (const size of [{ width: 1366, height: 900 }, { width: 1280, height: 720 }, { width: 1366, height: 820 }]) {
    await page.setViewportSize(size);
    // The whole canvas in the window (at the top of the page), with at most a small gap below it.
    await expect
      .poll(async () => {
        const box = (await region.boundingBox())!;
        const bottom = box.y + box.height;
        return bottom <= size.height && bottom >= size.height - 40 ? 'fits' : `bottom ${bottom} of ${size.height}`;
      })
      .toBe('fits');
    const stage = (await page.getByTestId('field-canvas').boundingBox())!;
    expect(stage.y + stage.height).toBeLessThanOrEqual(size.height);
  }
});
