import { expect, test } from '@playwright/test';
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
