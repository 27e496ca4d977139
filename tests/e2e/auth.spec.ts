import { expect, test } from '@playwright/test';
import { DEMO_PASSWORD, signIn, USERS } from './support/auth';

const NAV: Record<string, { email: string; has: string[]; hasNot: string[] }> = {
  technician: { email: USERS.tech, has: ['Dashboard', 'Stallions', 'Collections', 'Help and safety'], hasNot: ['Users', 'My stallions'] },
  veterinarian: { email: USERS.vet, has: ['Dashboard', 'Stallions', 'Collections'], hasNot: ['Users', 'Lab settings'] },
  'lab manager': { email: USERS.manager, has: ['Dashboard', 'Users', 'Lab settings'], hasNot: ['My stallions'] },
  client: { email: USERS.owner, has: ['My stallions', 'Help and safety'], hasNot: ['Dashboard', 'Collections', 'Users'] },
};

for (const [role, { email, has, hasNot }] of Object.entries(NAV)) {
  test(`a ${role} signs in and sees their own navigation`, async ({ page }) => {
    await signIn(page, email);
    const nav = page.getByRole('navigation', { name: 'Main' });
    for (const label of has) await expect(nav.getByRole('link', { name: label })).toBeVisible();
    for (const label of hasNot) await expect(nav.getByRole('link', { name: label })).toHaveCount(0);
  });
}

test('a wrong password is refused with a clear message', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(USERS.tech);
  await page.getByLabel('Password').fill('definitely-wrong');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.locator('#sign-in-error')).toHaveText(/e-mail or password is wrong/);
  await expect(page).toHaveURL(/\/sign-in/);
});

test('pages need a session', async ({ page }) => {
  await page.goto('/dashboard');
  await expect(page).toHaveURL(/\/sign-in/);
  await expect(page.getByRole('heading', { name: /Sign in/ })).toBeVisible();
});

test('a client cannot open a staff page', async ({ page }) => {
  await signIn(page, USERS.owner);
  for (const path of ['/dashboard', '/admin/users', '/collections']) {
    await page.goto(path);
    await expect(page.getByRole('heading', { name: 'You do not have access to that page' })).toBeVisible();
  }
  const api = await page.request.get('/api/users');
  expect(api.status()).toBe(403);
});

test('signing out ends the session', async ({ page }) => {
  await signIn(page, USERS.tech);
  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page).toHaveURL(/\/sign-in/);
  expect((await page.request.get('/api/users')).status()).toBe(401);
});

test('the help page shows the safety cautions', async ({ page }) => {
  await signIn(page, USERS.tech);
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Help and safety' }).click();
  await expect(page.getByRole('heading', { name: 'Safety and responsibility' })).toBeVisible();
  await expect(page.getByText(/strike, kick, rear/)).toBeVisible();
  await expect(page.getByText(/Formaldehyde/)).toBeVisible();
});

test('after sign-in, a callback address that would leave the app lands on the role\'s home page instead', async ({ page }) => {
  const appOrigin = new URL(process.env.APP_URL ?? 'http://localhost:3100').origin;
  // Nothing may actually reach another host from here.
  await page.route((url) => url.hostname.endsWith('evil.example'), (route) => route.abort());
  for (const callbackUrl of ['/\\evil.example', '/%09/evil.example', '//evil.example/']) {
    await page.context().clearCookies();
    // '%09' stays a tab once the query is decoded: the browser drops it and reads '//evil.example'.
    await page.goto(`/sign-in?callbackUrl=${encodeURIComponent(callbackUrl).replace('%2509', '%09')}`);
    await page.getByLabel('E-mail').fill(USERS.tech);
    await page.getByLabel('Password').fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect(page.getByRole('heading', { name: /Good to see you/ })).toBeVisible();
    expect(new URL(page.url()).origin, callbackUrl).toBe(appOrigin);
    expect(new URL(page.url()).pathname).toBe('/dashboard');
  }
});

test('after sign-in, a callback address on the app is followed', async ({ page }) => {
  await page.goto('/collections');
  await expect(page).toHaveURL(/\/sign-in\?callbackUrl=/);
  await page.getByLabel('E-mail').fill(USERS.tech);
  await page.getByLabel('Password').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('heading', { name: 'Collections', level: 1 })).toBeVisible();
});
