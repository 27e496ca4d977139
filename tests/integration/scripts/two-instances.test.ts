import bcrypt from 'bcryptjs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateField } from '@/lib/synthetic/generate-field';
import { benchRead, removeBenchReads, type BenchRead } from '../../bench/support';
import { built, sign } from '../reports/support';
import { closeTestDb, testDb, unique } from '../support/db';
import { goodCollection } from '../support/fixtures';
import { demoIds, fill, GET_ROUTES, PAGES } from '../../support/surface';
import { APP_URL, randomLoopback, Session, signedIn, USERS } from '../support/http';
import { startAppInstance, type AppInstance } from '../support/instance';

// A second app server (node server.mjs, same build, same MariaDB, object store and session secret,
// another port), as N instances run behind a load balancer: nothing is kept in one instance's memory
// that another needs.
const port = Number(new URL(APP_URL).port || 3100) + 7;
const OTHER = `http://127.0.0.1:${port}`;
let other: AppInstance;
const otherLog = () => other.log();
const made: BenchRead[] = [];
const extraImages: number[] = [];

beforeAll(async () => {
  other = await startAppInstance(port, 'the second instance');
}, 90_000);

afterAll(async () => {
  other?.stop();
  try {
    const tech = await signedIn(USERS.tech);
    for (const id of extraImages) await tech.json(`/api/images/${id}`, 'DELETE');
    await removeBenchReads(tech, testDb(), made);
  } finally {
    await closeTestDb();
  }
});

const jpeg = async (seed: number) => new Uint8Array((await generateField({ seed, width: 800, height: 600, cells: 12, format: 'jpeg' })).image);
const newMark = (imageId: number, markId = crypto.randomUUID(), opId = crypto.randomUUID()) => ({
  opId, markId, kind: 'upsert', payload: { imageId: String(imageId), x: Math.random() * 799, y: Math.random() * 599, classKey: 'normal', tags: [] },
});

