// @bench-runs 1 (npm run bench: its figures are already medians / quantiles of its own rounds)
// What the signed-report lock costs a mark save, in the database alone: inserts into `marks`
// (one row per statement, and ten per statement as the canvas's batches send them) by 50
// concurrent writers on one read, with the lock triggers as migrated (a locking lookup of the
// collection, LOCK IN SHARE MODE), with the same triggers doing a plain lookup, and with no
// triggers at all (the baseline). Rounds are interleaved, so load on the machine falls on every
// variant alike. Runs on a scratch database of its own (migrated to the latest schema as the
// owner); needs only MariaDB. Usage: npx tsx tests/bench/signed-lock.bench.ts [--rounds 4] [--writers 50] [--per-writer 40]
import knexFactory from 'knex';
import { knexConfig } from '../../knexfile';
import { arg, emitFigures, type Figure, quantile } from './support';

const ROUNDS = arg('rounds', 4);
const WRITERS = arg('writers', 50);
const PER_WRITER = arg('per-writer', 40);
const NAME = `${process.env.DB_NAME ?? 'fieldmark'}_lockbench`;

type Variant = 'no triggers (baseline)' | 'lookup, plain read' | 'lookup, LOCK IN SHARE MODE (as migrated)';
const VARIANTS: Variant[] = ['no triggers (baseline)', 'lookup, plain read', 'lookup, LOCK IN SHARE MODE (as migrated)'];

async function main() {
  const admin = knexFactory(knexConfig(undefined, 'owner'));
  await admin.raw('DROP DATABASE IF EXISTS ??', [NAME]);
  await admin.raw('CREATE DATABASE ?? CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci', [NAME]);
  const base = knexConfig(NAME, 'owner');
  const db = knexFactory({ ...base, pool: { min: 0, max: WRITERS + 2 } });
  try {
    await db.migrate.latest();
    const [rows] = await db.raw("SELECT trigger_name AS name, action_statement AS body FROM information_schema.triggers WHERE trigger_schema = ? AND event_object_table = 'marks'", [NAME]);
    const migrated = new Map((rows as { name: string; body: string }[]).map((r) => [r.name, r.body]));
    const timing = { bi: 'BEFORE INSERT', bu: 'BEFORE UPDATE', bd: 'BEFORE DELETE' } as const;
    async function install(v: Variant) {
      for (const name of migrated.keys()) await db.raw(`DROP TRIGGER IF EXISTS ${name}`);
      if (v === 'no triggers (baseline)') return;
      for (const [name, body] of migrated) {
        const when = timing[name.slice(-2) as keyof typeof timing];
        await db.raw(`CREATE TRIGGER ${name} ${when} ON marks FOR EACH ROW ${v === 'lookup, plain read' ? body.replaceAll(' LOCK IN SHARE MODE', '') : body}`);
      }
    }

    const [user] = await db('users').insert({ email: 'bench@quillfield.example', name: 'Bench', role: 'technician' });
    const [client] = await db('clients').insert({ name: 'Bench owner' });
    const [stallion] = await db('stallions').insert({ name: 'Bench stallion', client_id: client });
    const [collection] = await db('collections').insert({ stallion_id: stallion, collected_at: new Date(), recorded_by: user });
    const [image] = await db('field_images').insert({
      collection_id: collection, file_name: 'b.jpg', format: 'jpeg', bytes: 1, width: 4000, height: 3000, sha256: 'a'.repeat(64),
      original_key: 'o', display_key: 'd', thumb_key: 't', display_width: 1, display_height: 1, uploaded_by: user,
    });
    const [set] = await db('class_sets').insert({ name: 'bench', classes: '[]' });
    const [read] = await db('reads').insert({ collection_id: collection, kind: 'first', reader_id: user, class_set_id: set, class_set_snapshot: '{"name":"bench","classes":[]}', target_cells: 200 });
    const mark = () => ({
      id: crypto.randomUUID(), read_id: read, image_id: image, x: (Math.random() * 3999).toFixed(2), y: (Math.random() * 2999).toFixed(2),
      class_key: 'normal', tags: '[]', version: 1, deleted: false, last_op_id: crypto.randomUUID(), updated_by: user,
    });

    async function run(batch: number) {
      const latencies: number[] = [];
      const t0 = performance.now();
      await Promise.all(
        Array.from({ length: WRITERS }, async () => {
          for (let i = 0; i < PER_WRITER; i++) {
            const s = performance.now();
            await db('marks').insert(Array.from({ length: batch }, mark));
            latencies.push(performance.now() - s);
          }
        }),
      );
      return { marksPerSecond: (latencies.length * batch) / ((performance.now() - t0) / 1000), p50: quantile(latencies, 0.5) };
    }

    const results = new Map<string, { rate: number[]; p50: number[] }>();
    const record = (key: string, r: { marksPerSecond: number; p50: number }) => {
      const e = results.get(key) ?? { rate: [], p50: [] };
      e.rate.push(r.marksPerSecond);
      e.p50.push(r.p50);
      results.set(key, e);
    };
    for (let round = 0; round < ROUNDS; round++) {
      // A different order each round, so no variant always runs first.
      const order = VARIANTS.map((v, i) => VARIANTS[(i + round) % VARIANTS.length]!);
      for (const v of order) {
        await install(v);
        for (const batch of [1, 10]) record(`${v}|${batch}`, await run(batch));
      }
    }
    await install('lookup, LOCK IN SHARE MODE (as migrated)');

    const median = (xs: number[]) => quantile(xs, 0.5);
    console.log(`\nMark inserts with and without the signed-report lock, ${WRITERS} writers × ${PER_WRITER} statements, ${ROUNDS} interleaved rounds (medians)\n`);
    console.log('| triggers on marks | marks per statement | marks/s | p50 ms per statement | vs no triggers |');
    console.log('|---|---|---|---|---|');
    const figures: Figure[] = [];
    for (const batch of [1, 10]) {
      const baseline = median(results.get(`${VARIANTS[0]}|${batch}`)!.rate);
      for (const v of VARIANTS) {
        const r = results.get(`${v}|${batch}`)!;
        console.log(`| ${v} | ${batch} | ${median(r.rate).toFixed(0)} | ${median(r.p50).toFixed(1)} | ${(median(r.rate) / baseline).toFixed(2)} |`);
        if (v === VARIANTS[2]) figures.push({ name: `marks/s with the lock triggers, ${batch} per statement`, unit: 'marks/s', value: median(r.rate), baseline: { name: 'no triggers', value: baseline }, better: 'higher', target: null, details: { p50_ms: median(r.p50) } });
      }
    }
    emitFigures('signed-lock', figures);
  } finally {
    await db.destroy();
    await admin.raw('DROP DATABASE IF EXISTS ??', [NAME]);
    await admin.destroy();
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
