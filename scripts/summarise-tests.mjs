// One closing line for the whole run: "N passed, N failed" over vitest and Playwright.
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';

const dir = process.argv[2];
let passed = 0, failed = 0, skipped = 0;
const v = join(dir, 'vitest.json');
if (existsSync(v)) {
  const r = JSON.parse(readFileSync(v, 'utf8'));
  passed += r.numPassedTests; failed += r.numFailedTests; skipped += r.numPendingTests + (r.numTodoTests ?? 0);
} else failed += 1;
const p = join(dir, 'playwright.json');
if (existsSync(p)) {
  const s = JSON.parse(readFileSync(p, 'utf8')).stats;
  passed += s.expected + s.flaky; failed += s.unexpected; skipped += s.skipped;
} else failed += 1;
console.log(`${passed} passed, ${failed} failed, ${skipped} skipped`);
process.exit(failed > 0 || passed === 0 ? 1 : 0);
