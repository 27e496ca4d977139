// npm run bench's runner (scripts/bench.sh starts the services and the app first): runs every
// tests/bench/*.bench.ts a few times, reads the figures each prints on its BENCH_JSON line, takes
// the median of every figure over the runs, prints ONE table and writes bench-results/<commit>.json.
//   tsx scripts/bench-run.ts [--only name,name] [--runs N]
//   tsx scripts/bench-run.ts --compare A B        (two commits' results side by side)
// A bench's header may say `@bench-runs N` (how many runs by default: heavy ones run once, their
// figures being medians of their own rounds already), `@bench-conditions react-server` and
// `@bench-args --option value …` (its own options under npm run bench).
// Each run's full output goes to bench-results/<commit>.log.
import { spawn, execFileSync } from 'node:child_process';
import { appendFileSync, existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { cpus, loadavg } from 'node:os';
import { basename, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { BENCH_JSON, type Figure, quantile } from '../tests/bench/support';

const ROOT = join(fileURLToPath(new URL('.', import.meta.url)), '..');
const OUT = join(ROOT, 'bench-results');
const BENCH_DIR = join(ROOT, 'tests', 'bench');
/** A bench that runs longer than this is stopped and reported as failed. */
const RUN_TIMEOUT_MS = Number(process.env.BENCH_RUN_TIMEOUT_MS ?? 6 * 60_000);

export interface Row {
  bench: string;
  name: string;
  unit: string;
  value: number;
  baseline: { name: string; value: number } | null;
  ratio: number | null;
  better: Figure['better'];
  target: Figure['target'];
  met: boolean | null;
  runs: number;
  /** Every run's value, for the spread. */
  values: number[];
  details: Record<string, number>;
}

export interface Results {
  commit: string;
  dirty: boolean;
  date: string;
  machine: { cpus: number; model: string; loadavg: number[]; node: string };
  rows: Row[];
  failures: { bench: string; run: number; error: string }[];
}

const argValue = (name: string) => {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? process.argv[i + 1] : undefined;
};

const git = (...a: string[]) => execFileSync('git', a, { cwd: ROOT, encoding: 'utf8' }).trim();

export function targetText(t: Figure['target'], unit: string): string {
  if (!t) return '—';
  const bound = t.max !== undefined ? `≤ ${t.max}` : `≥ ${t.min}`;
  return t.on === 'ratio' ? `ratio ${bound}` : `${bound} ${unit}`;
}

export function isMet(t: Figure['target'], value: number, ratio: number | null): boolean | null {
  if (!t) return null;
  const x = t.on === 'ratio' ? ratio : value;
  if (x === null) return null;
  return (t.max === undefined || x <= t.max) && (t.min === undefined || x >= t.min);
}

/** Medians over the runs, figure by figure (a figure missing from a run is left out of it). */
export function combine(bench: string, runs: Figure[][]): Row[] {
  const byName = new Map<string, Figure[]>();
  for (const run of runs) for (const f of run) byName.set(f.name, [...(byName.get(f.name) ?? []), f]);
  return [...byName.entries()].map(([name, fs]) => {
    const med = (xs: number[]) => quantile(xs, 0.5);
    const value = med(fs.map((f) => f.value));
    const first = fs[0]!;
    const baseline = first.baseline ? { name: first.baseline.name, value: med(fs.map((f) => f.baseline?.value ?? NaN)) } : null;
    const ratio = baseline && baseline.value !== 0 ? value / baseline.value : null;
    const keys = [...new Set(fs.flatMap((f) => Object.keys(f.details ?? {})))];
    const details = Object.fromEntries(keys.map((k) => [k, med(fs.map((f) => f.details?.[k] ?? NaN).filter(Number.isFinite))]));
    return { bench, name, unit: first.unit, value, baseline, ratio, better: first.better, target: first.target, met: isMet(first.target, value, ratio), runs: fs.length, values: fs.map((f) => f.value), details };
  });
}

const num = (v: number | null | undefined) => (v === null || v === undefined || !Number.isFinite(v) ? '—' : Math.abs(v) >= 100 ? v.toFixed(0) : Math.abs(v) >= 10 ? v.toFixed(1) : v.toFixed(2));
const metText = (m: boolean | null) => (m === null ? '—' : m ? 'yes' : 'NO');

export function table(rows: Row[]): string {
  const lines = ['| figure | median | unit | baseline (same run) | baseline value | ratio | target | met | runs |', '|---|---|---|---|---|---|---|---|---|'];
  for (const r of rows) lines.push(`| ${r.name} | ${num(r.value)} | ${r.unit} | ${r.baseline?.name ?? '—'} | ${num(r.baseline?.value)} | ${num(r.ratio)} | ${targetText(r.target, r.unit)} | ${metText(r.met)} | ${r.runs} |`);
  return lines.join('\n');
}

export function compareTable(a: Results, b: Results): string {
  const lines = [
    `| figure | unit | ${a.commit.slice(0, 10)} | ${b.commit.slice(0, 10)} | change | ratio A → B | met A → B |`,
    '|---|---|---|---|---|---|---|',
  ];
  const keyOf = (r: Row) => `${r.bench}\u0000${r.name}`;
  const bRows = new Map(b.rows.map((r) => [keyOf(r), r]));
  const aKeys = new Set(a.rows.map(keyOf));
  for (const ra of a.rows) {
    const rb = bRows.get(keyOf(ra));
    const change = rb && ra.value !== 0 ? ((rb.value - ra.value) / ra.value) * 100 : null;
    // "better"/"worse" by the figure's own direction, so a reader need not know each unit.
    const verdict = change === null || Math.abs(change) < 5 ? '' : (change < 0) === (ra.better === 'lower') ? ' (better)' : ' (worse)';
    lines.push(
      `| ${ra.name} | ${ra.unit} | ${num(ra.value)} | ${rb ? num(rb.value) : '—'} | ${change === null ? '—' : `${change >= 0 ? '+' : ''}${change.toFixed(1)} %${verdict}`} | ${num(ra.ratio)} → ${rb ? num(rb.ratio) : '—'} | ${metText(ra.met)} → ${rb ? metText(rb.met) : '—'} |`,
    );
  }
  for (const rb of b.rows) if (!aKeys.has(keyOf(rb))) lines.push(`| ${rb.name} | ${rb.unit} | — | ${num(rb.value)} | — | — → ${num(rb.ratio)} | — → ${metText(rb.met)} |`);
  return lines.join('\n');
}

function resultsFor(ref: string): Results {
  let commit: string;
  try {
    commit = git('rev-parse', '--verify', `${ref}^{commit}`);
  } catch {
    commit = ref;
  }
  const files = existsSync(OUT) ? readdirSync(OUT).filter((f) => f.endsWith('.json') && f.startsWith(commit)) : [];
  if (files.length !== 1) throw new Error(`no bench results for ${ref} (${commit}) in bench-results/; run npm run bench on that commit first`);
  return JSON.parse(readFileSync(join(OUT, files[0]!), 'utf8')) as Results;
}

interface BenchFile {
  name: string;
  file: string;
  runs: number;
  conditions: string | null;
  /** `@bench-args …`: the bench's own options under npm run bench (to keep the whole run bounded). */
  args: string[];
}

export function discover(): BenchFile[] {
  return readdirSync(BENCH_DIR)
    .filter((f) => f.endsWith('.bench.ts'))
    .sort()
    .map((f) => {
      const head = readFileSync(join(BENCH_DIR, f), 'utf8').split('\n').slice(0, 30).join('\n');
      const runs = /@bench-runs (\d+)/.exec(head);
      const cond = /@bench-conditions ([\w-]+)/.exec(head);
      const args = /@bench-args ([^\n(]+)/.exec(head);
      return { name: basename(f, '.bench.ts'), file: join('tests', 'bench', f), runs: runs ? Number(runs[1]) : 3, conditions: cond ? cond[1]! : null, args: args ? args[1]!.trim().split(/\s+/) : [] };
    });
}

function runOnce(b: BenchFile, log: string): Promise<Figure[]> {
  return new Promise((resolve, reject) => {
    const args = ['tsx', ...(b.conditions ? [`--conditions=${b.conditions}`] : []), b.file, ...b.args];
    const child = spawn('npx', args, { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'], detached: true });
    let out = '';
    let err = '';
    child.stdout.on('data', (d: Buffer) => {
      out += d;
      appendFileSync(log, d);
    });
    child.stderr.on('data', (d: Buffer) => {
      err += d;
      appendFileSync(log, d);
    });
    const timer = setTimeout(() => {
      try {
        process.kill(-child.pid!, 'SIGTERM');
      } catch {
        /* gone */
      }
      reject(new Error(`stopped after ${RUN_TIMEOUT_MS / 1000} s`));
    }, RUN_TIMEOUT_MS);
    child.on('close', (code) => {
      clearTimeout(timer);
      const line = out.split('\n').reverse().find((l) => l.startsWith(BENCH_JSON));
      if (code !== 0) return reject(new Error(`exit ${code}: ${err.trim().split('\n').slice(-3).join(' ').slice(0, 400)}`));
      if (!line) return reject(new Error('printed no BENCH_JSON line'));
      resolve((JSON.parse(line.slice(BENCH_JSON.length)) as { figures: Figure[] }).figures);
    });
  });
}

async function main() {
  const cmp = process.argv.indexOf('--compare');
  if (cmp >= 0) {
    const [a, b] = [process.argv[cmp + 1], process.argv[cmp + 2]];
    if (!a || !b) throw new Error('usage: npm run bench -- --compare <commit A> <commit B>');
    const ra = resultsFor(a);
    const rb = resultsFor(b);
    console.log(`\nBenchmarks, ${ra.commit.slice(0, 10)} (${ra.date}) → ${rb.commit.slice(0, 10)} (${rb.date})\n`);
    console.log(compareTable(ra, rb));
    return;
  }
  const only = argValue('only')?.split(',').map((s) => s.trim()).filter(Boolean);
  const runsArg = argValue('runs');
  const all = discover();
  if (only) for (const o of only) if (!all.some((b) => b.name === o)) throw new Error(`no benchmark named "${o}" (have: ${all.map((b) => b.name).join(', ')})`);
  const benches = all.filter((b) => !only || only.includes(b.name));
  const commit = git('rev-parse', 'HEAD');
  const dirty = git('status', '--porcelain', '--untracked-files=no').length > 0;
  mkdirSync(OUT, { recursive: true });
  const log = join(OUT, `${commit}.log`);
  writeFileSync(log, `npm run bench at ${new Date().toISOString()}\n`);
  const rows: Row[] = [];
  const failures: Results['failures'] = [];
  const t0 = Date.now();
  for (const b of benches) {
    const runs = runsArg ? Number(runsArg) : b.runs;
    const got: Figure[][] = [];
    for (let i = 1; i <= runs; i++) {
      const s = Date.now();
      appendFileSync(log, `\n===== ${b.name}, run ${i} of ${runs}\n`);
      try {
        got.push(await runOnce(b, log));
        console.error(`[bench] ${b.name} run ${i}/${runs}: ${((Date.now() - s) / 1000).toFixed(0)} s`);
      } catch (e) {
        const error = e instanceof Error ? e.message : String(e);
        failures.push({ bench: b.name, run: i, error });
        console.error(`[bench] ${b.name} run ${i}/${runs} FAILED: ${error}`);
      }
    }
    rows.push(...combine(b.name, got));
  }
  const file = join(OUT, `${commit}.json`);
  // A partial run (--only) keeps the other benches' figures from an earlier run of this commit.
  const earlier: Results | null = only && existsSync(file) ? (JSON.parse(readFileSync(file, 'utf8')) as Results) : null;
  const ran = new Set(benches.map((b) => b.name));
  const results: Results = {
    commit,
    dirty,
    date: new Date().toISOString(),
    machine: { cpus: cpus().length, model: cpus()[0]?.model ?? '', loadavg: loadavg(), node: process.version },
    rows: [...(earlier?.rows.filter((r) => !ran.has(r.bench)) ?? []), ...rows],
    failures: [...(earlier?.failures.filter((f) => !ran.has(f.bench)) ?? []), ...failures],
  };
  writeFileSync(file, JSON.stringify(results, null, 2) + '\n');
  console.log(`\nBenchmarks at ${commit.slice(0, 10)}${dirty ? ' (uncommitted changes)' : ''}, ${results.date.slice(0, 16)} UTC, ${results.machine.cpus} cores, load ${results.machine.loadavg.map((l) => l.toFixed(1)).join(' ')}; medians of the runs; ${((Date.now() - t0) / 60000).toFixed(1)} min\n`);
  console.log(table(rows));
  if (failures.length) {
    console.log(`\nFailed runs:`);
    for (const f of failures) console.log(`- ${f.bench} run ${f.run}: ${f.error}`);
  }
  console.log(`\nWritten: ${file.replace(ROOT + '/', '')} (every run's output: ${log.replace(ROOT + '/', '')})`);
  if (failures.length) process.exitCode = 1;
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  main().catch((err) => {
    console.error(`[bench] ${err instanceof Error ? err.message : err}`);
    process.exit(1);
  });
}
