// Shared by the benchmarks: command-line numbers, quantiles, and a throw-away read in the running app.
import type { Knex } from 'knex';
import { chromium, type Browser, type Page } from '@playwright/test';
import { APP_URL, type Session } from '../integration/support/http';

/** `--name N` from the command line, a whole number of at least `min` (1 unless said). */
export function arg(name: string, fallback: number, min = 1): number {
  const i = process.argv.indexOf(`--${name}`);
  const v = i >= 0 ? Number(process.argv[i + 1]) : fallback;
  if (!Number.isInteger(v) || v < min) throw new Error(`--${name} must be a whole number of at least ${min}`);
  return v;
}

/** The q-quantile (0–1) with linear interpolation between order statistics. */
export function quantile(xs: number[], q: number): number {
  const s = [...xs].sort((a, b) => a - b);
  if (s.length === 0) return NaN;
  const pos = (s.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return s[lo]! + (s[hi]! - s[lo]!) * (pos - lo);
}

export type BenchRead = { collectionId: number; imageId: number; readId: number };

/** The body of a 200/201 answer; anything else stops the benchmark with the answer. */
export async function ok<T>(r: Promise<{ status: number; body: T }>, what: string): Promise<T> {
  const res = await r;
  if (res.status !== 200 && res.status !== 201) throw new Error(`${what}: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body;
}

/** A collection with one field image and a first read, made through the app's own API. */
export async function benchRead(s: Session, image: Uint8Array<ArrayBuffer>, name: string): Promise<BenchRead> {
  const stallion = ((await ok(s.json('/api/stallions?pageSize=5'), 'stallions')) as { rows: { id: number }[] }).rows[0]!;
  const { collection } = (await ok(
    s.json('/api/collections', 'POST', {
      stallionId: stallion.id, collectedAt: new Date().toISOString(), concentrationMethod: 'entered', preparation: 'eosin_nigrosin',
      optics: 'bright_field', magnification: 1000, remarks: 'benchmark collection',
    }),
    'collection',
  )) as { collection: { id: number } };
  const up = await s.fetch(`/api/collections/${collection.id}/images?name=${encodeURIComponent(name)}`, { method: 'POST', body: image });
  if (up.status !== 201 && up.status !== 200) throw new Error(`upload: ${up.status} ${await up.text()}`);
  const { image: stored } = (await up.json()) as { image: { id: number } };
  const { read } = (await ok(s.json(`/api/collections/${collection.id}/reads`, 'POST', { kind: 'first' }), 'read')) as { read: { id: number } };
  return { collectionId: collection.id, imageId: stored.id, readId: read.id };
}

/** Removes what benchRead made (and any other reads of those collections), so the demo stays as it was. */
export async function removeBenchReads(s: Session, db: Knex, made: BenchRead[]): Promise<void> {
  for (const r of made) {
    const reads = await db('reads').where({ collection_id: r.collectionId }).pluck('id');
    await db('marks').whereIn('read_id', reads).delete();
    await db('mark_ops').whereIn('read_id', reads).delete();
    await db('candidate_skips').whereIn('read_id', reads).delete();
    await db('candidate_skip_ops').whereIn('read_id', reads).delete();
    await db('reads').whereIn('id', reads).delete();
    await s.json(`/api/images/${r.imageId}`, 'DELETE');
    await db('collections').where({ id: r.collectionId }).delete();
  }
}

/**
 * One figure of a benchmark, for `npm run bench`'s table (scripts/bench-run.ts): the measured
 * value, the baseline measured in the same run, and the target on the ratio (value ÷ baseline)
 * or on the value itself. `better` says which way is good.
 */
export interface Figure {
  name: string;
  unit: string;
  value: number;
  /** What the value is compared with, measured in the same run (null: an absolute target only). */
  baseline: { name: string; value: number } | null;
  better: 'lower' | 'higher';
  /** The target: on the ratio or on the value, at most or at least `limit`. */
  target: { on: 'ratio' | 'value'; max?: number; min?: number } | null;
  /** Other absolute figures shown beside it (p50, p95, counts…). */
  details?: Record<string, number>;
}

export const BENCH_JSON = 'BENCH_JSON ';

/** Prints the figures as one machine-readable line (the human table stays above it). */
export function emitFigures(bench: string, figures: Figure[]): void {
  for (const f of figures) if (!Number.isFinite(f.value)) throw new Error(`${bench}: figure "${f.name}" is not a number (${f.value})`);
  console.log(`${BENCH_JSON}${JSON.stringify({ bench, figures })}`);
}

export const median = (xs: number[]) => quantile(xs, 0.5);

/**
 * Debian's Chromium with a laptop-sized page signed in as the session's user (its cookies copied
 * over), and the page errors it collects. The caller closes `browser`.
 */
export async function signedInPage(s: Session): Promise<{ browser: Browser; page: Page; errors: string[] }> {
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--no-first-run'],
  });
  const context = await browser.newContext({ viewport: { width: 1366, height: 900 } });
  const url = new URL(APP_URL);
  await context.addCookies(
    s.cookieHeader.split('; ').map((c) => {
      const i = c.indexOf('=');
      return { name: c.slice(0, i), value: c.slice(i + 1), domain: url.hostname, path: '/' };
    }),
  );
  const page = await context.newPage();
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(String(e)));
  return { browser, page, errors };
}
