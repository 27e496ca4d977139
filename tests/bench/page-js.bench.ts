// @bench-runs 1 (the bytes of one build do not vary)
//
// The JavaScript the scoring page (/reads/:id) makes a browser fetch, in gzip bytes, read from the
// build's own output (NEXT_DIST_DIR, default .next): the framework's main files, every chunk the
// page's route tree names in its client reference manifest, and the chunks of its dynamic imports
// (the canvas). Baseline in the same build: the app's blank page (the not-found page, root layout
// only). Usage: npx tsx tests/bench/page-js.bench.ts [--gzip-level 6]
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { arg, emitFigures } from './support';

const DIST = process.env.NEXT_DIST_DIR || '.next';
const LEVEL = arg('gzip-level', 6);
/** The scoring page may add at most this much gzip JavaScript over a blank page of the app. */
const TARGET_EXTRA_KB = 250;

function pageFiles(page: string): string[] {
  const dir = join(DIST, 'server', 'app', page);
  const manifestFile = `${dir}_client-reference-manifest.js`;
  if (!existsSync(manifestFile)) throw new Error(`no build output for ${page} in ${DIST} (run next build with NEXT_DIST_DIR=${DIST})`);
  const sandbox = { __RSC_MANIFEST: {} as Record<string, { entryJSFiles: Record<string, string[]> }> };
  new Function('globalThis', readFileSync(manifestFile, 'utf8'))(sandbox);
  const manifest = sandbox.__RSC_MANIFEST[`/${page}`];
  if (!manifest) throw new Error(`the manifest of ${page} does not name it`);
  const build = JSON.parse(readFileSync(join(dir, 'build-manifest.json'), 'utf8')) as { rootMainFiles: string[] };
  const loadableFile = join(dir, 'react-loadable-manifest.json');
  const loadable = existsSync(loadableFile) ? Object.values(JSON.parse(readFileSync(loadableFile, 'utf8')) as Record<string, { files: string[] }>).flatMap((e) => e.files) : [];
  return [...new Set([...build.rootMainFiles, ...Object.values(manifest.entryJSFiles).flat(), ...loadable])].filter((f) => f.endsWith('.js'));
}

function size(files: string[]) {
  let raw = 0;
  let gzip = 0;
  for (const f of files) {
    const bytes = readFileSync(join(DIST, f));
    raw += bytes.length;
    gzip += gzipSync(bytes, { level: LEVEL }).length;
  }
  return { files: files.length, raw, gzip };
}

const scoring = size(pageFiles('(lab)/reads/[id]/page'));
const blank = size(pageFiles('_not-found/page'));
const kb = (b: number) => (b / 1024).toFixed(1);
console.log(`\nJavaScript of a page, from the build in ${DIST} (gzip level ${LEVEL})\n`);
console.log('| page | files | bytes | gzip KiB | vs blank page |');
console.log('|---|---|---|---|---|');
console.log(`| blank page of the app (not-found, root layout) (baseline) | ${blank.files} | ${blank.raw} | ${kb(blank.gzip)} | 1.00 |`);
console.log(`| scoring page /reads/:id (workbench, canvas) | ${scoring.files} | ${scoring.raw} | ${kb(scoring.gzip)} | ${(scoring.gzip / blank.gzip).toFixed(2)} |`);
const extra = (scoring.gzip - blank.gzip) / 1024;
console.log(`\nTarget: the scoring page adds at most ${TARGET_EXTRA_KB} KiB gzip over the blank page — ${extra <= TARGET_EXTRA_KB ? 'met' : 'NOT met'} (${extra.toFixed(1)} KiB).`);
emitFigures('page-js', [
  { name: 'scoring page JavaScript, gzip', unit: 'KiB', value: scoring.gzip / 1024, baseline: { name: 'blank page of the app', value: blank.gzip / 1024 }, better: 'lower', target: null, details: { raw_bytes: scoring.raw, files: scoring.files } },
  { name: 'scoring page JavaScript over the blank page, gzip', unit: 'KiB', value: extra, baseline: null, better: 'lower', target: { on: 'value', max: TARGET_EXTRA_KB } },
]);
