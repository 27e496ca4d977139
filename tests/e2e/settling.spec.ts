import { expect, test } from '@playwright/test';
import knexFactory from 'knex';
import { knexConfig } from '../../knexfile';
import { buildReportCollection } from '../support/report-collections';
import { signIn, USERS } from './support/auth';

// Settling by keyboard only: the second reader walks a prepared collection's six disagreements
// (the first and second reads of the example's cells, six cells given different classes), takes
// the second reader's class on each with one key, and the collection page then rests its figures
// on the settled read.
test('settle every disagreement by keyboard, then the collection page shows the settled read’s totals', async ({ page }) => {
  test.setTimeout(120_000);
  const db = knexFactory(knexConfig());
  let collectionId: number;
  try {
    const built = await buildReportCollection(db, { reads: 'unsettled' });
    collectionId = built.collectionId;
    // Its marks lie on its first image: show a real stored field image there (a demo one, 2000 × 1500 px).
    const demo = await db('field_images').where('display_key', 'not like', 'missing/%').where('width', '>=', 1600).orderBy('id').first();
    await db('field_images').where({ id: built.imageIds[0] }).update({ original_key: demo.original_key, display_key: demo.display_key, thumb_key: demo.thumb_key, width: demo.width, height: demo.height, display_width: demo.display_width, display_height: demo.display_height });
  } finally {
    await db.destroy();
  }

  await signIn(page, USERS.reader);
  await page.goto(`/collections/${collectionId}`);
  await expect(page.getByTestId('pmmn')).toContainText('first read (checked by a second reader; 6 disagreements not settled yet)');
  await page.getByRole('link', { name: 'Settle disagreements (0 of 6 settled)' }).click();
  await expect(page.getByRole('heading', { name: 'Settle disagreements' })).toBeVisible();
  const progress = page.getByTestId('settle-progress');
  await expect(progress).toHaveText('0 of 6 settled');
  await expect(page.getByRole('list', { name: 'Settle keys' })).toContainText('Not a cell');

  // Walk forward and back, open the class list and leave it without deciding.
  await page.keyboard.press('n');
  await expect(page.getByTestId('settle-position')).toContainText('Disagreement 2 of 6');
  await page.keyboard.press('p');
  await expect(page.getByTestId('settle-position')).toContainText('Disagreement 1 of 6');
  await page.keyboard.press('o');
  await expect(page.getByRole('dialog', { name: 'Another class' })).toBeVisible();
  await page.keyboard.press('Escape');
  await expect(page.getByRole('dialog', { name: 'Another class' })).toBeHidden();
  await expect(progress).toHaveText('0 of 6 settled');

  for (let i = 1; i <= 6; i++) {
    await page.keyboard.press('s');
    await expect(progress).toHaveText(`${i} of 6 settled`);
  }
  await expect(page.getByText('Every disagreement is settled and the settled read is written')).toBeVisible({ timeout: 20_000 });
  await expect(page.getByRole('status').filter({ hasText: 'All decisions saved' })).toBeVisible();

  // The settled read holds the second reader's classes, the example's cells: 81 of 263 sperm
  // cells normal = 30.8 % (lib/reports/fixture.ts, Newcombe 1998's worked example).
  await page.goto(`/collections/${collectionId}`);
  const settled = page.getByRole('region', { name: 'Settled read by Orrin Halvard' });
  await expect(settled.getByTestId('read-headline')).toContainText('30.8 % normal');
  await expect(settled.getByTestId('read-headline')).toContainText('263 of 200 cells');
  await expect(page.getByTestId('pmmn')).toContainText('at 30.8 % normal from the settled read');
  await expect(page.getByRole('link', { name: /Settle disagreements/ })).toHaveCount(0);
});
