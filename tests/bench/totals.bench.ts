// @bench-conditions react-server (the app's server-only query modules load in plain Node)
// @bench-runs 1 (filling the table is the slow part; each figure is the median of --runs timings)
//
// Per-collection totals (db/queries/morphology.ts, as GET /api/collections/:id/morphology runs it)
// and the report query (db/queries/reports.ts getCollectionReport, as the report page runs it) for a
// collection with a settled read, while the marks table holds 2 million marks of other reads,
// against a bare grouped count of that collection's marks in the same run. The 2 million marks are
// copied with INSERT … SELECT onto throw-away reads of a throw-away stallion and removed at the end.
// Usage: npx tsx --conditions=react-server tests/bench/totals.bench.ts [--marks 2000000] [--filler-reads 200] [--runs 15]
import { buildReportCollection } from '../support/report-collections';
import { signedIn, USERS } from '../integration/support/http';
import { arg, emitFigures, quantile } from './support';

const MARKS = arg('marks', 2_000_000);
const FILLER_READS = arg('filler-reads', 200);
const RUNS = arg('runs', 15);

async function main() {
  const { db } = await import('../../db/knex');
  const { morphologyForCollection } = await import('../../db/queries/morphology');
  const { getCollectionReport } = await import('../../db/queries/reports');
  const vet = await db('users').where({ email: USERS.vet }).first('id', 'name', 'email', 'role');
  const set = await db('class_sets').where({ is_default: true }).first('id', 'name', 'classes');
  if (!vet || !set) throw new Error('needs the demo users and class set (run the demo seed)');
  const actor = { id: vet.id, name: vet.name, email: vet.email, role: vet.role, clientId: null } as never;
  const made = { stallions: [] as number[], clients: [] as number[], collections: [] as number[], reads: [] as number[], images: [] as number[] };

  const cleanUp = async () => {
    const t = performance.now();
    for (let i = 0; i < made.reads.length; i += 5) await db('marks').whereIn('read_id', made.reads.slice(i, i + 5)).delete();
    if (made.reads.length) await db('reads').whereIn('id', made.reads).delete();
    if (made.collections.length) await db('candidate_jobs').whereIn('image_id', db('field_images').whereIn('collection_id', made.collections).select('id')).delete();
    if (made.collections.length) await db('field_images').whereIn('collection_id', made.collections).delete();
    if (made.collections.length) await db('report_drafts').whereIn('collection_id', made.collections).delete();
    if (made.collections.length) await db('collections').whereIn('id', made.collections).delete();
    if (made.stallions.length) await db('stallions').whereIn('id', made.stallions).delete();
    if (made.clients.length) await db('clients').whereIn('id', made.clients).delete();
    console.error(`removed the benchmark's rows in ${((performance.now() - t) / 1000).toFixed(1)} s`);
  };

  try {
    // The collection measured: the example report's cells in a first, second and settled read.
    const target = await buildReportCollection(db, { reads: 'settled', name: 'Totals Bench' });
    made.stallions.push(target.stallionId);
    made.clients.push(target.clientId);
    made.collections.push(target.collectionId);
    const targetReads = Object.values(target.reads) as number[];
    made.reads.push(...targetReads);

    // The filler: throw-away collections, one image and one read each, holding MARKS marks in all.
    const fill0 = performance.now();
    const perRead = Math.ceil(MARKS / FILLER_READS);
    const tech = await db('users').where({ email: USERS.tech }).first('id');
    const t0 = Date.UTC(2020, 0, 1, 9);
    const [firstCollection] = await db('collections').insert(
      Array.from({ length: FILLER_READS }, (_, i) => ({ stallion_id: target.stallionId, collected_at: new Date(t0 + i * 86_400_000), recorded_by: tech.id, remarks: 'totals benchmark filler' })),
    );
    const fillerCollections = Array.from({ length: FILLER_READS }, (_, k) => firstCollection + k);
    made.collections.push(...fillerCollections);
    const [firstImage] = await db('field_images').insert(
      fillerCollections.map((id) => ({
        collection_id: id, file_name: 'filler.jpg', format: 'jpeg', bytes: 1, width: 4000, height: 3000, sha256: crypto.randomUUID().replace(/-/g, '').padEnd(64, '0'),
        original_key: 'bench/none', display_key: 'bench/none', thumb_key: 'bench/none', display_width: 4000, display_height: 3000, uploaded_by: tech.id,
      })),
    );
    const snapshot = JSON.stringify({ name: set.name, classes: typeof set.classes === 'string' ? JSON.parse(set.classes) : set.classes });
    const [firstRead] = await db('reads').insert(fillerCollections.map((id) => ({ collection_id: id, kind: 'first', reader_id: tech.id, class_set_id: set.id, class_set_snapshot: snapshot, target_cells: 200, status: 'submitted', submitted_at: new Date() })));
    const fillerReads = fillerCollections.map((_, k) => firstRead + k);
    made.reads.push(...fillerReads);
    const imageOf = new Map(fillerReads.map((r, k) => [r, firstImage + k]));
    // One read's marks written from here, then copied onto the others by the database itself.
    const keys = ['normal', 'normal', 'normal', 'abnormal_head', 'proximal_droplet', 'distal_droplet', 'bent_coiled_tail'];
    const seedRead = fillerReads[0]!;
    for (let done = 0; done < perRead; done += 2000) {
      await db('marks').insert(
        Array.from({ length: Math.min(2000, perRead - done) }, (_, i) => ({
          id: crypto.randomUUID(), read_id: seedRead, image_id: imageOf.get(seedRead), x: ((done + i) % 3999).toFixed(2), y: ((done + i) % 2999).toFixed(2),
          class_key: keys[(done + i) % keys.length], tags: '[]', version: 1, deleted: false, last_op_id: crypto.randomUUID(), updated_by: tech.id,
        })),
      );
    }
    const others = fillerReads.slice(1);
    const step = Math.max(1, Math.floor(100_000 / perRead));
    for (let i = 0; i < others.length; i += step) {
      const chunk = others.slice(i, i + step);
      await db.raw(
        `INSERT INTO marks (id, read_id, image_id, x, y, class_key, tags, version, deleted, last_op_id, updated_by)
         SELECT UUID(), r.id, i.id, m.x, m.y, m.class_key, m.tags, 1, 0, UUID(), m.updated_by
           FROM marks m JOIN \`reads\` r ON r.id IN (${chunk.map(() => '?').join(',')}) JOIN field_images i ON i.collection_id = r.collection_id
          WHERE m.read_id = ?`,
        [...chunk, seedRead],
      );
    }
    const [{ n: total }] = await db('marks').count({ n: '*' });
    console.error(`marks table filled to ${Number(total).toLocaleString('en-GB')} marks in ${((performance.now() - fill0) / 1000).toFixed(1)} s`);

    const bare = () => db('marks').whereIn('read_id', targetReads).where('deleted', false).groupBy('read_id', 'class_key', 'tags').select('read_id', 'class_key', 'tags').count({ n: '*' });
    const totals = () => morphologyForCollection(actor, target.collectionId);
    const report = () => getCollectionReport(actor, target.collectionId);
    const session = await signedIn(USERS.vet);
    const viaRoute = async () => {
      const r = await session.fetch(`/api/collections/${target.collectionId}/morphology`);
      const body = await r.text();
      if (r.status !== 200) throw new Error(`morphology route answered ${r.status}: ${body.slice(0, 200)}`);
    };
    // Both see the same cells before timing them.
    const counted = (await bare()) as { read_id: number; n: number }[];
    const sums = (await totals()).map((r) => r.morphology.cellsCounted + r.morphology.nonSpermCounted);
    const settledCount = counted.filter((c) => c.read_id === target.reads.settled).reduce((s, c) => s + Number(c.n), 0);
    if (!sums.includes(settledCount)) throw new Error(`mismatch: the bare count gives ${settledCount} cells for the settled read, the totals ${sums.join(', ')}`);

    const time = async (f: () => Promise<unknown>) => {
      const s = performance.now();
      await f();
      return performance.now() - s;
    };
    const runs: Record<'bare' | 'totals' | 'report' | 'route', number[]> = { bare: [], totals: [], report: [], route: [] };
    for (let i = 0; i < 2; i++) await Promise.all([bare(), totals(), report(), viaRoute()]);
    for (let i = 0; i < RUNS; i++) {
      runs.bare.push(await time(bare));
      runs.totals.push(await time(totals));
      runs.report.push(await time(report));
      runs.route.push(await time(viaRoute));
    }
    const p50 = (k: keyof typeof runs) => quantile(runs[k], 0.5);
    const p95 = (k: keyof typeof runs) => quantile(runs[k], 0.95);
    console.log(`\nPer-collection totals and the report query with ${Number(total).toLocaleString('en-GB')} marks in the table, ${RUNS} interleaved runs\n`);
    console.log('| path | p50 ms | p95 ms | p50 vs bare grouped count |');
    console.log('|---|---|---|---|');
    const line = (name: string, k: keyof typeof runs) => console.log(`| ${name} | ${p50(k).toFixed(1)} | ${p95(k).toFixed(1)} | ${(p50(k) / p50('bare')).toFixed(2)} × |`);
    line("bare grouped count of the collection's marks (baseline)", 'bare');
    line('per-collection totals (morphologyForCollection)', 'totals');
    line('report query (getCollectionReport)', 'report');
    line('GET /api/collections/:id/morphology (session, JSON, HTTP)', 'route');
    const bareFig = { name: 'bare grouped count', value: p50('bare') };
    emitFigures('totals', [
      { name: 'per-collection totals, 2 M marks in the table, p50', unit: 'ms', value: p50('totals'), baseline: bareFig, better: 'lower', target: { on: 'ratio', max: 3 }, details: { p95_ms: p95('totals'), marks_in_table: Number(total) } },
      { name: 'report query, 2 M marks in the table, p50', unit: 'ms', value: p50('report'), baseline: bareFig, better: 'lower', target: { on: 'value', max: 250 }, details: { p95_ms: p95('report') } },
      { name: 'GET morphology route, 2 M marks in the table, p50', unit: 'ms', value: p50('route'), baseline: bareFig, better: 'lower', target: null, details: { p95_ms: p95('route') } },
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
