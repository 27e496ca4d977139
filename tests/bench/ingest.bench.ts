// @bench-runs 1 (npm run bench: its figures are already medians / quantiles of its own rounds)
// Ingest benchmark: our checks + checksum + browser copies against sharp alone
// making the same copies. Run: npx tsx tests/bench/ingest.bench.ts [--count N] [--rounds R]
//
// - Images: synthetic 12-megapixel fields (4000 × 3000), JPEG, and every third one a
//   16-bit greyscale TIFF (12-bit values, LZW), written to a temp folder.
// - "sharp alone": the idiomatic sharp code for the same outputs, no checks: one
//   pipeline, two clones (display JPEG q90 at full size, 320 px thumbnail). For 16-bit
//   input it uses sharp's own 16→8-bit conversion (÷256, no contrast stretch), so the
//   baseline does strictly less work than the pipeline (which stretches levels).
// - "pipeline": ingestImage (size and magic checks, header, full decode, SHA-256 of the
//   file, display copy, thumbnail).
// - Timing alternates which case runs first for each image and round; sharp's
//   operation cache is off so repeated runs cannot reuse results.
// - Peak RSS: each case also runs alone in a child process over every image, which
//   then reports its own RSS high-water mark (VmHWM); the in-process figure is the
//   largest rise of rss (sampled every 5 ms) while one image of that case runs.
// Exits 0 whatever the numbers are (a measurement, not a test) unless something fails.
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';
import { ingestImage } from '@/lib/images/ingest';
import { generateField, type FieldFormat } from '@/lib/synthetic/generate-field';
import { arg, emitFigures, quantile } from './support';

const LIMITS = { maxBytes: 200 * 1024 * 1024, maxPixels: 50_000_000 };
const TARGET = 1.3;

/** sharp alone: the same two outputs, no checks, no checksum. */
async function sharpAlone(file: string, is16Bit: boolean): Promise<void> {
  const base = sharp(file, { failOn: 'truncated' }).rotate();
  if (is16Bit) base.toColourspace('b-w');
  const [display, thumbnail] = await Promise.all([
    base.clone().jpeg({ quality: 90, mozjpeg: false, chromaSubsampling: '4:2:0' }).toBuffer(),
    base.clone().resize(320, 320, { fit: 'inside', withoutEnlargement: true }).jpeg({ quality: 80 }).toBuffer(),
  ]);
  if (display.length === 0 || thumbnail.length === 0) throw new Error('sharp alone produced an empty copy');
}

async function pipeline(file: string): Promise<void> {
  const r = await ingestImage(file, LIMITS);
  if (!r.ok) throw new Error(`pipeline refused ${file}: ${r.code} ${r.message}`);
}

type CaseName = 'sharp alone' | 'pipeline';
interface Item {
  file: string;
  format: FieldFormat;
  bytes: number;
}

async function runCase(name: CaseName, item: Item): Promise<void> {
  if (name === 'sharp alone') await sharpAlone(item.file, item.format === 'tiff16');
  else await pipeline(item.file);
}

const median = (xs: number[]) => quantile(xs, 0.5);
const p95 = (xs: number[]) => quantile(xs, 0.95);
const mb = (bytes: number) => (bytes / (1024 * 1024)).toFixed(0);

/**
 * This process's own RSS high-water mark. On Linux, resourceUsage().maxRSS of a
 * spawned child starts from the parent's RSS at fork time, so VmHWM is read instead.
 */
function peakRss(): number {
  try {
    const m = /VmHWM:\s+(\d+) kB/.exec(readFileSync('/proc/self/status', 'utf8'));
    if (m) return Number(m[1]) * 1024;
  } catch {
    // not Linux
  }
  return process.resourceUsage().maxRSS * 1024;
}

/** Child mode: run one case over the given files and report the peak RSS. */
async function child(name: CaseName, items: Item[]): Promise<void> {
  sharp.cache(false);
  for (const item of items) await runCase(name, item);
  process.stdout.write(JSON.stringify({ maxRssBytes: peakRss() }) + '\n');
}

function childPeak(name: CaseName | 'idle', items: Item[]): number {
  const self = fileURLToPath(import.meta.url);
  const res = spawnSync(process.execPath, ['--import', 'tsx', self, '--child', name, '--items', JSON.stringify(items)], {
    encoding: 'utf8',
    cwd: process.cwd(),
  });
  if (res.status !== 0) throw new Error(`child ${name} failed: ${res.stderr}`);
  const line = res.stdout.trim().split('\n').pop() ?? '';
  return (JSON.parse(line) as { maxRssBytes: number }).maxRssBytes;
}