describe('two app instances on one database and object store', { timeout: 120_000 }, () => {
  it('a read scored through both at once ends with every mark once', async () => {
    const [a, b] = await Promise.all([signedIn(USERS.tech), signedIn(USERS.tech, { base: OTHER })]);
    const r = await benchRead(a, await jpeg(31), 'two-instances.jpg');
    made.push(r);
    const sent = new Set<string>();
    const shared: string[] = [];
    const sync = (s: Session, changes: ReturnType<typeof newMark>[]) => s.json(`/api/reads/${r.readId}/sync`, 'POST', { changes });
    for (let round = 0; round < 20; round++) {
      const batchA = Array.from({ length: 5 }, () => newMark(r.imageId));
      const batchB = Array.from({ length: 5 }, () => newMark(r.imageId));
      // The same change sent through both at the same moment (a queue resending after a timeout, the
      // load balancer sending the retry elsewhere): it is stored once.
      const twice = newMark(r.imageId);
      shared.push(twice.opId);
      for (const c of [...batchA, ...batchB, twice]) sent.add(c.markId);
      const answers = await Promise.all([sync(a, [...batchA, twice]), sync(b, [...batchB, twice])]);
      for (const ans of answers) {
        expect(ans.status, JSON.stringify(ans.body)).toBe(200);
        expect(ans.body.acked).toHaveLength(6);
      }
    }
    const rows = await testDb()('marks').where({ read_id: r.readId }).pluck('id');
    expect(rows).toHaveLength(sent.size);
    expect(new Set(rows)).toEqual(sent);
    expect(await testDb()('mark_ops').whereIn('op_id', shared).count({ n: '*' }).first()).toEqual({ n: shared.length });
    // Both instances show the same read.
    const [viaA, viaB] = await Promise.all([a.json(`/api/reads/${r.readId}`), b.json(`/api/reads/${r.readId}`)]);
    const ids = (x: { body: { marks: { id: string }[] } }) => new Set(x.body.marks.map((m) => m.id));
    expect(ids(viaA)).toEqual(sent);
    expect(ids(viaB)).toEqual(sent);
  });

  it('every GET route and page of the surface answers alike through both, with a session made on the other', async () => {
    const ids = await demoIds(testDb());
    const differences: string[] = [];
    let tried = 0;
    for (const [who, email, entries] of [
      ['lab manager', USERS.manager, [...GET_ROUTES, ...PAGES]],
      ['client', USERS.owner, GET_ROUTES],
      ['no session', null, GET_ROUTES],
    ] as const) {
      const a = email ? await signedIn(email) : new Session();
      // The same cookies, sent to the other instance: sessions are signed with the shared secret.
      const b = new Session({ base: OTHER });
      for (const c of a.cookieHeader.split('; ').filter(Boolean)) b.setCookie(c.slice(0, c.indexOf('=')), c.slice(c.indexOf('=') + 1));
      for (const e of entries) {
        const path = fill(e.path, ids);
        const [ra, rb] = await Promise.all([a.fetch(path), b.fetch(path)]);
        await Promise.all([ra.arrayBuffer(), rb.arrayBuffer()]);
        tried++;
        if (ra.status !== rb.status || rb.status >= 500) differences.push(`${who} ${path}: ${ra.status} on the first, ${rb.status} on the second`);
      }
    }
    expect(differences).toEqual([]);
    expect(tried).toBeGreaterThan(GET_ROUTES.length * 3);
  });

  it('sign-in limits count failed attempts across both instances', async () => {
    const email = `${unique('two')}@quillfield.example`;
    await testDb()('users').insert({ email, name: 'Two Instances', role: 'technician', active: true, password_hash: await bcrypt.hash('right-password-1', 4) });
    const from = randomLoopback();
    const a = new Session({ from });
    const b = new Session({ from, base: OTHER });
    for (let i = 0; i < 3; i++) expect(await a.signIn(email, `wrong-${i}`)).toBe('CredentialsSignin');
    for (let i = 0; i < 2; i++) expect(await b.signIn(email, `wrong-b-${i}`)).toBe('CredentialsSignin');
    // Five failures in all, neither instance saw five: both refuse the right password now.
    expect(await b.signIn(email, 'right-password-1')).toMatch(/^rate_limited:\d+$/);
    expect(await a.signIn(email, 'right-password-1')).toMatch(/^rate_limited:\d+$/);
  });

  it('a report signed on one is frozen on the other', async () => {
    const c = await built('settled');
    const vet = await signedIn(USERS.vet);
    const signedRes = await sign(vet, c.collectionId);
    expect(signedRes.status, JSON.stringify(signedRes.body)).toBe(201);
    const tech = await signedIn(USERS.tech, { base: OTHER });
    const before = await testDb()('marks').where({ read_id: c.reads.first }).count({ n: '*' }).first();
    const save = await tech.json(`/api/reads/${c.reads.first}/sync`, 'POST', { changes: [newMark(c.imageIds[0]!)] });
    expect(save.status).toBe(409);
    const edit = await tech.json(`/api/collections/${c.collectionId}`, 'PATCH', goodCollection(c.stallionId, { collectedAt: '2026-05-26T07:40:00.000Z', volumeMl: 41 }));
    expect(edit.status).toBe(409);
    expect(await testDb()('marks').where({ read_id: c.reads.first }).count({ n: '*' }).first()).toEqual(before);
    const shown = await (await signedIn(USERS.vet, { base: OTHER })).json(`/api/collections/${c.collectionId}/report`);
    expect(shown.status).toBe(200);
    expect(JSON.stringify(shown.body)).toContain(signedRes.body.report.verificationCode);
  });

  it('a detection job is taken by exactly one instance', async () => {
    const tech = await signedIn(USERS.tech);
    const r = await benchRead(tech, await jpeg(41), 'detect-1.jpg');
    made.push(r);
    const images = [r.imageId];
    for (let i = 2; i <= 6; i++) {
      const up = await tech.fetch(`/api/collections/${r.collectionId}/images?name=detect-${i}.jpg`, { method: 'POST', body: await jpeg(40 + i) });
      expect(up.status).toBe(201);
      const id = ((await up.json()) as { image: { id: number } }).image.id;
      images.push(id);
      extraImages.push(id);
    }
    const until = Date.now() + 90_000;
    let jobs: { image_id: number; status: string; attempts: number; worker: string }[] = [];
    while (Date.now() < until) {
      jobs = await testDb()('candidate_jobs').whereIn('image_id', images).select('image_id', 'status', 'attempts', 'worker');
      if (jobs.length === images.length && jobs.every((j) => j.status === 'done')) break;
      await new Promise((res) => setTimeout(res, 300));
    }
    expect(jobs.map((j) => j.status), `jobs ${JSON.stringify(jobs)}; the second instance said:\n${otherLog().slice(-1500)}`).toEqual(images.map(() => 'done'));
    // One claim per job (a second taker would have counted a second attempt), by a named worker.
    for (const j of jobs) {
      expect(j.attempts, `image ${j.image_id}`).toBe(1);
      expect(j.worker).toMatch(/:\d+$/);
    }
    const byOther = jobs.filter((j) => j.worker.split(':')[1] === String(other.proc.pid)).length;
    console.log(`detection jobs: ${byOther} of ${jobs.length} taken by the second instance, the rest by the first`);
  });
});
