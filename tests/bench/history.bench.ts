// @bench-conditions react-server (scripts/bench.sh runs this file with node's react-server
// condition, so the server-only data modules load in plain Node as they do in the app.)
// @bench-runs 1 (filling 100,000 marks is the slow part; each figure is the median of --runs timings)
//
// A stallion's history (db/queries/history.ts, as GET /api/stallions/:id/history and the history
// page run it) for a stallion with 500 collections of 200 marks each (100,000 marks), against a
// bare grouped count over the same marks in the same run: the floor any history through the
// morphology engine stands on. Target: within 2 × the bare count. Also the route end to end.
// The data is throw-away rows of a throw-away stallion, removed at the end.
// Usage: npx tsx --conditions=react-server tests/bench/history.bench.ts [--collections 500] [--marks 200] [--runs 15]
import { DEFAULT_CLASS_SET } from '../../lib/class-sets/default-set';
import { mulberry32 } from '../../lib/synthetic/prng';
import { signedIn, USERS } from '../integration/support/http';
import { arg, emitFigures, quantile } from './support';

const COLLECTIONS = arg('collections', 500);
const MARKS = arg('marks', 200);
const RUNS = arg('runs', 15);

async function main() {
  // Imported here, after the environment is read: these modules open the app's own pool.
  const { db } = await import('../../db/knex');
  const { stallionHistory } = await import('../../db/queries/history');
  const tech = await db('users').where({ email: USERS.tech }).first('id', 'name', 'email', 'role');
  const set = await db('class_sets').where({ is_default: true }).first('id', 'name', 'classes');
  if (!tech || !set) throw new Error('needs the demo users and class set (run the demo seed)');
  const actor = { id: tech.id, name: tech.name, email: tech.email, role: tech.role, clientId: null } as never;

  const made = { client: 0, stallion: 0, collections: [] as number[], reads: [] as number[], images: [] as number[] };
  const cleanUp = async () => {
    for (let i = 0; i < made.reads.length; i += 100) await db('marks').whereIn('read_id', made.reads.slice(i, i + 100)).delete();
    if (made.reads.length) await db('reads').whereIn('id', made.reads).delete();
    if (made.images.length) await db('field_images').whereIn('id', made.images).delete();
    if (made.collections.length) await db('collections').whereIn('id', made.collections).delete();
    if (made.stallion) await db('health_events').where({ stallion_id: made.stallion }).delete();
    if (made.stallion) await db('stallions').where({ id: made.stallion }).delete();
    if (made.client) await db('clients').where({ id: made.client }).delete();
  };

  try {
    const tag = `bench-${Date.now().toString(36)}`;
    [made.client] = await db('clients').insert({ name: `Bench owner ${tag}`, kind: 'owner' });
    [made.stallion] = await db('stallions').insert({ name: `Bench stallion ${tag}`, client_id: made.client, registration: tag });
    await db('health_events').insert([
      { stallion_id: made.stallion, kind: 'fever', started_on: '2021-05-04', ended_on: '2021-05-06', peak_temperature_c: 39.8, recorded_by: tech.id },
      { stallion_id: made.stallion, kind: 'medication', started_on: '2022-03-01', recorded_by: tech.id },
    ]);
    // 500 collections every 3 days from 1 Jan 2021: about four seasons.
    const t0 = Date.UTC(2021, 0, 1, 9);
    const rnd = mulberry32(20261203);
    const rows = Array.from({ length: COLLECTIONS }, (_, i) => ({
      stallion_id: made.stallion, collected_at: new Date(t0 + i * 3 * 86_400_000), volume_ml: 40 + Math.round(rnd() * 30), concentration_m_per_ml: 120 + Math.round(rnd() * 100),
      total_motility_pct: 70, progressive_motility_pct: 60, recorded_by: tech.id, remarks: 'benchmark',
    }));
    for (let i = 0; i < rows.length; i += 250) {
      const [first] = await db('collections').insert(rows.slice(i, i + 250));
      // MariaDB gives the first id of a multi-row insert; ids of one statement are consecutive.
      made.collections.push(...Array.from({ length: Math.min(250, rows.length - i) }, (_, k) => first + k));
    }
    for (const id of made.collections) {
      const [image] = await db('field_images').insert({
        collection_id: id, file_name: 'bench.jpg', format: 'jpeg', bytes: 1, width: 4000, height: 3000, sha256: `${tag}-${id}`.padEnd(64, '0').slice(0, 64),
        original_key: 'bench/none', display_key: 'bench/none', thumb_key: 'bench/none', display_width: 4000, display_height: 3000, uploaded_by: tech.id,
      });
      made.images.push(image);
    }
    const snapshot = JSON.stringify({ name: set.name, classes: typeof set.classes === 'string' ? JSON.parse(set.classes) : set.classes });
    const [firstRead] = await db('reads').insert(made.collections.map((id) => ({ collection_id: id, kind: 'first', reader_id: tech.id, class_set_id: set.id, class_set_snapshot: snapshot, target_cells: MARKS, status: 'submitted', submitted_at: new Date() })));
    made.reads.push(...made.collections.map((_, k) => firstRead + k));
    const keys = DEFAULT_CLASS_SET.classes.filter((c) => c.countsAsSperm).map((c) => c.key);
    const pick = () => (rnd() < 0.6 ? 'normal' : keys[1 + Math.floor(rnd() * (keys.length - 1))]!);
    let batch: object[] = [];
    for (const [k, readId] of made.reads.entries()) {
      for (let m = 0; m < MARKS; m++) {
        batch.push({ id: crypto.randomUUID(), read_id: readId, image_id: made.images[k], x: (rnd() * 3999).toFixed(2), y: (rnd() * 2999).toFixed(2), class_key: pick(), tags: rnd() < 0.1 ? '["bent_coiled_tail"]' : '[]', version: 1, deleted: false, last_op_id: crypto.randomUUID(), updated_by: tech.id });
        if (batch.length === 2000) {
          await db('marks').insert(batch);
          batch = [];
        }
      }
    }
    if (batch.length) await db('marks').insert(batch);
    const range = { from: '2021-01-01', to: '2025-12-31' };

    const bare = () =>
      db('marks as m').join('reads as r', 'r.id', 'm.read_id').join('collections as k', 'k.id', 'r.collection_id')
        .where('k.stallion_id', made.stallion).where('m.deleted', false)
        .groupBy('m.read_id', 'm.class_key', 'm.tags').select('m.read_id', 'm.class_key', 'm.tags').count({ n: '*' });
    const history = () => stallionHistory(actor, made.stallion, range);
    // Check both see the same marks before timing them.
    const [counted, h] = await Promise.all([bare(), history()]);
    const total = (counted as { n: number }[]).reduce((s, r) => s + Number(r.n), 0);
    const cells = h.series.reduce((s, p) => s + (p.cellsCounted ?? 0), 0);
    if (h.series.length !== COLLECTIONS || total !== COLLECTIONS * MARKS || cells !== total) throw new Error(`mismatch: ${h.series.length} points, ${total} marks counted, ${cells} cells in the history`);

    const session = await signedIn(USERS.tech);
    const url = `/api/stallions/${made.stallion}/history?from=${range.from}&to=${range.to}`;
    const viaRoute = async () => {
      const r = await session.fetch(url);
      const body = await r.text();
      if (r.status !== 200) throw new Error(`route answered ${r.status}: ${body.slice(0, 200)}`);
    };

    const time = async (f: () => Promise<unknown>) => {
      const s = performance.now();
      await f();
      return performance.now() - s;
    };
    const runs: Record<'bare' | 'history' | 'route', number[]> = { bare: [], history: [], route: [] };
    for (let i = 0; i < 2; i++) await Promise.all([bare(), history(), viaRoute()]); // warm caches and the route
    // Interleaved, so load from other work on the machine falls on all three alike.
    for (let i = 0; i < RUNS; i++) {
      runs.bare.push(await time(bare));
      runs.history.push(await time(history));
      runs.route.push(await time(viaRoute));
    }
    const p50 = (k: keyof typeof runs) => quantile(runs[k], 0.5);
    const p95 = (k: keyof typeof runs) => quantile(runs[k], 0.95);
    console.log(`\nStallion history: ${COLLECTIONS} collections × ${MARKS} marks = ${(COLLECTIONS * MARKS).toLocaleString('en-GB')} marks, ${RUNS} runs each\n`);
    console.log('| path | p50 ms | p95 ms | p50 vs bare grouped count |');
    console.log('|---|---|---|---|');
    const line = (name: string, k: keyof typeof runs) => console.log(`| ${name} | ${p50(k).toFixed(1)} | ${p95(k).toFixed(1)} | ${(p50(k) / p50('bare')).toFixed(2)} × |`);
    line('bare grouped count of the marks (baseline)', 'bare');
    line('history query (collections, reads, engine, events, windows, summary)', 'history');
    line('GET /api/stallions/:id/history (session, JSON, HTTP)', 'route');
    const ratio = p50('history') / p50('bare');
    console.log(`\nTarget: history query within 2 × the bare count — ${ratio <= 2 ? 'met' : 'NOT met'} (${ratio.toFixed(2)} ×).`);
    const bareFig = { name: 'bare grouped count', value: p50('bare') };
    emitFigures('history', [
      { name: `history query, ${(COLLECTIONS * MARKS).toLocaleString('en-GB')} marks, p50`, unit: 'ms', value: p50('history'), baseline: bareFig, better: 'lower', target: { on: 'ratio', max: 2 }, details: { p95_ms: p95('history') } },
      { name: 'GET history route, p50', unit: 'ms', value: p50('route'), baseline: bareFig, better: 'lower', target: null, details: { p95_ms: p95('route') } },
    ]);
  } finally {
    await cleanUp();
    await db.destroy();
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
