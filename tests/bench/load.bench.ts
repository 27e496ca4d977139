// @bench-runs 1 (one bounded run: the figures are quantiles over thousands of requests)
//
// Load test over loopback, through the real routes of the running app, bounded in count and time:
// - 50 technicians scoring first reads for 60 s (sign in, open their read, a mark every 1–3 s
//   through POST /api/reads/:id/sync, the read opened again every 20 s);
// - 5 second readers, each on a collection whose first read (a dozen cells) is submitted: start
//   the second read (POST /api/collections/:id/reads, kind "second"), score it the same way for
//   up to 60 % of the run (the same cells, a few given another class, one missed, one extra),
//   submit it (POST /api/reads/:id/submit), then settle it through the settling routes
//   (GET /api/collections/:id/settle, one POST …/settle per disagreement, 0.5–1.5 s apart) until
//   the settled read is written;
// - 2 veterinarians previewing the second readers' collections' reports every 2–5 s
//   (GET /api/collections/:id/report) and signing each one as soon as its preview says it is
//   ready (POST /api/collections/:id/report/sign); they go on up to 30 s past the 60 s while a
//   collection of theirs is still being read or settled.
// Throughput, p50/p99 per route, errors. Target: no errors, p99 of mark saves under 250 ms.
// Every mark acknowledged is checked to be in the database exactly once, and every second-read
// collection to have ended settled and signed. Bench users, first reads and collections are made
// in the database first (each user signs in from a loopback address of its own, so the sign-in
// limits see 57 clients) and removed at the end; signed collections stay frozen (the database
// never deletes a signed report) and bench users the audit log names are deactivated instead.
// Usage: npx tsx tests/bench/load.bench.ts [--technicians 50] [--readers 5] [--vets 2] [--seconds 60] [--cells 12]
import bcrypt from 'bcryptjs';
import knexFactory from 'knex';
import { knexConfig } from '../../knexfile';
import { randomLoopback, Session } from '../integration/support/http';
import { arg, emitFigures, quantile, type Figure } from './support';

const TECHS = arg('technicians', 50);
const READERS = arg('readers', 5, 0);
const VETS = arg('vets', 2, 0);
const SECONDS = arg('seconds', 60);
/** Cells of each first read the second readers read again. */
const CELLS = arg('cells', 12);
/** Second readers score for this share of the run, then submit and settle. */
const SCORE_SHARE = 0.6;
/** How long the veterinarians go on past the run while a collection of theirs is still on its way to signing. */
const GRACE_MS = 30_000;
const PASSWORD = 'load-bench-password-1';
const P99_TARGET_MS = 250;

type Stat = { ms: number[]; errors: number; statuses: Map<number, number> };
const stats = new Map<string, Stat>();
const errorSamples: string[] = [];

/** Times one request under a route's name; a status outside `ok` counts as an error. */
async function timed<T>(route: string, f: () => Promise<{ status: number; body: T }>, ok = [200, 201]): Promise<{ status: number; body: T } | null> {
  const s: Stat = stats.get(route) ?? { ms: [], errors: 0, statuses: new Map() };
  stats.set(route, s);
  const t = performance.now();
  try {
    const r = await f();
    s.ms.push(performance.now() - t);
    s.statuses.set(r.status, (s.statuses.get(r.status) ?? 0) + 1);
    if (!ok.includes(r.status)) {
      s.errors++;
      if (errorSamples.length < 10) errorSamples.push(`${route}: ${r.status} ${JSON.stringify(r.body).slice(0, 200)}`);
      return null;
    }
    return r;
  } catch (err) {
    s.ms.push(performance.now() - t);
    s.errors++;
    const cause = err instanceof Error && err.cause instanceof Error ? ` (${(err.cause as { code?: string }).code ?? err.cause.message})` : '';
    if (errorSamples.length < 10) errorSamples.push(`${route}: ${err instanceof Error ? err.message : err}${cause}`);
    return null;
  }
}