async function main(): Promise<void> {
  const ci = process.argv.indexOf('--child');
  if (ci >= 0) {
    const name = process.argv[ci + 1] as CaseName | 'idle';
    const items = JSON.parse(process.argv[process.argv.indexOf('--items') + 1]) as Item[];
    if (name === 'idle') {
      sharp.cache(false);
      process.stdout.write(JSON.stringify({ maxRssBytes: peakRss() }) + '\n');
      return;
    }
    return child(name, items);
  }

  const count = arg('count', 6);
  const rounds = arg('rounds', 3);
  sharp.cache(false);
  const dir = await mkdtemp(join(tmpdir(), 'fieldmark-ingest-bench-'));
  try {
    const items: Item[] = [];
    const genStart = performance.now();
    for (let i = 0; i < count; i++) {
      const format: FieldFormat = i % 3 === 2 ? 'tiff16' : 'jpeg';
      const field = await generateField({ seed: 1000 + i, width: 4000, height: 3000, cells: 110, format });
      const file = join(dir, `field-${i}.${format === 'tiff16' ? 'tif' : 'jpg'}`);
      await writeFile(file, field.image);
      items.push({ file, format, bytes: field.image.length });
    }
    const genMs = performance.now() - genStart;

    // Warm-up: load codecs and JIT both paths once, untimed.
    for (const item of items.slice(0, 3)) {
      await runCase('sharp alone', item);
      await runCase('pipeline', item);
    }

    const times: Record<CaseName, Record<string, number[]>> = { 'sharp alone': {}, pipeline: {} };
    const sampledPeak: Record<CaseName, number> = { 'sharp alone': 0, pipeline: 0 };
    for (let r = 0; r < rounds; r++) {
      for (let i = 0; i < items.length; i++) {
        const order: CaseName[] = (i + r) % 2 === 0 ? ['sharp alone', 'pipeline'] : ['pipeline', 'sharp alone'];
        for (const name of order) {
          const before = process.memoryUsage.rss();
          let peak = before;
          const timer = setInterval(() => {
            peak = Math.max(peak, process.memoryUsage.rss());
          }, 5);
          const t0 = performance.now();
          await runCase(name, items[i]);
          const ms = performance.now() - t0;
          clearInterval(timer);
          peak = Math.max(peak, process.memoryUsage.rss());
          sampledPeak[name] = Math.max(sampledPeak[name], peak - before);
          (times[name][items[i].format] ??= []).push(ms);
          (times[name].all ??= []).push(ms);
        }
      }
    }

    const idle = childPeak('idle', []);
    const childPeaks: Record<CaseName, number> = {
      'sharp alone': childPeak('sharp alone', items),
      pipeline: childPeak('pipeline', items),
    };

    const groups = ['all', ...new Set(items.map((i) => i.format))];
    const label = (g: string) => (g === 'all' ? 'all images' : g === 'tiff16' ? '16-bit grey TIFF' : 'JPEG');
    const lines: string[] = [];
    lines.push(
      `Ingest bench: ${count} synthetic 12-MP fields (${items.filter((i) => i.format === 'jpeg').length} JPEG, ` +
        `${items.filter((i) => i.format === 'tiff16').length} 16-bit TIFF), ${rounds} rounds, ` +
        `generated in ${(genMs / 1000).toFixed(1)} s; node ${process.version}, sharp ${sharp.versions.sharp}, libvips ${sharp.versions.vips}, sharp.concurrency ${sharp.concurrency()}`,
    );
    lines.push(`File sizes: ${items.map((i) => `${(i.bytes / 1e6).toFixed(1)} MB`).join(', ')}`);
    lines.push('');
    lines.push('| case | images | median ms/image | p95 ms | ratio vs sharp alone (median) | peak RSS MB, alone in a child (rise during one image in this run) |');
    lines.push('|---|---|---|---|---|---|');
    let pass = true;
    for (const g of groups) {
      const base = times['sharp alone'][g];
      for (const name of ['sharp alone', 'pipeline'] as CaseName[]) {
        const xs = times[name][g];
        const ratio = median(xs) / median(base);
        if (name === 'pipeline' && ratio > TARGET) pass = false;
        const rss = g === 'all' ? `${mb(childPeaks[name])} (+${mb(sampledPeak[name])})` : '';
        lines.push(
          `| ${name}, ${label(g)} | ${xs.length / rounds} | ${median(xs).toFixed(0)} | ${p95(xs).toFixed(0)} | ${ratio.toFixed(2)} | ${rss} |`,
        );
      }
    }
    lines.push('');
    lines.push(`Idle process with sharp loaded: ${mb(idle)} MB peak RSS.`);
    lines.push(`pipeline ≤ ${TARGET} × sharp alone (median, every group): ${pass ? 'PASS' : 'FAIL'}`);
    console.log(lines.join('\n'));
    const all = (n: CaseName) => times[n].all;
    emitFigures('ingest', [
      { name: 'image ingest (checks, SHA-256, copies), median per 12-MP image', unit: 'ms', value: median(all('pipeline')), baseline: { name: 'sharp alone', value: median(all('sharp alone')) }, better: 'lower', target: { on: 'ratio', max: TARGET }, details: { p95_ms: p95(all('pipeline')), peak_rss_mb: childPeaks.pipeline / 2 ** 20 } },
    ]);
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

main().catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
