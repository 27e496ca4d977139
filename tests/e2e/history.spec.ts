import { readFile } from 'node:fs/promises';
import { expect, test, type Page } from '@playwright/test';
import { parse } from 'csv-parse/sync';
import ExcelJS from 'exceljs';
import knexFactory, { type Knex } from 'knex';
import { knexConfig } from '../../knexfile';
import { DEMO_FEVER } from '../../lib/demo/scenario';
import { exportHeader } from '../../lib/history/export';
import { signIn, USERS } from './support/auth';

// The demo fever of Thistlewick Lantern (4–6 May 2026, seed 08) on his history page: the window,
// the flagged collections, hover and click on a point, and the two downloads read back.

/** Collects page errors, console errors and 5xx answers from now on (the app's real CSP applies). */
function watch(page: Page): string[] {
  const problems: string[] = [];
  page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
  page.on('console', (m) => {
    if (m.type() === 'error') problems.push(`console error: ${m.text()}`);
  });
  page.on('response', (r) => {
    if (r.status() >= 500) problems.push(`${r.status()} ${r.url()}`);
  });
  return problems;
}

const one = (v: string) => Number(v).toFixed(1);

test('the fever stallion’s history shows the window, hover values, click-through, and downloads that match the page', async ({ page }) => {
  test.setTimeout(120_000);
  const problems = watch(page);
  await signIn(page, USERS.vet);
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Stallions' }).click();
  await page.getByLabel('Search name, breed, owner or number').fill('Thistlewick');
  await page.getByRole('link', { name: DEMO_FEVER.stallionName }).click();
  // The stallion page lists the fever as a health event with its window.
  const events = page.getByRole('table', { name: 'Health events' });
  await expect(events.getByRole('row', { name: /Fever/ })).toContainText('Peak 39.8 °C');
  // 6 May + 57 + 10 days = 12 July 2026 (computed)
  await expect(events.getByRole('row', { name: /Fever/ })).toContainText('69 days, clears 12 Jul 2026');
  await page.getByRole('link', { name: 'History and charts' }).click();

  await expect(page.getByRole('heading', { name: `History of ${DEMO_FEVER.stallionName}` })).toBeVisible();
  const normal = page.getByRole('figure', { name: /% normal per collection/ });
  await expect(normal).toBeVisible({ timeout: 30_000 });
  // The window is shaded and labelled on the chart, and the event marked.
  await expect(normal.getByText('Fever window (clears 12 Jul 2026)')).toBeVisible();
  // Collections with a read inside the window are links named as flagged; those before it are not.
  const inside = normal.getByRole('link', { name: /inside a health-event window/ });
  await expect(inside.first()).toBeVisible();
  expect(await inside.count()).toBeGreaterThanOrEqual(5);
  const outside = normal.getByRole('link', { name: /normal$/ });
  expect(await outside.count()).toBeGreaterThanOrEqual(4);

  // The table of the range flags the same collections with their day of the window.
  const table = page.getByRole('table', { name: 'Collections in the range' });
  const june10 = table.getByRole('row', { name: /10 Jun 2026/ });
  await expect(june10).toContainText(/Fever, day 38 of 69/); // 10 June is day 38 from 4 May (computed: 28 + 10)
  const pctText = (await june10.getByRole('cell').nth(1).textContent())!.split(' ')[0]!;

  // Hover: the point of 10 June shows its values.
  const point = normal.getByRole('link', { name: /^Collection of 10 Jun 2026: .* normal, inside a health-event window$/ });
  await point.hover();
  const tip = page.getByRole('tooltip').filter({ hasText: 'Collection of 10 Jun 2026' }).first();
  await expect(tip).toBeVisible();
  await expect(tip).toContainText(`% normal: ${pctText} %`);
  await expect(tip).toContainText('Fever, day 38 of 69');

  // Click: opens the collection, which carries the flag.
  await point.click();
  await expect(page).toHaveURL(/\/collections\/\d+$/);
  const collectionId = Number(new URL(page.url()).pathname.split('/').pop());
  const flag = page.getByRole('region', { name: 'Health-event window' });
  await expect(flag).toContainText('Fever: day 38 of 69');
  await expect(flag).toContainText('Re-evaluate from 12 Jul 2026');
  await page.goBack();
  await expect(normal).toBeVisible();

  // The page's figures, by collection id, from its table.
  const pageRows = new Map<number, { pct: string; total: string }>();
  for (const row of await table.getByRole('row').all()) {
    const link = row.getByRole('link');
    if ((await link.count()) === 0) continue;
    const id = Number((await link.getAttribute('href'))!.split('/').pop());
    const cells = await row.getByRole('cell').allTextContents();
    pageRows.set(id, { pct: cells[1]!.split(' ')[0]!, total: cells[7]!.split(' ')[0]! });
  }
  expect(pageRows.has(collectionId)).toBe(true);

  const exportGroup = page.getByRole('group', { name: 'Export this range' });
  const col = (h: string) => exportHeader().indexOf(h);
  const compare = (rows: (string | number | null)[][]) => {
    let compared = 0;
    for (const r of rows) {
      const shown = pageRows.get(Number(r[col('Collection id')]));
      if (!shown) continue;
      const pct = r[col('Normal (%)')];
      expect(pct == null || pct === '' ? '—' : one(String(pct))).toBe(shown.pct);
      expect(Number(r[col('Total sperm (10^9)')]).toFixed(2)).toBe(shown.total);
      compared++;
    }
    expect(compared).toBe(pageRows.size);
  };

  const [csvDownload] = await Promise.all([page.waitForEvent('download'), exportGroup.getByRole('link', { name: 'CSV' }).click()]);
  expect(csvDownload.suggestedFilename()).toMatch(/^thistlewick-lantern_2026-01-01_to_2026-12-31\.csv$/);
  const csv: string[][] = parse(await readFile((await csvDownload.path())!), { bom: true });
  expect(csv[0]).toEqual(exportHeader());
  compare(csv.slice(1));
  const june = csv.find((r) => Number(r[col('Collection id')]) === collectionId)!;
  expect(june[col('Inside health-event windows')]).toBe('Fever (day 38 of 69)');
  expect(june[col('Collected at')]).toMatch(/^2026-06-10T\d{2}:\d{2}:\d{2}\.\d{3}[+-]\d{2}:\d{2}$/);

  const [xlsxDownload] = await Promise.all([page.waitForEvent('download'), exportGroup.getByRole('link', { name: 'Excel (.xlsx)' }).click()]);
  expect(xlsxDownload.suggestedFilename()).toMatch(/\.xlsx$/);
  const wb = new ExcelJS.Workbook();
  await wb.xlsx.load((await readFile((await xlsxDownload.path())!)) as unknown as ArrayBuffer);
  const sheet = wb.worksheets[0]!;
  expect((sheet.getRow(1).values as unknown[]).slice(1)).toEqual(exportHeader());
  const xrows: (string | number | null)[][] = [];
  sheet.eachRow((row, n) => {
    if (n > 1) xrows.push((row.values as (string | number | null)[]).slice(1));
  });
  compare(xrows);

  // The range picker: the last 90 days (today is long after the demo season) hold none of these.
  await page.getByLabel('Range', { exact: true }).selectOption('last90');
  await expect(page.getByText(/: 0 collections/)).toBeVisible();
  await expect(page.getByRole('figure', { name: /% normal per collection/ })).toContainText('No collections in this range.');
  await page.getByLabel('Range', { exact: true }).selectOption('custom');
  await page.getByLabel('From', { exact: true }).fill('2026-05-01');
  await page.getByLabel('To', { exact: true }).fill('2026-06-30');
  await page.getByRole('button', { name: 'Show' }).click();
  await expect(table.getByRole('row', { name: /10 Jun 2026/ })).toBeVisible();
  await expect(table.getByRole('row', { name: /20 Apr 2026/ })).toHaveCount(0);
  expect(problems).toEqual([]);
});

