import { createHash } from 'node:crypto';
import fs from 'node:fs';
import { expect, test, type Browser, type Page } from '@playwright/test';
import knexFactory from 'knex';
import { knexConfig } from '../../knexfile';
import { DEMO_CLIENT_USER_EMAIL } from '../../lib/demo/scenario';
import { buildReportCollection } from '../support/report-collections';
import { DEMO_PASSWORD, signIn, USERS } from './support/auth';

// The end of the chain in the browser: a veterinarian signs a report, waits for its PDF, downloads
// and sends it; the owner sees it in the portal and downloads it; the verification page says
// "current"; after an amendment and a second signing it says "superseded" for the old code.
const MAIL_WEB_URL = process.env.MAIL_WEB_URL ?? 'http://127.0.0.1:1090';
const sha256 = (file: string) => createHash('sha256').update(fs.readFileSync(file)).digest('hex');

async function asUser(browser: Browser, email: string): Promise<Page> {
  const page = await (await browser.newContext({ acceptDownloads: true })).newPage();
  await signIn(page, email);
  return page;
}

async function download(page: Page, name: string | RegExp): Promise<string> {
  const [file] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name }).click()]);
  const path = await file.path();
  expect(file.suggestedFilename()).toMatch(/ report v\d\.pdf$/);
  return path!;
}

