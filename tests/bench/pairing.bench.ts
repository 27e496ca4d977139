// Pairing benchmark: the optimal assignment (pairMarks, munkres) against a trivial greedy
// nearest-neighbour pairing measured in the same run. Pure code, no app or services needed.
// Run: npx tsx tests/bench/pairing.bench.ts [--rounds N] [--cells N]
//
// - Layouts: N cells (default 300) on a 2000 × 1500 px field at 0.3 µm/px (the demo's scale;
//   4 µm → 13.3 px pairing distance). The first reader marks every cell 0–2 px off its centre;
//   the second misses 4 %, adds 4 % marks of its own, and lands 0–3 px off; ~8 % of cells are
//   round cells (non-sperm). "crowded" puts the same N cells on a 500 × 375 px patch and "packed"
//   on 250 × 188 px (cells about as far apart as the pairing distance), where many
//   marks can reach several others, the hard case for an assignment.
// - Greedy baseline: each first-read mark in turn takes the nearest second-read mark not yet
//   taken within the pairing distance (sperm with sperm, as pairMarks does). It is what one would
//   write without an assignment; the table also shows how many pairs it misses.
// - Collection: pairCollection + collectionAgreement over 10 such images, per image.
// - Each round draws new layouts; the two methods alternate which runs first.
// Exits 0 whatever the numbers are (a measurement, not a test).
import { collectionAgreement, pairCollection } from '@/lib/agreement/agreement';
import { pairMarks, pairingDistancePx, type PairingMark } from '@/lib/agreement/pairing';
import type { MorphologyClass } from '@/lib/morphology/tally';
import { mulberry32, type Random } from '@/lib/synthetic/prng';
import { arg, emitFigures, quantile } from './support';

const TARGET_MS = 50;
const SCALE = 0.3;
const CLASSES: MorphologyClass[] = [
  { id: 'normal', name: 'Normal', group: 'normal', countsAsSperm: true },
  { id: 'head_shape', name: 'Abnormal head', group: 'head', countsAsSperm: true },
  { id: 'proximal_droplet', name: 'Proximal droplet', group: 'droplet', countsAsSperm: true },
  { id: 'bent_tail', name: 'Bent tail', group: 'tail', countsAsSperm: true },
  { id: 'round_cell', name: 'Round cell', group: 'other', countsAsSperm: false },
];
const SPERM_KEYS = ['normal', 'normal', 'normal', 'head_shape', 'proximal_droplet', 'bent_tail'];

interface Layout {
  first: PairingMark[];
  second: PairingMark[];
}

function layout(rnd: Random, cells: number, width: number, height: number, tag: string): Layout {
  const first: PairingMark[] = [];
  const second: PairingMark[] = [];
  const jitter = (r: number) => {
    const a = rnd() * 2 * Math.PI;
    const d = rnd() * r;
    return [Math.cos(a) * d, Math.sin(a) * d] as const;
  };
  for (let i = 0; i < cells; i++) {
    const x = rnd() * width;
    const y = rnd() * height;
    const round = rnd() < 0.08;
    const key = round ? 'round_cell' : SPERM_KEYS[Math.floor(rnd() * SPERM_KEYS.length)]!;
    const [fx, fy] = jitter(2);
    first.push({ id: `${tag}-f${i}`, x: x + fx, y: y + fy, classKey: key, countsAsSperm: !round });
    if (rnd() < 0.04) continue;
    const [sx, sy] = jitter(3);
    const other = rnd() < 0.15 && !round ? SPERM_KEYS[Math.floor(rnd() * SPERM_KEYS.length)]! : key;
    second.push({ id: `${tag}-s${i}`, x: x + sx, y: y + sy, classKey: other, countsAsSperm: !round });
  }
  for (let i = 0; second.length < cells; i++) {
    second.push({ id: `${tag}-x${i}`, x: rnd() * width, y: rnd() * height, classKey: 'normal', countsAsSperm: true });
  }
  return { first, second };
}

/** The baseline: first come, nearest free partner within reach. */
function greedy(first: readonly PairingMark[], second: readonly PairingMark[], max: number): number {
  const taken = new Uint8Array(second.length);
  const max2 = max * max;
  let pairs = 0;
  for (const a of first) {
    let best = -1;
    let bestD = Infinity;
    for (let j = 0; j < second.length; j++) {
      const b = second[j]!;
      if (taken[j] || b.countsAsSperm !== a.countsAsSperm) continue;
      const d = (a.x - b.x) ** 2 + (a.y - b.y) ** 2;
      if (d <= max2 && d < bestD) {
        bestD = d;
        best = j;
      }
    }
    if (best >= 0) {
      taken[best] = 1;
      pairs++;
    }
  }
  return pairs;
}

interface Row {
  name: string;
  times: number[];
  pairs: number[];
}

const pad = (s: string, n: number) => s.padEnd(n);
const num = (v: number, d = 2) => v.toFixed(d).padStart(8);

