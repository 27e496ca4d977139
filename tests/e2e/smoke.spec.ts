import { expect, test, type Page } from '@playwright/test';
import knexFactory from 'knex';
import { knexConfig } from '../../knexfile';
import { demoIds, fill, PAGES, type DemoIds, type Visitor } from '../support/surface';
import { signIn, USERS } from './support/auth';

// Every page each role can reach — from its navigation and from tests/support/surface.ts (with
// demo records for the detail pages) — opened in the browser with the app's real
// Content-Security-Policy. Fails on any 5xx answer, uncaught page error or console error.

// One test per role, spread over the workers.
test.describe.configure({ mode: 'parallel' });

const EMAIL: Record<Exclude<Visitor, 'anonymous'>, string> = { technician: USERS.tech, veterinarian: USERS.vet, lab_manager: USERS.manager, client: USERS.owner, other_client: USERS.otherOwner };
let ids: DemoIds;

test.beforeAll(async () => {
  const db = knexFactory(knexConfig());
  try {
    ids = await demoIds(db);
  } finally {
    await db.destroy();
  }
});

/** Collects what went wrong on the page from now on. */
function watch(page: Page): string[] {
  const problems: string[] = [];
  page.on('response', (r) => {
    if (r.status() >= 500) problems.push(`${r.status()} ${r.request().method()} ${r.url()}`);
  });
  page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
  page.on('console', (m) => {
    if (m.type() === 'error') problems.push(`console error: ${m.text()}`);
  });
  return problems;
}

async function open(page: Page, path: string, problems: string[]) {
  const before = problems.length;
  const res = await page.goto(path);
  await page.waitForLoadState('networkidle');
  expect(res?.status(), path).toBeLessThan(500);
  // Every page has a heading; a blank or half-rendered one has none.
  await expect(page.getByRole('heading').first(), path).toBeVisible();
  expect(problems.slice(before), path).toEqual([]);
}

for (const role of Object.keys(EMAIL) as (keyof typeof EMAIL)[]) {
  test(`every page ${role === 'other_client' ? 'a client of another owner' : `a ${role.replace('_', ' ')}`} can reach opens cleanly`, async ({ page }) => {
    test.setTimeout(180_000);
    const problems = watch(page);
    await signIn(page, EMAIL[role]);
    const nav = await page.getByRole('navigation', { name: 'Main' }).getByRole('link').evaluateAll((links) => links.map((a) => new URL((a as HTMLAnchorElement).href).pathname));
    const listed = PAGES.filter((p) => p.roles.includes(role)).map((p) => fill(p.path, ids));
    const paths = [...new Set([...nav, ...listed])];
    // The navigation must not lead anywhere the list does not know.
    for (const p of nav) expect(listed, `navigation link ${p} is missing from tests/support/surface.ts`).toContain(p);
    for (const path of paths) await open(page, path, problems);
  });
}

test('the public pages open cleanly', async ({ page }) => {
  const problems = watch(page);
  for (const p of PAGES.filter((e) => e.roles.includes('anonymous'))) await open(page, fill(p.path, ids), problems);
});