test.describe('the charts draw for any number of collections', () => {
  let db: Knex;
  const made = { clients: [] as number[], stallions: [] as number[], collections: [] as number[], images: [] as number[], reads: [] as number[] };

  test.beforeAll(async () => {
    db = knexFactory(knexConfig());
  });
  test.afterAll(async () => {
    if (made.reads.length) await db('marks').whereIn('read_id', made.reads).delete();
    if (made.reads.length) await db('reads').whereIn('id', made.reads).delete();
    if (made.images.length) await db('field_images').whereIn('id', made.images).delete();
    if (made.collections.length) await db('collections').whereIn('id', made.collections).delete();
    if (made.stallions.length) await db('health_events').whereIn('stallion_id', made.stallions).delete();
    if (made.stallions.length) await db('stallions').whereIn('id', made.stallions).delete();
    if (made.clients.length) await db('clients').whereIn('id', made.clients).delete();
    await db.destroy();
  });

  /** A stallion with `n` collections every other day from 1 Jan 2024, each with a submitted first read of 20 marks. */
  async function stallionWith(n: number): Promise<number> {
    const tag = `e2e-${n}-${Date.now().toString(36)}`;
    const tech = await db('users').where({ email: USERS.tech }).first('id');
    const set = await db('class_sets').where({ is_default: true }).first('id', 'name', 'classes');
    const [client] = await db('clients').insert({ name: `Owner ${tag}`, kind: 'owner' });
    made.clients.push(client);
    const [stallion] = await db('stallions').insert({ name: `Chart check ${tag}`, client_id: client, registration: tag });
    made.stallions.push(stallion);
    await db('health_events').insert({ stallion_id: stallion, kind: 'injury', started_on: '2024-02-01', recorded_by: tech.id });
    if (n === 0) return stallion;
    const t0 = Date.UTC(2024, 0, 1, 9);
    const ids: number[] = [];
    for (let i = 0; i < n; i += 250) {
      const rows = Array.from({ length: Math.min(250, n - i) }, (_, k) => ({ stallion_id: stallion, collected_at: new Date(t0 + (i + k) * 2 * 86_400_000), volume_ml: 50, concentration_m_per_ml: 150, total_motility_pct: 70, progressive_motility_pct: 60, recorded_by: tech.id }));
      const [first] = await db('collections').insert(rows);
      ids.push(...rows.map((_, k) => first + k));
    }
    made.collections.push(...ids);
    const images: number[] = [];
    for (const id of ids) {
      const [image] = await db('field_images').insert({ collection_id: id, file_name: 'x.jpg', format: 'jpeg', bytes: 1, width: 100, height: 100, sha256: `${tag}-${id}`.padEnd(64, '0').slice(0, 64), original_key: 'none', display_key: 'none', thumb_key: 'none', display_width: 100, display_height: 100, uploaded_by: tech.id });
      images.push(image);
    }
    made.images.push(...images);
    const snapshot = JSON.stringify({ name: set.name, classes: typeof set.classes === 'string' ? JSON.parse(set.classes) : set.classes });
    const [firstRead] = await db('reads').insert(ids.map((id) => ({ collection_id: id, kind: 'first', reader_id: tech.id, class_set_id: set.id, class_set_snapshot: snapshot, target_cells: 20, status: 'submitted', submitted_at: new Date() })));
    const reads = ids.map((_, k) => firstRead + k);
    made.reads.push(...reads);
    const marks = reads.flatMap((readId, k) => Array.from({ length: 20 }, (_, m) => ({ id: crypto.randomUUID(), read_id: readId, image_id: images[k], x: m, y: m, class_key: m < 10 + (k % 7) ? 'normal' : 'proximal_droplet', tags: '[]', version: 1, deleted: false, last_op_id: crypto.randomUUID(), updated_by: tech.id })));
    for (let i = 0; i < marks.length; i += 2000) await db('marks').insert(marks.slice(i, i + 2000));
    return stallion;
  }

  for (const n of [0, 1, 500]) {
    test(`${n} collection${n === 1 ? '' : 's'}`, async ({ page }) => {
      test.setTimeout(120_000);
      const id = await stallionWith(n);
      const problems = watch(page);
      await signIn(page, USERS.tech);
      await page.goto(`/stallions/${id}/history?from=2024-01-01&to=2026-12-31`);
      const normal = page.getByRole('figure', { name: /% normal per collection/ });
      // Drawing 4 charts of 500 collections on a busy 2-core machine can take a while: wait for it, then check.
      await expect(normal).toBeVisible({ timeout: 60_000 });
      if (n === 0) {
        await expect(page.getByRole('figure')).toHaveCount(4);
        await expect(normal).toContainText('No collections in this range.');
      } else {
        // Every collection is a point; those inside the injury's window (1 Feb + 67 days) say so.
        await expect(normal.getByRole('link')).toHaveCount(n, { timeout: 30_000 });
        await expect(page.getByRole('table', { name: 'Collections in the range' }).getByRole('row')).toHaveCount(n + 1);
      }
      await expect(page.getByRole('table', { name: 'Summary of the main figures' })).toContainText(n === 0 ? '—' : '% normal');
      expect(problems).toEqual([]);
    });
  }
});