function main(): void {
  const rounds = arg('rounds', 40);
  const cells = arg('cells', 300);
  const max = pairingDistancePx(SCALE);
  const rnd = mulberry32(20260301);
  const rows: Record<string, Row> = {};
  const row = (name: string) => (rows[name] ??= { name, times: [], pairs: [] });
  const time = (name: string, fn: () => number) => {
    const t0 = performance.now();
    const pairs = fn();
    row(name).times.push(performance.now() - t0);
    row(name).pairs.push(pairs);
  };

  // warm-up (JIT), not recorded
  for (let i = 0; i < 5; i++) {
    const l = layout(rnd, cells, 2000, 1500, `w${i}`);
    pairMarks(l.first, l.second, max);
    greedy(l.first, l.second, max);
  }

  for (let r = 0; r < rounds; r++) {
    for (const [kind, w, h] of [['field 2000 × 1500', 2000, 1500], ['crowded 500 × 375', 500, 375], ['packed 250 × 188', 250, 188]] as const) {
      const l = layout(rnd, cells, w, h, `r${r}`);
      const runs = [
        () => time(`${kind}: optimal (pairMarks)`, () => pairMarks(l.first, l.second, max).pairs.length),
        () => time(`${kind}: greedy baseline`, () => greedy(l.first, l.second, max)),
      ];
      if (r % 2) runs.reverse();
      for (const run of runs) run();
    }
  }

  // A whole collection of 10 images, per image; baseline: greedy over the same 10 images.
  const collectionRounds = Math.max(5, Math.floor(rounds / 4));
  for (let r = 0; r < collectionRounds; r++) {
    const images = Array.from({ length: 10 }, (_, i) => ({ imageId: `c${r}-i${i}`, ...layout(rnd, cells, 2000, 1500, `c${r}-i${i}`), maxDistancePx: max }));
    const runs = [
      () => {
        const t0 = performance.now();
        const a = collectionAgreement(pairCollection(images), CLASSES);
        const per = (performance.now() - t0) / images.length;
        row('collection of 10: pairing + figures, per image').times.push(per);
        row('collection of 10: pairing + figures, per image').pairs.push(a.pairs / images.length);
      },
      () => {
        const t0 = performance.now();
        let pairs = 0;
        for (const im of images) pairs += greedy(im.first, im.second, im.maxDistancePx);
        row('collection of 10: greedy baseline, per image').times.push((performance.now() - t0) / images.length);
        row('collection of 10: greedy baseline, per image').pairs.push(pairs / images.length);
      },
    ];
    if (r % 2) runs.reverse();
    for (const run of runs) run();
  }

  const baselineOf = (name: string) => rows[name.replace(/: .*$/, '') + ': greedy baseline'] ?? rows['collection of 10: greedy baseline, per image'];
  console.log(`\nPairing ${cells} × ~${cells} marks per image, pairing distance ${max.toFixed(1)} px (4 µm at ${SCALE} µm/px); ${rounds} rounds (collection: ${collectionRounds})`);
  console.log(`${pad('case', 50)} ${'p50 ms'.padStart(8)} ${'p95 ms'.padStart(8)} ${'p50 × greedy'.padStart(13)} ${'pairs (mean)'.padStart(13)}`);
  for (const r of Object.values(rows)) {
    const base = r.name.startsWith('collection') ? rows['collection of 10: greedy baseline, per image']! : baselineOf(r.name)!;
    const meanPairs = r.pairs.reduce((s, v) => s + v, 0) / r.pairs.length;
    console.log(
      `${pad(r.name, 50)} ${num(quantile(r.times, 0.5))} ${num(quantile(r.times, 0.95))} ${num(quantile(r.times, 0.5) / quantile(base.times, 0.5)).padStart(13)} ${num(meanPairs, 1).padStart(13)}`,
    );
  }
  const worst = Math.max(...Object.values(rows).filter((r) => !r.name.includes('greedy')).map((r) => quantile(r.times, 0.95)));
  console.log(`\nTarget: under ${TARGET_MS} ms per ${cells} × ${cells} image. Worst optimal p95: ${worst.toFixed(2)} ms — ${worst < TARGET_MS ? 'met' : 'NOT met'}.`);
  const field = rows['field 2000 × 1500: optimal (pairMarks)']!;
  const packed = rows['packed 250 × 188: optimal (pairMarks)']!;
  emitFigures('pairing', [
    { name: `pairing ${cells} × ${cells}, field, p95`, unit: 'ms', value: quantile(field.times, 0.95), baseline: { name: 'greedy nearest', value: quantile(rows['field 2000 × 1500: greedy baseline']!.times, 0.95) }, better: 'lower', target: { on: 'value', max: TARGET_MS }, details: { p50_ms: quantile(field.times, 0.5) } },
    { name: `pairing ${cells} × ${cells}, packed, p95`, unit: 'ms', value: quantile(packed.times, 0.95), baseline: { name: 'greedy nearest', value: quantile(rows['packed 250 × 188: greedy baseline']!.times, 0.95) }, better: 'lower', target: { on: 'value', max: TARGET_MS }, details: { p50_ms: quantile(packed.times, 0.5) } },
  ]);
}

main();
