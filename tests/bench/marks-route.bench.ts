// Mark-save route under 50 concurrent writers, against a bare Knex insert into the same
// table in the same run. Needs the services and the app running (npm start, or npm run bench).
// Usage: npx tsx tests/bench/marks-route.bench.ts [--writers 50] [--per-writer 40]
import knexFactory from 'knex';
import sharp from 'sharp';
import { knexConfig } from '../../knexfile';
import { APP_URL, signedIn, USERS } from '../integration/support/http';
import { arg, benchRead, emitFigures, quantile, removeBenchReads } from './support';

const WRITERS = arg('writers', 50);
const PER_WRITER = arg('per-writer', 40);


async function runWriters(work: (writer: number, i: number) => Promise<void>) {
  const latencies: number[] = [];
  const t0 = performance.now();
  await Promise.all(
    Array.from({ length: WRITERS }, async (_, w) => {
      for (let i = 0; i < PER_WRITER; i++) {
        const s = performance.now();
        await work(w, i);
        latencies.push(performance.now() - s);
      }
    }),
  );
  const seconds = (performance.now() - t0) / 1000;
  return { perSecond: latencies.length / seconds, p50: quantile(latencies, 0.5), p99: quantile(latencies, 0.99), n: latencies.length };
}

async function main() {
  const db = knexFactory({ ...knexConfig(), pool: { min: 0, max: WRITERS } });
  const s = await signedIn(USERS.tech);
  const jpeg = await sharp({ create: { width: 4000, height: 3000, channels: 3, background: '#6b5a7a' } }).jpeg().toBuffer();
  const made = await benchRead(s, new Uint8Array(jpeg), 'bench.jpg');
  const read = { id: made.readId };
  const image = { id: made.imageId };
  const collection = { id: made.collectionId };
  const techId = (await db('users').where({ email: USERS.tech }).first()).id;
  const set = await db('class_sets').where({ is_default: true }).first();
  const [baselineRead] = await db('reads').insert({ collection_id: collection.id, kind: 'second', reader_id: techId, class_set_id: set.id, class_set_snapshot: JSON.stringify({ name: 'bench', classes: [] }), target_cells: 200 });

  const rnd = () => ({ x: Math.random() * 3999, y: Math.random() * 2999 });
  // Warm both paths.
  await s.json(`/api/reads/${read.id}/sync`, 'POST', { changes: [{ opId: crypto.randomUUID(), markId: crypto.randomUUID(), kind: 'upsert', payload: { imageId: String(image.id), ...rnd(), classKey: 'normal', tags: [] } }] });

  const baseline = await runWriters(async () => {
    const p = rnd();
    await db('marks').insert({
      id: crypto.randomUUID(), read_id: baselineRead, image_id: image.id, x: p.x.toFixed(2), y: p.y.toFixed(2), class_key: 'normal', tags: '[]',
      version: 1, deleted: false, last_op_id: crypto.randomUUID(), updated_by: techId,
    });
  });
  const routeRun = await runWriters(async () => {
    const r = await s.json(`/api/reads/${read.id}/sync`, 'POST', {
      changes: [{ opId: crypto.randomUUID(), markId: crypto.randomUUID(), kind: 'upsert', payload: { imageId: String(image.id), ...rnd(), classKey: 'normal', tags: [] } }],
    });
    if (r.status !== 200 || r.body.acked.length !== 1) throw new Error(`route answered ${r.status}: ${JSON.stringify(r.body)}`);
  });
  // The canvas sends its queued changes together; 10 per request is a technician marking fast on a slow link.
  const BATCH = 10;
  const batchRun = await runWriters(async () => {
    const changes = Array.from({ length: BATCH }, () => ({ opId: crypto.randomUUID(), markId: crypto.randomUUID(), kind: 'upsert', payload: { imageId: String(image.id), ...rnd(), classKey: 'normal', tags: [] } }));
    const r = await s.json(`/api/reads/${read.id}/sync`, 'POST', { changes });
    if (r.status !== 200 || r.body.acked.length !== BATCH) throw new Error(`route answered ${r.status}: ${JSON.stringify(r.body)}`);
  });
  const batchSaves = { ...batchRun, perSecond: batchRun.perSecond * BATCH, n: batchRun.n * BATCH };
  // The framework's floor: the same route refusing a request without a session (401) before
  // any database work. No route handler on this server answers faster than this.
  const floor = await runWriters(async () => {
    const r = await fetch(`${APP_URL}/api/reads/${read.id}/sync`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{"changes":[]}' });
    await r.arrayBuffer();
    if (r.status !== 401) throw new Error(`expected 401 without a session, got ${r.status}`);
  });
  const saved = await db('marks').where({ read_id: read.id, deleted: false }).count({ n: '*' }).first();

  console.log(`\nMark saves, ${WRITERS} concurrent writers × ${PER_WRITER} each\n`);
  console.log('| path | saves | saves/s | p50 ms (per request) | p99 ms (per request) | throughput vs bare insert |');
  console.log('|---|---|---|---|---|---|');
  for (const [name, r] of [
    ['bare Knex insert (baseline)', baseline],
    ['POST /api/reads/:id/sync, 1 mark per request', routeRun],
    [`POST /api/reads/:id/sync, ${BATCH} marks per request (the canvas's queue sends what is pending in one request)`, batchSaves],
    ['framework floor: the same route answering 401 without a session, no database work (requests, not saves)', floor],
  ] as const) {
    console.log(`| ${name} | ${r.n} | ${r.perSecond.toFixed(0)} | ${r.p50.toFixed(1)} | ${r.p99.toFixed(1)} | ${(r.perSecond / baseline.perSecond).toFixed(2)} |`);
  }
  const ratio = routeRun.perSecond / baseline.perSecond;
  const batchRatio = batchSaves.perSecond / baseline.perSecond;
  const floorRatio = floor.perSecond / baseline.perSecond;
  console.log(`\nTarget: route throughput ≥ 0.5 × bare insert — as the canvas sends under load (${BATCH} per request): ${batchRatio >= 0.5 ? 'PASS' : 'FAIL'} (${batchRatio.toFixed(2)}); one mark per request: ${ratio >= 0.5 ? 'PASS' : 'FAIL'} (${ratio.toFixed(2)}, bounded by the framework floor of ${floorRatio.toFixed(2)} requests per bare insert)`);
  const exactlyOnce = Number(saved?.n) === routeRun.n + batchSaves.n + 1;
  console.log(`Every route save stored exactly once: ${exactlyOnce ? 'yes' : `NO (${saved?.n})`}`);
  const bare = { name: 'bare Knex insert', value: baseline.perSecond };
  const bareP99 = { name: 'bare Knex insert p99', value: baseline.p99 };
  emitFigures('marks-route', [
    { name: `mark saves/s, ${WRITERS} writers, 1 per request`, unit: 'saves/s', value: routeRun.perSecond, baseline: bare, better: 'higher', target: { on: 'ratio', min: 0.5 }, details: { p50_ms: routeRun.p50, p99_ms: routeRun.p99, saves: routeRun.n } },
    { name: `mark saves/s, ${WRITERS} writers, ${BATCH} per request`, unit: 'saves/s', value: batchSaves.perSecond, baseline: bare, better: 'higher', target: { on: 'ratio', min: 0.5 }, details: { p50_ms: batchSaves.p50, p99_ms: batchSaves.p99, saves: batchSaves.n } },
    { name: `mark save p99, ${WRITERS} writers, 1 per request`, unit: 'ms', value: routeRun.p99, baseline: bareP99, better: 'lower', target: { on: 'value', max: 250 }, details: { p50_ms: routeRun.p50 } },
    { name: 'route floor (401, no database) req/s', unit: 'req/s', value: floor.perSecond, baseline: bare, better: 'higher', target: null },
    { name: 'route saves stored exactly once', unit: 'bool', value: exactlyOnce ? 1 : 0, baseline: null, better: 'higher', target: { on: 'value', min: 1 } },
  ]);
  // The benchmark's rows stay out of the demo: remove them.
  await removeBenchReads(s, db, [made]);
  await db.destroy();
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
