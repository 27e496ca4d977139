import { expect, test, type APIRequestContext } from '@playwright/test';
import bcrypt from 'bcryptjs';
import knexFactory from 'knex';
import { knexConfig } from '../../knexfile';
import { signIn, USERS } from './support/auth';

const MAIL_WEB_URL = process.env.MAIL_WEB_URL ?? 'http://127.0.0.1:1090';

test('a lab manager invites a technician, who sets a password and signs in; deactivation locks them out', async ({ page, browser, request }) => {
  const email = `e2e-${Date.now()}@quillfield.example`;
  await signIn(page, USERS.manager);
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Users' }).click();
  await page.getByLabel('Name').fill('Bryony Castellan');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Role', { exact: true }).selectOption('technician');
  await page.getByRole('button', { name: 'Send invitation' }).click();
  await expect(page.getByRole('status')).toHaveText(`Invitation sent to ${email}.`);
  await expect(page.getByRole('row', { name: /Bryony Castellan/ })).toContainText('Invited');

  let link = '';
  await expect(async () => {
    const mails = (await (await request.get(`${MAIL_WEB_URL}/api/email`)).json()) as { text: string; to: { address: string }[] }[];
    const mine = mails.find((m) => m.to.some((t) => t.address === email));
    link = mine?.text.match(/https?:\/\/\S+\/invite\/\S+/)?.[0] ?? '';
    expect(link).not.toBe('');
  }).toPass();

  const ctx = await browser.newContext();
  const newcomer = await ctx.newPage();
  await newcomer.goto(new URL(link).pathname);
  await newcomer.getByLabel('New password').fill('short');
  await newcomer.getByLabel('Repeat the password').fill('short');
  await newcomer.getByRole('button', { name: 'Set password' }).click();
  await expect(newcomer.getByText('Use at least 10 characters.', { exact: true })).toBeVisible();
  await newcomer.getByLabel('New password').fill('a-good-long-password');
  await newcomer.getByLabel('Repeat the password').fill('a-good-long-password');
  await newcomer.getByRole('button', { name: 'Set password' }).click();
  await expect(newcomer.getByText('Your password is set.')).toBeVisible();
  await signIn(newcomer, email, 'a-good-long-password');
  await expect(newcomer.getByRole('heading', { name: /Good to see you, Bryony/ })).toBeVisible();

  // The link works once only.
  const again = await ctx.newPage();
  await again.goto(new URL(link).pathname);
  await expect(again.getByRole('heading', { name: 'This link cannot be used' })).toBeVisible();

  await page.getByRole('row', { name: /Bryony Castellan/ }).getByRole('button', { name: /Deactivate/ }).click();
  await expect(page.getByRole('row', { name: /Bryony Castellan/ })).toContainText('Deactivated');
  await newcomer.reload();
  await expect(newcomer).toHaveURL(/\/sign-in/);
  await ctx.close();
});

async function linkFor(request: APIRequestContext, email: string, nth: number): Promise<string> {
  let link = '';
  await expect(async () => {
    const mails = (await (await request.get(`${MAIL_WEB_URL}/api/email`)).json()) as { text: string; to: { address: string }[] }[];
    const mine = mails.filter((m) => m.to.some((t) => t.address === email));
    link = mine[nth]?.text.match(/https?:\/\/\S+\/invite\/\S+/)?.[0] ?? '';
    expect(link).not.toBe('');
  }).toPass();
  return link;
}

test('a lab manager sends a password reset; the user sets a new password and the old one stops working', async ({ page, browser, request }) => {
  const email = `e2e-reset-${Date.now()}@quillfield.example`;
  const db = knexFactory(knexConfig());
  try {
    await db('users').insert({ email, name: 'Linnet Corrowby', role: 'technician', active: true, password_hash: await bcrypt.hash('forgotten-password-1', 4) });
  } finally {
    await db.destroy();
  }
  await page.goto('/sign-in');
  await expect(page.getByText(/Forgotten your password\? Your lab manager can send you a link/)).toBeVisible();

  await signIn(page, USERS.manager);
  await page.goto('/admin/users');
  await page.getByRole('row').filter({ hasText: email }).getByRole('button', { name: /Send password reset/ }).click();
  await expect(page.getByRole('status')).toHaveText(`A link to set a new password was sent to ${email}.`);
  const link = await linkFor(request, email, 0);

  const ctx = await browser.newContext();
  const user = await ctx.newPage();
  await user.goto(new URL(link).pathname);
  await expect(user.getByRole('heading', { name: 'Set a new password' })).toBeVisible();
  await user.getByLabel('New password').fill('a-brand-new-password');
  await user.getByLabel('Repeat the password').fill('a-brand-new-password');
  await user.getByRole('button', { name: 'Set password' }).click();
  await expect(user.getByText('Your password is set.')).toBeVisible();

  await user.goto('/sign-in');
  await user.getByLabel('E-mail').fill(email);
  await user.getByLabel('Password').fill('forgotten-password-1');
  await user.getByRole('button', { name: 'Sign in' }).click();
  await expect(user.locator('#sign-in-error')).toHaveText(/e-mail or password is wrong/);
  await signIn(user, email, 'a-brand-new-password');
  await expect(user.getByRole('heading', { name: /Good to see you, Linnet/ })).toBeVisible();
  await ctx.close();
});