test('sign, download and send a report; the owner downloads it; the code is current, then superseded', async ({ browser }) => {
  test.setTimeout(180_000);
  const db = knexFactory(knexConfig());
  let collectionId: number;
  let stallionName: string;
  try {
    const owner = await db('users').where({ email: DEMO_CLIENT_USER_EMAIL }).first('client_id');
    const stallion = await db('stallions').where({ client_id: owner.client_id }).orderBy('name').first('id', 'name');
    stallionName = stallion.name;
    // Collected yesterday, so it heads the veterinarian's list.
    ({ collectionId } = await buildReportCollection(db, { reads: 'settled', stallionId: stallion.id, collectedAt: new Date(Date.now() - 86_400_000) }));
  } finally {
    await db.destroy();
  }

  // The veterinarian: from the dashboard's "ready to sign" to a signed report.
  const vet = await asUser(browser, USERS.vet);
  await vet.goto('/dashboard');
  const ready = vet.getByRole('region', { name: 'Ready to sign' });
  await ready.getByRole('link', { name: new RegExp(stallionName) }).first().click();
  await expect(vet).toHaveURL(new RegExp(`/collections/${collectionId}/report$`));
  await expect(vet.getByText('Yes: every read is submitted and settled.')).toBeVisible();
  await vet.getByRole('textbox', { name: 'Remarks' }).fill('Droplets within this stallion’s usual range.');
  await vet.getByRole('textbox', { name: 'Interpretation' }).fill('Suitable for the planned inseminations.');
  await vet.getByLabel('Your password (to sign)').fill(DEMO_PASSWORD);
  await vet.getByRole('button', { name: 'Sign report' }).click();
  await expect(vet).toHaveURL(/\/reports\/\d+$/);
  const v1 = Number(vet.url().split('/').pop());
  await expect(vet.getByTestId('report-status')).toHaveText('Current');
  // "Preparing PDF…" until the background render has stored it.
  const pdfLink = vet.getByRole('link', { name: 'Download the signed PDF' });
  await expect(pdfLink).toBeVisible({ timeout: 60_000 });
  const shownSha = (await vet.getByText(/^SHA-256/).textContent())!.match(/[0-9a-f]{64}/)![0];
  expect(sha256(await download(vet, 'Download the signed PDF'))).toBe(shownSha);
  const code = ((await (await vet.request.get(`/api/reports/${v1}`)).json()) as { report: { verificationCode: string } }).report.verificationCode;
  await expect(vet.getByText(code).first()).toBeVisible();

  // Send it to the owner and a referring vet.
  const referring = `referring-${Date.now()}@pennacott-vets.example`;
  const send = vet.getByRole('form', { name: 'Send the report' });
  await expect(send.getByLabel(/To the owner/)).toBeChecked();
  await send.getByLabel('Other addresses (separated by commas)').fill(referring);
  await send.getByRole('button', { name: 'Send report' }).click();
  await expect(send.getByRole('status')).toContainText(`Sent to ${DEMO_CLIENT_USER_EMAIL}, ${referring}`);
  const sendings = vet.getByRole('table', { name: 'Sendings' });
  await expect(sendings.getByRole('row', { name: new RegExp(referring) })).toContainText('Sent');
  await expect
    .poll(async () => ((await (await fetch(`${MAIL_WEB_URL}/api/email`)).json()) as { to: { address: string }[] }[]).some((m) => m.to.some((t) => t.address === referring)), { timeout: 15_000 })
    .toBe(true);

  // The owner: the report in the portal, and the same PDF.
  const owner = await asUser(browser, USERS.owner);
  await owner.goto('/portal');
  await owner.getByRole('list', { name: `Signed reports of ${stallionName}` }).getByRole('link', { name: /version 1/ }).first().click();
  await expect(owner).toHaveURL(`/portal/reports/${v1}`);
  await expect(owner.getByTestId('report-status')).toHaveText('Current');
  expect(sha256(await download(owner, 'Download the signed PDF'))).toBe(shownSha);

  // Anyone with the code.
  const anyone = await (await browser.newContext()).newPage();
  await anyone.goto(`/verify/${code}`);
  await expect(anyone.getByRole('heading', { name: 'Genuine signed report' })).toBeVisible();
  await expect(anyone.getByTestId('verify-status')).toHaveText(/^Current/);
  await expect(anyone.getByTestId('verify-sha256')).toHaveText(shownSha);

  // An amendment, and the corrected report signed as version 2.
  await vet.goto(`/reports/${v1}`);
  await vet.getByLabel('Reason for the amendment').fill('Interpretation completed after the follow-up examination.');
  await vet.getByRole('button', { name: 'Amend report' }).click();
  await expect(vet).toHaveURL(new RegExp(`/collections/${collectionId}/report$`));
  await expect(vet.getByTestId('report-state')).toContainText('Amended');
  await vet.getByLabel('Your password (to sign)').fill(DEMO_PASSWORD);
  await vet.getByRole('button', { name: 'Sign report' }).click();
  await expect(vet).toHaveURL(/\/reports\/\d+$/);
  expect(Number(vet.url().split('/').pop())).not.toBe(v1);
  await expect(vet.getByText('Version 2 — supersedes version 1: Interpretation completed after the follow-up examination.')).toBeVisible();

  await anyone.goto(`/verify/${code}`);
  await expect(anyone.getByTestId('verify-status')).toHaveText(/^Superseded by version 2/);
  await owner.goto(`/portal/reports/${v1}`);
  await expect(owner.getByTestId('report-status')).toHaveText('Superseded by version 2');
  await expect(owner.getByText('Superseded by version 2: Interpretation completed after the follow-up examination.')).toBeVisible();
});

test('a wrong password at sign-off is refused on the page, and nothing is signed', async ({ browser }) => {
  const db = knexFactory(knexConfig());
  let collectionId: number;
  try {
    ({ collectionId } = await buildReportCollection(db, { reads: 'settled' }));
  } finally {
    await db.destroy();
  }
  const vet = await asUser(browser, USERS.vet);
  await vet.goto(`/collections/${collectionId}/report`);
  await vet.getByLabel('Your password (to sign)').fill('not-my-password');
  await vet.getByRole('button', { name: 'Sign report' }).click();
  await expect(vet.getByRole('alert').filter({ hasText: 'That is not your password' })).toBeVisible();
  await expect(vet).toHaveURL(new RegExp(`/collections/${collectionId}/report$`));
  await expect(vet.getByTestId('report-state')).toHaveText('Draft: not signed yet.');
});
