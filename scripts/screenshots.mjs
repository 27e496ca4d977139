// Headless screenshots of pages as a given demo user, for reviewing what was built.
// Usage: node scripts/screenshots.mjs <email> <out-dir> <path> [path…]   (app on $APP_URL)
import { chromium } from '@playwright/test';

const [email, out, ...paths] = process.argv.slice(2);
const base = process.env.APP_URL ?? 'http://localhost:3000';
const width = Number(process.env.SHOT_WIDTH ?? 1366);
const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--no-first-run'] });
const height = Number(process.env.SHOT_HEIGHT ?? 900);
const page = await browser.newPage({ viewport: { width, height } });
await page.goto(`${base}/sign-in`);
await page.getByLabel('E-mail').fill(email);
await page.getByLabel('Password').fill('quillfield-demo');
await page.getByRole('button', { name: 'Sign in' }).click();
await page.getByRole('button', { name: 'Sign out' }).waitFor();
for (const p of paths) {
  await page.goto(`${base}${p}`);
  await page.waitForLoadState('networkidle');
  const file = `${out}/${p.replace(/[^a-z0-9]+/gi, '_') || 'root'}-${width}.png`;
  await page.screenshot({ path: file, fullPage: true });
  console.log(file);
}
await browser.close();
