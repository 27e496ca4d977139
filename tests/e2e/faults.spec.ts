import { S3Client, ListObjectsV2Command } from '@aws-sdk/client-s3';
import { expect, test, type Browser, type Page } from '@playwright/test';
import knexFactory, { type Knex } from 'knex';
import { fitToScreen } from '../../lib/scoring/viewport';
import { generateField } from '../../lib/synthetic/generate-field';
import { buildReportCollection } from '../support/report-collections';
import { ScratchStack } from '../support/scratch-stack';
import { DEMO_PASSWORD, signIn, USERS } from './support/auth';

// Faults, on a Fieldmark of their own (tests/support/scratch-stack.ts: own MariaDB, object store,
// mail sink and app server, on ports +8), so stopping a service never disturbs the tests running
// beside these: the database stopped mid-scoring, the object store down during an upload, the app
// server killed mid-read, the mail relay down when a report is sent, and a signed report's PDF job
// failing once in the app's own worker (the store down when it would keep the PDF) and retried. (The
// renderer itself failing and retried, with the queue's other rules: tests/integration/reports/queue-and-seams.test.ts.)
test.describe.configure({ mode: 'serial' });

const W = 1600;
const H = 1200;
/** Must match FIT_PADDING in components/scoring/field-canvas.tsx. */
const FIT_PADDING = 12;

let stack: ScratchStack;
let db: Knex;

test.beforeAll(async () => {
  test.setTimeout(300_000);
  stack = new ScratchStack();
  await stack.up();
  db = knexFactory({ client: 'mysql2', connection: stack.dbConnection, pool: { min: 0, max: 2 } });
});

test.afterAll(async () => {
  test.setTimeout(60_000);
  await db?.destroy();
  await stack?.down();
});

async function signedInPage(browser: Browser, email: string): Promise<Page> {
  const context = await browser.newContext({ baseURL: stack.url });
  const page = await context.newPage();
  await signIn(page, email);
  return page;
}

let fieldSeed = 7100;
/** A fresh collection of the demo's first stallion with one generated field image. */
async function newCollectionWithImage(page: Page): Promise<number> {
  const stallions = (await (await page.request.get('/api/stallions?pageSize=5')).json()) as { rows: { id: number }[] };
  const col = await page.request.post('/api/collections', {
    data: { stallionId: stallions.rows[0]!.id, collectedAt: new Date(Date.now() - 3_600_000).toISOString(), preparation: 'eosin_nigrosin', optics: 'bright_field', remarks: 'Made by the fault tests' },
  });
  expect(col.status(), await col.text()).toBe(201);
  const collectionId = ((await col.json()) as { collection: { id: number } }).collection.id;
  const up = await uploadField(page, collectionId);
  expect(up.status(), await up.text()).toBe(201);
  return collectionId;
}

async function fieldImage(): Promise<Buffer> {
  return (await generateField({ seed: fieldSeed++, width: W, height: H, cells: 6, format: 'jpeg' })).image;
}

async function uploadField(page: Page, collectionId: number, image?: Buffer) {
  return page.request.post(`/api/collections/${collectionId}/images?name=fault-field.jpg&micronsPerPixel=0.25`, {
    headers: { 'content-type': 'application/octet-stream' },
    data: image ?? (await fieldImage()),
  });
}

/** A first read of a fresh collection, open in the scoring page with a normal class chosen. */
async function openNewRead(page: Page): Promise<number> {
  const collectionId = await newCollectionWithImage(page);
  const res = await page.request.post(`/api/collections/${collectionId}/reads`, { data: { kind: 'first' } });
  expect([200, 201]).toContain(res.status());
  const readId = ((await res.json()) as { read: { id: number } }).read.id;
  const body = (await (await page.request.get(`/api/reads/${readId}`)).json()) as { read: { classSet: { classes: { hotkey: string | null; group: string; countsAsSperm: boolean }[] } } };
  const normal = body.read.classSet.classes.find((c) => c.hotkey && c.group === 'normal' && c.countsAsSperm)!;
  await page.goto(`/reads/${readId}`);
  await expect(page.getByText('Loading image…')).toHaveCount(0);
  await expect(page.getByTestId('field-canvas')).toBeVisible();
  await expect(saveStatus(page)).toHaveText('All changes saved');
  await page.keyboard.press(normal.hotkey!);
  return readId;
}

