import { expect, test } from '@playwright/test';
import { signIn, USERS } from './support/auth';

test('a technician records a collection through the form and sees the arithmetic', async ({ page }) => {
  await signIn(page, USERS.tech);
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Collections' }).click();
  await page.getByRole('link', { name: 'Record a collection' }).click();
  await expect(page.getByRole('heading', { name: 'Record a collection' })).toBeVisible();
  const stallion = page.getByLabel('Stallion', { exact: true });
  await stallion.selectOption({ index: 1 });
  const stallionName = (await stallion.locator('option:checked').textContent())!.trim();

  // Impossible values are refused beside the field, nothing is saved.
  await page.getByLabel('Gel-free volume (mL)').fill('50');
  await page.getByLabel('Concentration (10⁶/mL)').fill('150');
  await page.getByLabel('Total motility (%)').fill('55');
  await page.getByLabel('Progressive motility (%)').fill('60');
  await page.getByRole('button', { name: 'Save collection' }).click();
  await expect(page.getByText('Progressive motility cannot exceed total motility.')).toBeVisible();
  await expect(page).toHaveURL(/\/collections\/new/);

  // Worked example (computed from Kavak et al. 2003 and Brinsko 2006; docs/references.md): 50 mL × 150 × 10^6/mL = 7.5 × 10^9; 60 % → 4.5 × 10^9 PMS;
  // 9 fresh doses of 0.5 × 10^9 PMS, 4 cooled doses of 1 × 10^9 with 0.5 × 10^9 left.
  await page.getByLabel('Total motility (%)').fill('70');
  await page.getByLabel('Collected by').fill('Hollis Marwick');
  await page.getByLabel('Remarks').fill('Recorded by the browser test');
  await page.getByRole('button', { name: 'Save collection' }).click();

  await expect(page.getByRole('heading', { name: /Collection of/ })).toBeVisible();
  await expect(page.getByRole('link', { name: stallionName })).toBeVisible();
  await expect(page.getByTestId('total-sperm')).toHaveText('7.50 × 10⁹');
  await expect(page.getByTestId('pms')).toHaveText('4.50 × 10⁹');
  await expect(page.getByText('waiting for the morphology read').first()).toBeVisible();
  const doses = page.getByRole('region', { name: 'Insemination doses' });
  await expect(doses.getByRole('row', { name: /Fresh/ })).toContainText('9');
  await expect(doses.getByRole('row', { name: /Cooled/ })).toContainText('4');
  await expect(doses.getByRole('row', { name: /Cooled/ })).toContainText('0.50 × 10⁹');
});

test('an unusual value is accepted with a visible warning', async ({ page }) => {
  await signIn(page, USERS.tech);
  await page.goto('/collections/new');
  await page.getByLabel('Stallion', { exact: true }).selectOption({ index: 1 });
  await page.getByLabel('Gel-free volume (mL)').fill('250');
  await expect(page.getByText(/Volume above 200 mL is unusual/)).toBeVisible();
  await page.getByLabel('Concentration (10⁶/mL)').fill('100');
  await page.getByLabel('Total motility (%)').fill('60');
  await page.getByLabel('Progressive motility (%)').fill('50');
  await page.getByRole('button', { name: 'Save collection' }).click();
  await expect(page.getByRole('list', { name: 'Warnings' })).toContainText('Volume above 200 mL is unusual');
});

test('lists sort and filter on the server', async ({ page }) => {
  await signIn(page, USERS.vet);
  await page.goto('/stallions');
  const table = page.getByRole('table', { name: 'Stallions' });
  await expect(table).toHaveAttribute('aria-busy', 'false');
  await table.getByRole('button', { name: 'Name' }).click();
  await expect(table.getByRole('columnheader', { name: /Name/ })).toHaveAttribute('aria-sort', 'descending');
  await expect(table).toHaveAttribute('aria-busy', 'false');
  const first = await table.getByRole('row').nth(1).getByRole('cell').first().textContent();
  await page.getByLabel('Search name, breed, owner or number').fill(first!.trim());
  await expect(table.getByRole('row')).toHaveCount(2);
  await table.getByRole('link', { name: first!.trim() }).click();
  await expect(page.getByRole('heading', { name: first!.trim(), level: 1 })).toBeVisible();
  await expect(page.getByRole('heading', { name: 'Testicular measurements and daily sperm output' })).toBeVisible();
});
