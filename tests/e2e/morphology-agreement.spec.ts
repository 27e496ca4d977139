import { expect, test, type Locator, type Page } from '@playwright/test';
import { generateField } from '../../lib/synthetic/generate-field';
import { signIn, USERS } from './support/auth';

/*
 * One read, four screens, the same figures: the scoring workbench's tally (worked out in the
 * browser from the marks it holds), the collection page and the collection list (worked out on
 * the server from one grouped query), and GET /api/collections/:id/morphology. The read is built
 * through the API with extra defect tags and non-sperm cells in it.
 *
 * 81 normal of 263 sperm cells: Wilson 95 % interval 0.2553–0.3662 (Newcombe 1998, Stat Med
 * 17:857–872, method 3; docs/references.md).
 */

const W = 1600;
const H = 1200;

interface ClassInfo {
  key: string;
  name: string;
  group: string;
  hotkey: string | null;
  countsAsSperm: boolean;
}

const num = (text: string | null) => Number((text ?? '').replace(/[^\d.]/g, ''));
const cellsOf = (row: Locator) => row.getByRole('cell');

async function buildRead(page: Page) {
  const remark = `Agreement test ${Date.now()}`;
  const stallions = await page.request.get('/api/stallions?pageSize=5');
  const stallionId = ((await stallions.json()) as { rows: { id: number }[] }).rows[0]!.id;
  const col = await page.request.post('/api/collections', {
    data: {
      stallionId,
      collectedAt: new Date(Date.now() - 2 * 3_600_000).toISOString(),
      volumeMl: 50,
      concentrationMethod: 'entered',
      concentrationMillionPerMl: 150,
      totalMotilityPct: 70,
      progressiveMotilityPct: 60,
      preparation: 'eosin_nigrosin',
      optics: 'bright_field',
      magnification: 1000,
      remarks: remark,
    },
  });
  expect(col.status(), await col.text()).toBe(201);
  const collectionId = ((await col.json()) as { collection: { id: number } }).collection.id;
  const field = await generateField({ seed: Date.now() % 100_000, width: W, height: H, cells: 4, format: 'jpeg' });
  const up = await page.request.post(`/api/collections/${collectionId}/images?name=agreement.jpg`, { headers: { 'content-type': 'application/octet-stream' }, data: field.image });
  expect(up.status(), await up.text()).toBe(201);
  const imageId = String(((await up.json()) as { image: { id: number } }).image.id);
  const started = await page.request.post(`/api/collections/${collectionId}/reads`, { data: { kind: 'first' } });
  const readId = ((await started.json()) as { read: { id: number } }).read.id;

  // The read's own classes, by role (a read keeps the class set it started with).
  const detail = (await (await page.request.get(`/api/reads/${readId}`)).json()) as { read: { classSet: { classes: ClassInfo[] } } };
  const classes = detail.read.classSet.classes;
  const normal = classes.find((c) => c.group === 'normal' && c.countsAsSperm)!;
  const [d1, d2, d3] = classes.filter((c) => c.countsAsSperm && c.group !== 'normal');
  const nonSperm = classes.filter((c) => !c.countsAsSperm);
  expect(normal && d1 && d2 && d3 && nonSperm.length > 0, 'a normal, three defect and a non-sperm class').toBeTruthy();

  const plan: { classKey: string; tags: string[]; n: number }[] = [
    { classKey: normal.key, tags: [], n: 81 },
    { classKey: d1!.key, tags: [], n: 70 },
    { classKey: d1!.key, tags: [d2!.key], n: 30 },
    { classKey: d2!.key, tags: [], n: 52 },
    { classKey: d3!.key, tags: [d1!.key, d2!.key], n: 10 },
    { classKey: d3!.key, tags: [], n: 20 },
    { classKey: nonSperm[0]!.key, tags: [], n: 3 },
    { classKey: nonSperm.at(-1)!.key, tags: [], n: 2 },
  ];
  const changes = plan.flatMap((p) => Array.from({ length: p.n }, () => p)).map((p, i) => {
    const id = crypto.randomUUID();
    return { opId: crypto.randomUUID(), markId: id, kind: 'upsert', payload: { id, imageId, x: 30 + (i % 26) * 60, y: 30 + Math.floor(i / 26) * 60, classKey: p.classKey, tags: p.tags } };
  });
  for (let i = 0; i < changes.length; i += 200) {
    const r = await page.request.post(`/api/reads/${readId}/sync`, { data: { changes: changes.slice(i, i + 200) } });
    expect(r.status()).toBe(200);
  }
  return { collectionId, readId, remark, sperm: classes.filter((c) => c.countsAsSperm), nonSperm };
}

