// @bench-runs 1 (one bounded run: the figures are quantiles over thousands of requests)
//
// Load test over loopback, through the real routes of the running app: 50 technicians scoring for
// 60 s (sign in, open their read, a mark every 1–3 s through POST /api/reads/:id/sync, the read
// opened again every 20 s), 5 second readers scoring second reads the same way, 2 veterinarians
// previewing reports every 2–5 s and each signing one. Throughput, p50/p99 per route, errors.
// Target: no errors, p99 of mark saves under 250 ms. Every mark acknowledged is checked to be in
// the database exactly once. Bench users, reads and collections are made in the database first
// (each user signs in from a loopback address of its own, so the sign-in limits see 57 clients)
// and removed at the end; signed collections stay frozen (the database never deletes a signed
// report) and bench users the audit log names are deactivated instead of removed.
// Usage: npx tsx tests/bench/load.bench.ts [--technicians 50] [--readers 5] [--vets 2] [--seconds 60]
import bcrypt from 'bcryptjs';
import knexFactory from 'knex';
import { knexConfig } from '../../knexfile';
import { buildReportCollection } from '../support/report-collections';
import { randomLoopback, Session } from '../integration/support/http';
import { arg, emitFigures, quantile, type Figure } from './support';

const TECHS = arg('technicians', 50);
const READERS = arg('readers', 5, 0);
const VETS = arg('vets', 2, 0);
const SECONDS = arg('seconds', 60);
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
    const collections = made.collections.filter((c) => !made.signed.has(c));
    if (collections.length) {
      const reads = await db('reads').whereIn('collection_id', collections).pluck('id');
      for (let i = 0; i < reads.length; i += 20) {
        await db('marks').whereIn('read_id', reads.slice(i, i + 20)).delete();
        await db('mark_ops').whereIn('read_id', reads.slice(i, i + 20)).delete();
      }
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

    // One collection, field image and open read per scorer (second readers: a submitted first read, then their open second read).
    const scorers = [...techs.map((u) => ({ ...u, kind: 'first' as const })), ...readers.map((u) => ({ ...u, kind: 'second' as const }))];
    const reads: { user: (typeof scorers)[number]; readId: number; imageId: number; collectionId: number }[] = [];
    for (const [i, u] of scorers.entries()) {
      const [collectionId] = await db('collections').insert({ stallion_id: stallion, collected_at: new Date(Date.UTC(2026, 5, 1, 8) + i * 60_000), recorded_by: techs[0]!.id, remarks: 'load benchmark' });
      made.collections.push(collectionId);
      const [imageId] = await db('field_images').insert({
        collection_id: collectionId, file_name: 'load.jpg', format: 'jpeg', bytes: 1, width: 4000, height: 3000, sha256: crypto.randomUUID().replace(/-/g, '').padEnd(64, '0'),
        original_key: 'bench/none', display_key: 'bench/none', thumb_key: 'bench/none', display_width: 4000, display_height: 3000, uploaded_by: techs[0]!.id,
      });
      const read = (kind: string, reader: number, status: string) => ({ collection_id: collectionId, kind, reader_id: reader, class_set_id: set.id, class_set_snapshot: snapshot, target_cells: 200, status, submitted_at: status === 'submitted' ? new Date() : null });
      if (u.kind === 'second') await db('reads').insert(read('first', techs[i % TECHS]!.id, 'submitted'));
      const [readId] = await db('reads').insert(read(u.kind, u.id, 'open'));
      reads.push({ user: u, readId, imageId, collectionId });
    }
    // Settled collections of the example report for the veterinarians to preview; each signs one.
    const vetCollections: number[][] = [];
    for (let v = 0; v < VETS; v++) {
      const mine: number[] = [];
      for (let k = 0; k < 3; k++) {
        const c = await buildReportCollection(db, { reads: 'settled', stallionId: stallion });
        made.collections.push(c.collectionId);
        mine.push(c.collectionId);
      }
      vetCollections.push(mine);
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
    console.error(`prepared ${scorers.length} reads and ${VETS * 3} reports; signing in ${scorers.length + VETS} users…`);
    const sessions = await Promise.all(scorers.map((u) => signIn(u.email)));
    const vetSessions = await Promise.all(vets.map((u) => signIn(u.email)));

    const acked = new Map<number, Set<string>>();
    const t0 = performance.now();
    const deadline = t0 + SECONDS * 1000;
    const scorer = async (k: number) => {
      const { readId, imageId } = reads[k]!;
      const s = sessions[k]!;
      const mine = new Set<string>();
      acked.set(readId, mine);
      await sleep(between(0, 2000)); // not everyone starts on the same millisecond
      await timed('GET /api/reads/:id', () => s.json(`/api/reads/${readId}`));
      let lastOpen = performance.now();
      while (performance.now() < deadline) {
        await sleep(between(1000, 3000));
        if (performance.now() >= deadline) break;
        const markId = crypto.randomUUID();
        const change = { opId: crypto.randomUUID(), markId, kind: 'upsert', payload: { imageId: String(imageId), x: between(0, 3999), y: between(0, 2999), classKey: classKeys[Math.floor(Math.random() * classKeys.length)], tags: [] } };
        const r = await timed('POST /api/reads/:id/sync (mark save)', () => resending(() => s.json(`/api/reads/${readId}/sync`, 'POST', { changes: [change] })));
        if (r && (r.body as { acked: { markId: string }[] }).acked.some((a) => a.markId === markId)) mine.add(markId);
        if (performance.now() - lastOpen > 20_000) {
          await timed('GET /api/reads/:id', () => s.json(`/api/reads/${readId}`));
          lastOpen = performance.now();
        }
      }
    };
    const vet = async (v: number) => {
      const s = vetSessions[v]!;
      const mine = vetCollections[v]!;
      const signAt = t0 + between(0.3, 0.7) * SECONDS * 1000;
      let signedOne = false;
      for (let i = 0; performance.now() < deadline; i++) {
        await sleep(between(2000, 5000));
        if (performance.now() >= deadline) break;
        const id = mine[i % mine.length]!;
        await timed('GET /api/collections/:id/report (preview)', () => s.json(`/api/collections/${id}/report`));
        if (!signedOne && performance.now() >= signAt) {
          signedOne = true;
          const target = mine[mine.length - 1]!;
          const r = await timed('POST /api/collections/:id/report/sign', () => s.json(`/api/collections/${target}/report/sign`, 'POST', { password: PASSWORD }));
          if (r) made.signed.add(target);
        }
      }
    };
    await Promise.all([...reads.map((_, k) => scorer(k)), ...vets.map((_, v) => vet(v))]);
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
    console.log(`Target: zero errors (${errors}) and mark-save p99 < ${P99_TARGET_MS} ms (${p99.toFixed(1)} ms): ${errors === 0 && p99 < P99_TARGET_MS && missing === 0 ? 'met' : 'NOT met'}`);
    if (errorSamples.length) console.log(`First errors:\n${errorSamples.map((e) => `- ${e}`).join('\n')}`);
    const figures: Figure[] = [
      { name: `load: mark save p99, ${TECHS + READERS} scorers`, unit: 'ms', value: p99, baseline: null, better: 'lower', target: { on: 'value', max: P99_TARGET_MS }, details: { p50_ms: quantile(saves.ms, 0.5), saves: saves.ms.length, per_second: saves.ms.length / elapsed } },
      { name: 'load: errors, every route', unit: 'requests', value: errors, baseline: null, better: 'lower', target: { on: 'value', max: 0 }, details: { requests: [...stats.values()].reduce((n, s) => n + s.ms.length, 0) } },
      { name: 'load: marks missing or doubled', unit: 'marks', value: missing, baseline: null, better: 'lower', target: { on: 'value', max: 0 } },
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
