import { expect, test, type Browser, type Page } from '@playwright/test';
import { generateField } from '../../lib/synthetic/generate-field';
import { signIn, USERS } from './support/auth';

/*
 * The second read from the collection page: a first read built through the API by the
 * technician; the second reader starts the second read with the page's button, is told the read
 * is blind and sees none of the first read's figures; once both are submitted the veterinarian
 * sees both reads and their agreement figures.
 */

async function as(browser: Browser, email: string): Promise<Page> {
  const page = await (await browser.newContext()).newPage();
  await signIn(page, email);
  return page;
}

async function markCells(page: Page, readId: number, imageId: string, cells: { x: number; y: number; classKey: string }[]) {
  const changes = cells.map((c) => {
    const id = crypto.randomUUID();
    return { opId: crypto.randomUUID(), markId: id, kind: 'upsert', payload: { id, imageId, ...c, tags: [] } };
  });
  const r = await page.request.post(`/api/reads/${readId}/sync`, { data: { changes } });
  expect(r.status(), await r.text()).toBe(200);
}

test('a blind second read started from the collection page, then the agreement figures', async ({ browser }) => {
  const tech = await as(browser, USERS.tech);
  const stallionId = ((await (await tech.request.get('/api/stallions?pageSize=5')).json()) as { rows: { id: number }[] }).rows[0]!.id;
  const col = await tech.request.post('/api/collections', {
    data: { stallionId, collectedAt: new Date(Date.now() - 3_600_000).toISOString(), volumeMl: 50, concentrationMethod: 'entered', concentrationMillionPerMl: 150, totalMotilityPct: 70, progressiveMotilityPct: 60, preparation: 'eosin_nigrosin', optics: 'bright_field', magnification: 1000 },
  });
  expect(col.status(), await col.text()).toBe(201);
  const collectionId = ((await col.json()) as { collection: { id: number } }).collection.id;
  const field = await generateField({ seed: Date.now() % 100_000, width: 800, height: 600, cells: 4, format: 'jpeg' });
  const up = await tech.request.post(`/api/collections/${collectionId}/images?name=second.jpg&micronsPerPixel=0.25`, { headers: { 'content-type': 'application/octet-stream' }, data: field.image });
  const imageId = String(((await up.json()) as { image: { id: number } }).image.id);
  const firstId = ((await (await tech.request.post(`/api/collections/${collectionId}/reads`, { data: { kind: 'first' } })).json()) as { read: { id: number } }).read.id;
  // 7 of 8 normal: 87.5 % in the first read.
  const cells = Array.from({ length: 8 }, (_, i) => ({ x: 50 + i * 80, y: 100, classKey: i < 7 ? 'normal' : 'abnormal_head' }));
  await markCells(tech, firstId, imageId, cells);
  expect((await tech.request.post(`/api/reads/${firstId}/submit`)).status()).toBe(200);
  // The first reader is offered no second read of their own collection.
  await tech.goto(`/collections/${collectionId}`);
  await expect(tech.getByRole('region', { name: /^First read by Tamsin Reedway/ })).toBeVisible();
  await expect(tech.getByRole('button', { name: 'Start second read' })).toHaveCount(0);

  const reader = await as(browser, USERS.reader);
  await reader.goto(`/collections/${collectionId}`);
  await reader.getByRole('button', { name: 'Start second read' }).click();
  await reader.waitForURL(/\/reads\/\d+$/);
  const secondId = Number(reader.url().split('/').at(-1));
  await reader.goto(`/collections/${collectionId}`);
  await expect(reader.getByText(/Your second read of this collection is blind/)).toBeVisible();
  await expect(reader.getByRole('region', { name: /^First read by/ })).toHaveCount(0);
  await expect(reader.getByText('87.5 % normal')).toHaveCount(0);
  await expect(reader.getByRole('link', { name: 'Continue second read' })).toBeVisible();

  // The second reader calls one normal cell a head defect: 6 of 8, 75 %.
  await markCells(reader, secondId, imageId, cells.map((c, i) => ({ ...c, x: c.x + 2, classKey: i === 0 ? 'abnormal_head' : c.classKey })));
  expect((await reader.request.post(`/api/reads/${secondId}/submit`)).status()).toBe(200);

  const vet = await as(browser, USERS.vet);
  await vet.goto(`/collections/${collectionId}`);
  await expect(vet.getByRole('region', { name: /^Second read by Orrin Halvard/ })).toBeVisible();
  const agreement = vet.getByRole('region', { name: 'Agreement of the two reads' });
  await expect(agreement.getByTestId('agreement-pairs')).toHaveText('8');
  await expect(agreement.getByTestId('agreement-disagreements')).toHaveText('1');
  // 87.5 % against 75 %: 12.5 points, within the limit for 8 cells each (1.96 × √(81.25 × 18.75 × 2/8) ≈ 38.3, by hand).
  await expect(agreement.getByTestId('agreement-difference')).toContainText('within the limit');
  await expect(agreement.getByRole('table', { name: 'Classes given by the two readers to paired cells' })).toBeVisible();
});
