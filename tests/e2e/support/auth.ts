import { expect, type Page } from '@playwright/test';

import { DEMO_PASSWORD, USERS } from '../../support/demo-users';

export { DEMO_PASSWORD, USERS };

export async function signIn(page: Page, email: string, password = DEMO_PASSWORD) {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('button', { name: 'Sign out' })).toBeVisible();
  // The page is server-rendered first; wait until it is hydrated and its buttons respond.
  await page.waitForLoadState('networkidle');
}
