import { expect, test } from '@playwright/test';
import { signIn, USERS } from './support/auth';

test('a technician’s dashboard: greeting by name, the season with its dates, the reading work lists', async ({ page }) => {
  await signIn(page, USERS.tech);
  await page.goto('/dashboard');
  await expect(page.getByRole('heading', { name: 'Good to see you, Tamsin Reedway', level: 1 })).toBeVisible();
  // "This season" is the year of the newest collection, with the dates it covers — never an empty "last 30 days".
  await expect(page.getByRole('heading', { name: /^Season \d{4}, \d{2} \w{3} \d{4} – \d{2} \w{3} \d{4}$/ })).toBeVisible();
  const collections = page.getByRole('link', { name: /Collections this season/ });
  expect(Number((await collections.textContent())!.match(/^\d+/)![0])).toBeGreaterThan(0);
  await expect(page.getByRole('heading', { name: 'Waiting for a first read' })).toBeVisible();
  await expect(page.getByRole('heading', { name: 'Reads in progress' })).toBeVisible();
  await expect(page.getByRole('heading', { name: 'Waiting for a second read' })).toBeVisible();
  // Never the technician's own first reads: every demo first read is hers.
  await expect(page.getByRole('region', { name: 'Waiting for a second read' }).getByText(/first read by Tamsin Reedway/)).toHaveCount(0);
  await expect(page.getByRole('heading', { name: 'Disagreements to settle' })).toBeVisible();
  await expect(page.getByRole('heading', { name: 'Users and settings' })).toHaveCount(0);
});

test('the second reader’s dashboard lists the demo’s unsettled disagreements, linked to the settle view', async ({ page }) => {
  await signIn(page, USERS.reader);
  await page.goto('/dashboard');
  const list = page.getByRole('region', { name: 'Disagreements to settle' });
  // Seed 07b: Copperline Drifter's collection nearest 24 June (25 June), second-read by this reader, its disagreements undecided.
  const link = list.getByRole('link', { name: /Copperline Drifter · 25 Jun 2026/ });
  await expect(link).toHaveAttribute('href', /^\/collections\/\d+\/settle$/);
  await expect(list.getByRole('listitem').filter({ hasText: /Copperline Drifter · 25 Jun 2026/ })).toContainText(/0 of \d+ settled · second read by Orrin Halvard/);
});

test('a veterinarian is greeted by the name as written and has a place for reports to sign', async ({ page }) => {
  await signIn(page, USERS.vet);
  await page.goto('/dashboard');
  // The name as written, title and all.
  await expect(page.getByRole('heading', { name: 'Good to see you, Dr Maren Kettleby', level: 1 })).toBeVisible();
  await expect(page.getByRole('heading', { name: 'Reports to sign' })).toBeVisible();
});

test('a lab manager’s dashboard has the users and settings shortcuts, not the reading lists', async ({ page }) => {
  await signIn(page, USERS.manager);
  await page.goto('/dashboard');
  const admin = page.getByRole('region', { name: 'Users and settings' });
  await expect(admin.getByRole('link', { name: 'Users' })).toHaveAttribute('href', '/admin/users');
  await expect(admin.getByRole('link', { name: 'Class sets' })).toHaveAttribute('href', '/admin/class-sets');
  await expect(admin.getByRole('link', { name: 'Lab settings' })).toHaveAttribute('href', '/admin/settings');
  await expect(admin).toContainText(/\d+ technicians?,/);
  await expect(page.getByRole('heading', { name: 'Waiting for a first read' })).toHaveCount(0);
});

test('a record that does not exist shows a calm not-found page inside the lab’s pages', async ({ page }) => {
  await signIn(page, USERS.tech);
  for (const path of ['/collections/99999999', '/stallions/99999999', '/reads/99999999']) {
    await page.goto(path);
    await expect(page.getByRole('heading', { name: 'Not found', level: 1 }), path).toBeVisible();
    await expect(page.getByRole('navigation', { name: 'Main' })).toBeVisible();
    await expect(page.getByRole('link', { name: 'Go to the dashboard' })).toBeVisible();
  }
  const res = await page.goto('/no-such-page');
  expect(res?.status()).toBe(404);
  await expect(page.getByRole('heading', { name: 'Not found', level: 1 })).toBeVisible();
});