const saveStatus = (page: Page) => page.getByTestId('sync-status');
const cellsCounted = (page: Page) => page.getByRole('progressbar', { name: 'Cells counted' });

/** Marks the i-th of a grid of points far apart (a click never lands on an earlier mark). */
async function mark(page: Page, i: number) {
  const box = (await page.getByTestId('field-canvas').boundingBox())!;
  const vp = fitToScreen(W, H, box.width, box.height, FIT_PADDING);
  const x = 120 + (i % 7) * 200;
  const y = 120 + Math.floor(i / 7) * 180;
  await page.mouse.click(box.x + vp.x + x * vp.scale, box.y + vp.y + y * vp.scale);
  await expect(cellsCounted(page)).toHaveAttribute('aria-valuenow', String(i + 1));
}

/** The read's marks in the database: every row, and how many distinct marks and places. */
async function savedMarks(readId: number) {
  const rows = await db('marks').where({ read_id: readId, deleted: false }).select('id', 'x', 'y');
  return { rows: rows.length, ids: new Set(rows.map((r) => r.id)).size, places: new Set(rows.map((r) => `${r.x},${r.y}`)).size };
}

test('the database stopped for a few seconds mid-scoring: every mark is saved once, the tally equals the database', async ({ browser }) => {
  test.setTimeout(180_000);
  const page = await signedInPage(browser, USERS.tech);
  const readId = await openNewRead(page);
  for (let i = 0; i < 3; i++) await mark(page, i);
  await expect(saveStatus(page)).toHaveText('All changes saved');

  stack.services('stop', 'db');
  for (let i = 3; i < 8; i++) await mark(page, i);
  // The marks wait in the browser's queue, and the page says they are not saved yet.
  await expect(saveStatus(page)).not.toHaveText('All changes saved');
  await page.waitForTimeout(3000);
  await expect(saveStatus(page)).not.toHaveText('All changes saved');
  stack.services('start', 'db');

  await expect(saveStatus(page)).toHaveText('All changes saved', { timeout: 60_000 });
  expect(await savedMarks(readId)).toEqual({ rows: 8, ids: 8, places: 8 });
  await expect(cellsCounted(page)).toHaveAttribute('aria-valuenow', '8');
  // Opened again, the page shows what the database holds.
  await page.reload();
  await expect(cellsCounted(page)).toHaveAttribute('aria-valuenow', '8');
  await page.context().close();
});

test('the app server killed mid-read: the browser’s queue delivers when it is back', async ({ browser }) => {
  test.setTimeout(180_000);
  const page = await signedInPage(browser, USERS.tech);
  const readId = await openNewRead(page);
  for (let i = 0; i < 2; i++) await mark(page, i);
  await expect(saveStatus(page)).toHaveText('All changes saved');

  await stack.killApp();
  for (let i = 2; i < 6; i++) await mark(page, i);
  await expect(saveStatus(page)).not.toHaveText('All changes saved');
  await stack.startApp();

  await expect(saveStatus(page)).toHaveText('All changes saved', { timeout: 60_000 });
  expect(await savedMarks(readId)).toEqual({ rows: 6, ids: 6, places: 6 });
  await expect(cellsCounted(page)).toHaveAttribute('aria-valuenow', '6');
  await page.context().close();
});