test('the workbench tally, the collection page, the list and the API give the same figures for a read', async ({ page }) => {
  test.setTimeout(120_000);
  await signIn(page, USERS.tech);
  const { collectionId, readId, remark, sperm, nonSperm } = await buildRead(page);

  // 1. The API.
  const api = ((await (await page.request.get(`/api/collections/${collectionId}/morphology`)).json()) as { reads: { readId: number; morphology: any }[] }).reads.find((r) => r.readId === readId)!.morphology;
  expect(api.cellsCounted).toBe(263);
  expect(api.nonSpermCounted).toBe(5);
  expect(api.normalIntervalPct.lower).toBeCloseTo(25.53, 2);
  expect(api.normalIntervalPct.upper).toBeCloseTo(36.62, 2);
  // 182 primary defects + 30 + 2 × 10 tags = 232 defects on 263 cells (computed).
  expect(api.defectFrequency.totalDefects).toBe(232);
  const perClass = new Map<string, { count: number; pctOfCells: number | null }>(api.cells.perClass.map((c: any) => [c.classId, c]));
  const r1 = (v: number) => Math.round(v * 10) / 10;

  // 2. The workbench, tallying in the browser.
  await page.goto(`/reads/${readId}`);
  await expect(page.getByRole('progressbar', { name: 'Cells counted' })).toHaveAttribute('aria-valuenow', String(api.cellsCounted));
  const pct = page.getByTestId('pct-normal');
  await expect(pct).toContainText(`${r1(api.pctNormal).toFixed(1)} % normal`);
  await expect(pct).toContainText(`${r1(api.normalIntervalPct.lower).toFixed(1)}–${r1(api.normalIntervalPct.upper).toFixed(1)} %`);
  const tally = page.getByRole('table', { name: 'Tally by class' });
  for (const c of [...sperm, ...nonSperm]) {
    const row = tally.getByRole('row', { name: new RegExp(`^${c.name.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}`) });
    const [, read, pctCell] = await cellsOf(row).allTextContents();
    expect(num(read), c.name).toBe(perClass.get(c.key)!.count);
    if (c.countsAsSperm) expect(num(pctCell), c.name).toBe(r1(perClass.get(c.key)!.pctOfCells!));
  }
  await expect(page.getByText(`With extra defect tags: ${api.defectFrequency.totalDefects} defects on ${api.cellsCounted} cells (defect frequency ${r1(api.defectFrequency.sumPct).toFixed(1)} % of cells`)).toBeVisible();

  // Submit, so the collection page also works out the PMMN from this read.
  expect((await page.request.post(`/api/reads/${readId}/submit`)).status()).toBe(200);

  // 3. The collection page.
  await page.goto(`/collections/${collectionId}`);
  const card = page.getByRole('region', { name: /^First read by / });
  await expect(card.getByTestId('read-headline')).toContainText(`${r1(api.pctNormal).toFixed(1)} % normal`);
  await expect(card.getByTestId('read-headline')).toContainText(`95 % interval ${r1(api.normalIntervalPct.lower).toFixed(1)}–${r1(api.normalIntervalPct.upper).toFixed(1)} %`);
  await expect(card.getByTestId('read-headline')).toContainText(`${api.cellsCounted} of ${api.target} cells`);
  await expect(card.getByTestId('read-headline')).toContainText(`${api.nonSpermCounted} non-sperm cells tallied apart`);
  const table = card.getByRole('table', { name: 'First read counts per class' });
  const freq = new Map<string, { cellsWithDefect: number; pctOfCells: number }>(api.defectFrequency.perClass.map((d: any) => [d.classId, d]));
  for (const c of sperm.filter((s) => perClass.get(s.key)!.count > 0)) {
    const [, cellsText, pctText, withDefect] = await cellsOf(table.getByRole('row', { name: new RegExp(`^${c.name.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}`) })).allTextContents();
    expect(num(cellsText), c.name).toBe(perClass.get(c.key)!.count);
    expect(num(pctText), c.name).toBe(r1(perClass.get(c.key)!.pctOfCells!));
    if (freq.has(c.key)) expect(withDefect, c.name).toBe(`${freq.get(c.key)!.cellsWithDefect} (${r1(freq.get(c.key)!.pctOfCells).toFixed(1)})`);
  }
  await expect(card).toContainText(`${api.defectFrequency.totalDefects} defects on ${api.cellsCounted} cells, a defect frequency of ${r1(api.defectFrequency.sumPct).toFixed(1)} %`);
  // PMMN = 7.5 × 10^9 × 60 % × % normal (the PMMN definition, docs/references.md), from this read.
  await expect(page.getByTestId('pmmn')).toContainText(`at ${r1(api.pctNormal).toFixed(1)} % normal from the first read`);

  // 4. The collection list.
  await page.goto('/collections');
  await page.getByLabel('Search stallion, collector or remarks').fill(remark);
  const list = page.getByRole('table', { name: 'Collections' });
  await expect(list.getByRole('row')).toHaveCount(2);
  await expect(list.getByRole('row').nth(1)).toContainText(`${api.cellsCounted} cells · ${r1(api.pctNormal).toFixed(1)} % normal`);
});