let resent = 0;
/**
 * A POST sent on a kept-alive socket the server closed at that moment fails before the server saw
 * it; the canvas's queue sends it again (a mark save is idempotent by its opId), and so does this.
 */
async function resending<T>(f: () => Promise<T>): Promise<T> {
  try {
    return await f();
  } catch (err) {
    const code = err instanceof Error ? (err.cause as { code?: string } | undefined)?.code : undefined;
    if (code !== 'UND_ERR_SOCKET' && code !== 'ECONNRESET') throw err;
    resent++;
    return f();
  }
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const between = (lo: number, hi: number) => lo + Math.random() * (hi - lo);

async function main() {
  const db = knexFactory({ ...knexConfig(), pool: { min: 0, max: 10 } });
  const tag = `load${Date.now().toString(36)}`;
  const made = { users: [] as number[], collections: [] as number[], clients: [] as number[], stallions: [] as number[], signed: new Set<number>() };
  const hash = await bcrypt.hash(PASSWORD, 4);
  const set = await db('class_sets').where({ is_default: true }).first('id', 'name', 'classes');
  if (!set) throw new Error('needs the demo class set (run the demo seed)');
  const snapshot = JSON.stringify({ name: set.name, classes: typeof set.classes === 'string' ? JSON.parse(set.classes) : set.classes });
  const classKeys: string[] = (typeof set.classes === 'string' ? JSON.parse(set.classes) : set.classes).map((c: { key: string }) => c.key);

  const cleanUp = async () => {
    // A report signed while its answer was lost is frozen too: the database says which are.
    if (made.collections.length) for (const id of await db('collections').whereIn('id', made.collections).whereNotNull('signed_report_id').pluck('id')) made.signed.add(id);
    const collections = made.collections.filter((c) => !made.signed.has(c));
    if (collections.length) {
      const reads = await db('reads').whereIn('collection_id', collections).pluck('id');
      for (let i = 0; i < reads.length; i += 20) {
        await db('marks').whereIn('read_id', reads.slice(i, i + 20)).delete();
        await db('mark_ops').whereIn('read_id', reads.slice(i, i + 20)).delete();
      }
      await db('settle_decisions').whereIn('collection_id', collections).delete();
      await db('reads').whereIn('collection_id', collections).delete();
      await db('report_drafts').whereIn('collection_id', collections).delete();
      await db('field_images').whereIn('collection_id', collections).delete();
      await db('collections').whereIn('id', collections).delete();
    }
    const keep = made.signed.size ? await db('collections').whereIn('id', [...made.signed]).pluck('stallion_id') : [];
    const stallions = made.stallions.filter((s) => !keep.includes(s));
    if (stallions.length) await db('stallions').whereIn('id', stallions).delete();
    const clients = await db('clients').whereIn('id', made.clients).whereNotIn('id', db('stallions').select('client_id').whereNotNull('client_id')).pluck('id');
    if (clients.length) await db('clients').whereIn('id', clients).delete();
    for (const id of made.users) {
      // Users the audit log or a kept record names cannot go: they are switched off instead.
      await db('users').where({ id }).delete().catch(() => db('users').where({ id }).update({ active: false, password_hash: null }));
    }
    await db('sign_in_limits').where('key', 'like', `%${tag}%`).delete();
  };

  try {
    const mkUsers = async (role: string, n: number, kind: string) => {
      if (n === 0) return [];
      const rows = Array.from({ length: n }, (_, i) => ({ email: `${kind}${i}.${tag}@quillfield.example`, name: `Load ${kind} ${i}`, role, active: true, password_hash: hash }));
      const [first] = await db('users').insert(rows);
      const ids = rows.map((_, k) => first + k);
      made.users.push(...ids);
      return rows.map((r, k) => ({ id: ids[k]!, email: r.email }));
    };
    const techs = await mkUsers('technician', TECHS, 'tech');
    const readers = await mkUsers('technician', READERS, 'reader');
    const vets = await mkUsers('veterinarian', VETS, 'vet');
    const [client] = await db('clients').insert({ name: `Load bench owner ${tag}`, kind: 'owner' });
    made.clients.push(client);
    const [stallion] = await db('stallions').insert({ name: `Load Bench ${tag}`, client_id: client, registration: tag });
    made.stallions.push(stallion);

    const image = (collectionId: number, width: number, height: number) => ({
      collection_id: collectionId, file_name: 'load.jpg', format: 'jpeg', bytes: 1, width, height, sha256: crypto.randomUUID().replace(/-/g, '').padEnd(64, '0'),
      original_key: 'bench/none', display_key: 'bench/none', thumb_key: 'bench/none', display_width: width, display_height: height, uploaded_by: techs[0]!.id,
    });
    const read = (collectionId: number, kind: string, reader: number, status: string) => ({ collection_id: collectionId, kind, reader_id: reader, class_set_id: set.id, class_set_snapshot: snapshot, target_cells: 200, status, submitted_at: status === 'submitted' ? new Date() : null });

    // One collection, field image and open first read per technician.
    const reads: { readId: number; imageId: number }[] = [];
    for (const [i, u] of techs.entries()) {
      const [collectionId] = await db('collections').insert({ stallion_id: stallion, collected_at: new Date(Date.UTC(2026, 5, 1, 8) + i * 60_000), recorded_by: techs[0]!.id, remarks: 'load benchmark' });
      made.collections.push(collectionId);
      const [imageId] = await db('field_images').insert(image(collectionId, 4000, 3000));
      const [readId] = await db('reads').insert(read(collectionId, 'first', u.id, 'open'));
      reads.push({ readId, imageId });
    }
    // Per second reader: a collection with its semen values and a submitted first read of CELLS
    // cells 70 px apart (far beyond the pairing distance), read by one of the technicians.
    type Cell = { x: number; y: number; classKey: string };
    const seconds: { collectionId: number; imageId: number; cells: Cell[] }[] = [];
    for (const [k] of readers.entries()) {
      const [collectionId] = await db('collections').insert({
        stallion_id: stallion, collected_at: new Date(Date.UTC(2026, 5, 2, 8) + k * 60_000), number_that_day: 1, volume_ml: 38, concentration_m_per_ml: 165,
        total_motility_pct: 62, progressive_motility_pct: 45, preparation: 'eosin_nigrosin', optics: 'bright_field', magnification: 1000, recorded_by: techs[0]!.id, remarks: 'load benchmark, second read',
      });
      made.collections.push(collectionId);
      const [imageId] = await db('field_images').insert(image(collectionId, 1600, 1200));
      const [firstId] = await db('reads').insert(read(collectionId, 'first', techs[k % TECHS]!.id, 'submitted'));
      const cells = Array.from({ length: CELLS }, (_, i) => ({ x: 40 + (i % 20) * 70, y: 40 + Math.floor(i / 20) * 70, classKey: i % 3 === 0 ? 'normal' : classKeys[i % classKeys.length]! }));
      await db('marks').insert(
        cells.map((c) => ({ id: crypto.randomUUID(), read_id: firstId, image_id: imageId, x: c.x, y: c.y, class_key: c.classKey, tags: '[]', version: 1, deleted: false, last_op_id: crypto.randomUUID(), updated_by: techs[k % TECHS]!.id })),
      );
      seconds.push({ collectionId, imageId, cells });
    }

    const signIn = async (email: string) => {
      const s = new Session({ from: randomLoopback() });
      const r = await timed('POST /api/auth/callback/credentials (sign-in)', async () => {
        const err = await s.signIn(email, PASSWORD);
        return { status: err ? 401 : 200, body: err };
      });
      if (!r) throw new Error(`sign-in as ${email} failed`);
      return s;
    };
    console.error(`prepared ${TECHS} first reads and ${READERS} collections for second reads; signing in ${TECHS + READERS + VETS} users…`);
    const sessions = await Promise.all(techs.map((u) => signIn(u.email)));
    const readerSessions = await Promise.all(readers.map((u) => signIn(u.email)));
    const vetSessions = await Promise.all(vets.map((u) => signIn(u.email)));

    const acked = new Map<number, Set<string>>();
    /** Where each second-read collection got to. */
    const progress = seconds.map(() => ({ started: false, submitted: false, decisions: 0, settled: false, signed: false, done: false }));
    const t0 = performance.now();
    const deadline = t0 + SECONDS * 1000;

    /** One mark saved through the sync route, as the canvas's queue sends it; its id kept once acknowledged. */
    const saveMark = async (s: Session, readId: number, mark: { imageId: number; x: number; y: number; classKey: string }, mine: Set<string>) => {
      const markId = crypto.randomUUID();
      const change = { opId: crypto.randomUUID(), markId, kind: 'upsert', payload: { imageId: String(mark.imageId), x: mark.x, y: mark.y, classKey: mark.classKey, tags: [] } };
      const r = await timed('POST /api/reads/:id/sync (mark save)', () => resending(() => s.json(`/api/reads/${readId}/sync`, 'POST', { changes: [change] })));
      if (r && (r.body as { acked: { markId: string }[] }).acked.some((a) => a.markId === markId)) mine.add(markId);
    };
    /** The read opened again every 20 s, as a reader reloading the page. */
    const reopener = (s: Session, readId: number) => {
      let lastOpen = performance.now();
      return async () => {
        if (performance.now() - lastOpen <= 20_000) return;
        await timed('GET /api/reads/:id', () => s.json(`/api/reads/${readId}`));
        lastOpen = performance.now();
      };
    };

    const scorer = async (k: number) => {
      const { readId, imageId } = reads[k]!;
      const s = sessions[k]!;
      const mine = new Set<string>();
      acked.set(readId, mine);
      await sleep(between(0, 2000)); // not everyone starts on the same millisecond
      await timed('GET /api/reads/:id', () => s.json(`/api/reads/${readId}`));
      const reopen = reopener(s, readId);
      while (performance.now() < deadline) {
        await sleep(between(1000, 3000));
        if (performance.now() >= deadline) break;
        await saveMark(s, readId, { imageId, x: between(0, 3999), y: between(0, 2999), classKey: classKeys[Math.floor(Math.random() * classKeys.length)]! }, mine);
        await reopen();
      }
    };

    const otherClass = (key: string) => classKeys[(classKeys.indexOf(key) + 1) % classKeys.length]!;
    /** A second reader: starts the second read, scores the same cells (blind: the bench knows them, the reader only sees them), submits, settles. */
    const secondReader = async (k: number) => {
      const { collectionId, imageId, cells } = seconds[k]!;
      const s = readerSessions[k]!;
      const where = progress[k]!;
      try {
        await sleep(between(0, 2000));
        const started = await timed('POST /api/collections/:id/reads (start second read)', () => s.json(`/api/collections/${collectionId}/reads`, 'POST', { kind: 'second' }));
        if (!started) return;
        const readId = (started.body as { read: { id: number } }).read.id;
        where.started = true;
        const mine = new Set<string>();
        acked.set(readId, mine);
        await timed('GET /api/reads/:id', () => s.json(`/api/reads/${readId}`));
        const reopen = reopener(s, readId);
        const scoreUntil = t0 + SCORE_SHARE * SECONDS * 1000;
        // The first cell always gets another class (so there is something to settle), one in six
        // others too; the second cell is missed; one cell the first reader did not mark is added.
        const plan = [...cells.map((c, i) => (i === 1 ? null : { ...c, classKey: i === 0 || Math.random() < 1 / 6 ? otherClass(c.classKey) : c.classKey })), { x: 1500, y: 1100, classKey: 'normal' }];
        for (const c of plan) {
          await sleep(between(1000, 3000));
          if (performance.now() >= scoreUntil) break;
          if (!c) continue;
          await saveMark(s, readId, { imageId, x: c.x + between(-2, 2), y: c.y + between(-2, 2), classKey: c.classKey }, mine);
          await reopen();
        }
        await sleep(between(500, 1500));
        if (!(await timed('POST /api/reads/:id/submit', () => s.json(`/api/reads/${readId}/submit`, 'POST')))) return;
        where.submitted = true;
        // Settling: the disagreements in the settle view's order, one decision each.
        type SettleView = { status: string; disagreements: { key: string; kind: 'class' | 'only-first' | 'only-second'; decision: unknown }[] };
        const view = await timed('GET /api/collections/:id/settle', () => s.json(`/api/collections/${collectionId}/settle`));
        if (!view) return;
        const state = view.body as SettleView;
        if (state.status === 'open' && state.disagreements.length === 0) where.settled = true; // the reads agree: the first read stands
        for (const d of state.disagreements.filter((x) => !x.decision)) {
          await sleep(between(500, 1500));
          const decision = d.kind === 'class' ? 'second' : d.kind === 'only-first' ? 'first' : 'not-cell';
          const opId = crypto.randomUUID();
          const r = await timed('POST /api/collections/:id/settle (decision)', () => resending(() => s.json(`/api/collections/${collectionId}/settle`, 'POST', { decisions: [{ opId, key: d.key, decision }] })));
          const body = r?.body as { acked: { opId: string }[]; rejected: { message: string }[]; settledReadId: number | null } | undefined;
          if (!body) continue;
          if (body.acked.some((a) => a.opId === opId)) where.decisions++;
          else if (errorSamples.length < 10) errorSamples.push(`settle decision not acknowledged: ${JSON.stringify(body.rejected).slice(0, 200)}`);
          if (body.settledReadId) where.settled = true;
        }
      } finally {
        where.done = true;
      }
    };

    const vet = async (v: number) => {
      const s = vetSessions[v]!;
      const mine = seconds.map((_, k) => k).filter((k) => k % VETS === v);
      // Until the run's end, and past it (bounded) while one of theirs may still become ready.
      const going = () => performance.now() < deadline || (performance.now() < deadline + GRACE_MS && mine.some((k) => !progress[k]!.signed && (!progress[k]!.done || progress[k]!.settled)));
      for (let i = 0; mine.length > 0 && going(); i++) {
        await sleep(between(2000, 5000));
        // The next collection of theirs not yet signed (or any, once all are).
        const open = mine.filter((k) => !progress[k]!.signed);
        const k = (open.length ? open : mine)[i % (open.length || mine.length)]!;
        const { collectionId } = seconds[k]!;
        const r = await timed('GET /api/collections/:id/report (preview)', () => s.json(`/api/collections/${collectionId}/report`));
        const ready = (r?.body as { readiness?: { ready: boolean } } | undefined)?.readiness?.ready;
        if (!ready || progress[k]!.signed) continue;
        const signed = await timed('POST /api/collections/:id/report/sign', () => s.json(`/api/collections/${collectionId}/report/sign`, 'POST', { password: PASSWORD }));
        if (signed) {
          progress[k]!.signed = true;
          made.signed.add(collectionId);
        }
      }
    };
    await Promise.all([...reads.map((_, k) => scorer(k)), ...readers.map((_, k) => secondReader(k)), ...vets.map((_, v) => vet(v))]);
    const elapsed = (performance.now() - t0) / 1000;

    // Every acknowledged mark is in the database, once.
    let missing = 0;
    let total = 0;
    for (const [readId, ids] of acked) {
      const rows = await db('marks').where({ read_id: readId, deleted: false }).pluck('id');
      total += rows.length;
      const stored = new Set(rows);
      for (const id of ids) if (!stored.has(id)) missing++;
      if (rows.length !== ids.size) missing += Math.abs(rows.length - ids.size);
    }

    // Every second-read collection ended settled and signed (the database says so, not only the answers).
    const signedInDb = seconds.length ? await db('collections').whereIn('id', seconds.map((c) => c.collectionId)).whereNotNull('signed_report_id').pluck('id') : [];
    const count = (f: (p: (typeof progress)[number]) => boolean) => progress.filter(f).length;
    // Without veterinarians (--vets 0) nobody signs: the second reads are to end settled.
    const unsigned = seconds.length - (VETS ? signedInDb.length : count((p) => p.settled));

    console.log(`\nLoad test: ${TECHS} technicians + ${READERS} second readers scoring, ${VETS} veterinarians, ${elapsed.toFixed(0)} s over loopback\n`);
    console.log('| route | requests | per second | p50 ms | p99 ms | max ms | errors | statuses |');
    console.log('|---|---|---|---|---|---|---|---|');
    for (const [route, s] of stats) {
      const statuses = [...s.statuses].map(([k, n]) => `${k}×${n}`).join(' ');
      console.log(`| ${route} | ${s.ms.length} | ${(s.ms.length / elapsed).toFixed(1)} | ${quantile(s.ms, 0.5).toFixed(1)} | ${quantile(s.ms, 0.99).toFixed(1)} | ${Math.max(...s.ms).toFixed(0)} | ${s.errors} | ${statuses} |`);
    }
    const errors = [...stats.values()].reduce((n, s) => n + s.errors, 0);
    const saves = stats.get('POST /api/reads/:id/sync (mark save)')!;
    const p99 = quantile(saves.ms, 0.99);
    console.log(`\nRequests sent again after the server closed an idle kept-alive socket as they left: ${resent}.`);
    console.log(`Marks acknowledged ${[...acked.values()].reduce((n, s) => n + s.size, 0)}, in the database ${total}, missing or extra ${missing}.`);
    console.log(
      `Second reads: ${count((p) => p.started)} of ${READERS} started, ${count((p) => p.submitted)} submitted, ${progress.reduce((n, p) => n + p.decisions, 0)} settle decisions stored, ${count((p) => p.settled)} settled, ${signedInDb.length} signed (in the database).`,
    );
    console.log(`Target: zero errors (${errors}) and mark-save p99 < ${P99_TARGET_MS} ms (${p99.toFixed(1)} ms): ${errors === 0 && p99 < P99_TARGET_MS && missing === 0 && unsigned === 0 ? 'met' : 'NOT met'}`);
    if (errorSamples.length) console.log(`First errors:\n${errorSamples.map((e) => `- ${e}`).join('\n')}`);
    const figures: Figure[] = [
      { name: `load: mark save p99, ${TECHS + READERS} scorers`, unit: 'ms', value: p99, baseline: null, better: 'lower', target: { on: 'value', max: P99_TARGET_MS }, details: { p50_ms: quantile(saves.ms, 0.5), saves: saves.ms.length, per_second: saves.ms.length / elapsed } },
      { name: 'load: errors, every route', unit: 'requests', value: errors, baseline: null, better: 'lower', target: { on: 'value', max: 0 }, details: { requests: [...stats.values()].reduce((n, s) => n + s.ms.length, 0) } },
      { name: 'load: marks missing or doubled', unit: 'marks', value: missing, baseline: null, better: 'lower', target: { on: 'value', max: 0 } },
      { name: `load: second-read collections not settled${VETS ? ' and signed' : ''}, of ${READERS}`, unit: 'collections', value: unsigned, baseline: null, better: 'lower', target: { on: 'value', max: 0 }, details: { settled: count((p) => p.settled), signed: signedInDb.length } },
    ];
    for (const [route, s] of stats) {
      if (route.includes('mark save')) continue;
      figures.push({ name: `load: ${route} p99`, unit: 'ms', value: quantile(s.ms, 0.99), baseline: null, better: 'lower', target: null, details: { p50_ms: quantile(s.ms, 0.5), requests: s.ms.length } });
    }
    emitFigures('load', figures);
  } finally {
    await cleanUp();
    await db.destroy();
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