test('the object store down during an upload: a clear error, nothing half-stored, and the file goes in when sent again', async ({ browser }) => {
  test.setTimeout(120_000);
  const page = await signedInPage(browser, USERS.tech);
  const collectionId = await newCollectionWithImage(page);
  const s3 = new S3Client({
    region: 'us-east-1',
    endpoint: stack.env.S3_ENDPOINT,
    forcePathStyle: true,
    credentials: { accessKeyId: stack.env.S3_ACCESS_KEY_ID ?? 'S3RVER', secretAccessKey: stack.env.S3_SECRET_ACCESS_KEY ?? 'S3RVER' },
  });
  const stored = async () =>
    ((await s3.send(new ListObjectsV2Command({ Bucket: stack.env.S3_BUCKET ?? 'fieldmark', Prefix: `collections/${collectionId}/` }))).Contents ?? []).map((o) => o.Key).sort();
  const images = async () => Number((await db('field_images').where({ collection_id: collectionId }).count({ n: '*' }))[0]!.n);
  const imagesBefore = await images();
  const objectsBefore = await stored();
  const file = { name: 'second-field.jpg', mimeType: 'image/jpeg', buffer: await fieldImage() };
  await page.goto(`/collections/${collectionId}`);
  const uploads = page.getByRole('list', { name: 'Uploads' });

  stack.services('stop', 's3');
  await page.getByLabel('Field image files').setInputFiles(file);
  await expect(uploads.getByRole('alert')).toHaveText('Refused: second-field.jpg: the image store is not reachable; nothing was saved. Try again shortly.', { timeout: 60_000 });
  expect(await images()).toBe(imagesBefore);
  stack.services('start', 's3');
  expect(await stored()).toEqual(objectsBefore);

  // The same file, sent again.
  await page.getByLabel('Field image files').setInputFiles(file);
  await expect(uploads.getByText('Stored')).toBeVisible({ timeout: 60_000 });
  expect(await images()).toBe(imagesBefore + 1);
  const row = await db('field_images').where({ collection_id: collectionId }).orderBy('id', 'desc').first('original_key', 'display_key', 'thumb_key');
  expect(await stored()).toEqual([...objectsBefore, row.original_key, row.display_key, row.thumb_key].sort());
  s3.destroy();
  await page.context().close();
});

test('the mail relay down when a report is sent: recorded as not sent, and sendable later', async ({ browser }) => {
  test.setTimeout(120_000);
  const page = await signedInPage(browser, USERS.vet);
  const report = await db('report_versions').whereNull('superseded_by').whereNull('amended_at').whereNotNull('pdf_sha256').orderBy('id').first('id');
  const to = 'front-desk@pennacott-vets.example';
  const send = () => page.request.post(`/api/reports/${report.id}/send`, { data: { includeOwner: false, to: [to] } });
  const latest = () => db('report_sendings').where({ report_id: report.id, recipient: to }).orderBy('id', 'desc').first('status', 'relay_response');

  stack.services('stop', 'mail');
  const refused = await send();
  expect(refused.status()).toBe(502);
  expect(((await refused.json()) as { error: { message: string } }).error.message).toContain(`Not sent to ${to}`);
  expect(await latest()).toMatchObject({ status: 'failed' });
  stack.services('start', 'mail');

  const sent = await send();
  expect(sent.status(), await sent.text()).toBe(201);
  expect(await latest()).toMatchObject({ status: 'sent' });
  expect(await db('report_sendings').where({ report_id: report.id, recipient: to }).pluck('status')).toEqual(['failed', 'sent']);
  await page.context().close();
});

test('a signed report’s PDF job failing once in the app’s worker: retried, and the PDF is served', async ({ browser }) => {
  test.setTimeout(120_000);
  const page = await signedInPage(browser, USERS.vet);
  const stallion = await db('stallions').orderBy('id').first('id');
  const { collectionId } = await buildReportCollection(db, { reads: 'settled', stallionId: stallion.id, collectedAt: new Date(Date.now() - 86_400_000) });
  const job = (reportId: number) => db('report_pdf_jobs').where({ report_id: reportId }).first('status', 'attempts', 'error');

  stack.services('stop', 's3');
  const signed = await page.request.post(`/api/collections/${collectionId}/report/sign`, { data: { password: DEMO_PASSWORD } });
  expect(signed.status(), await signed.text()).toBe(201);
  const reportId = ((await signed.json()) as { report: { id: number } }).report.id;
  // The render's result could not be kept: the job waits for its retry, with the reason on it.
  await expect.poll(async () => (await job(reportId))?.error ?? '', { timeout: 60_000 }).not.toBe('');
  expect(['waiting', 'running']).toContain((await job(reportId)).status);
  expect((await page.request.get(`/api/reports/${reportId}/pdf`)).status()).toBe(409);
  stack.services('start', 's3');

  await expect.poll(async () => (await job(reportId))?.status, { timeout: 60_000 }).toBe('done');
  expect((await job(reportId)).error).toBeNull();
  expect((await job(reportId)).attempts).toBeGreaterThanOrEqual(2);
  const pdf = await page.request.get(`/api/reports/${reportId}/pdf`);
  expect(pdf.status()).toBe(200);
  expect(pdf.headers()['content-type']).toBe('application/pdf');
  expect((await pdf.body()).subarray(0, 5).toString()).toBe('%PDF-');
  await page.context().close();
});
