// Candidate detection as a job: queued with the upload, taken by the app's worker (and, in
// the competition tests, by two more workers run here against the same database), its
// state and result at GET /api/images/{id}/candidates.
import { afterAll, describe, expect, it } from 'vitest';
import { pairingDistancePx, pairPoints } from '@/lib/agreement/pairing';
import { completeJob } from '@/lib/candidates/jobs';
import { startWorker, type RunningWorker } from '@/lib/candidates/worker';
import { generateField } from '@/lib/synthetic/generate-field';
import { closeTestDb, testDb } from '../support/db';
import { goodCollection, makeStallion } from '../support/fixtures';
import { Session, signedIn, USERS } from '../support/http';
import { getObject, putObject, removeObject } from '../support/s3';

const workers: RunningWorker[] = [];
afterAll(async () => {
  await Promise.all(workers.map((w) => w.stop()));
  await closeTestDb();
});

async function newCollection(s: Session) {
  const st = await makeStallion();
  return (await s.json('/api/collections', 'POST', goodCollection(st.id))).body.collection.id as number;
}

async function upload(s: Session, collectionId: number, name: string, body: Buffer, scale: number | null = 0.25) {
  const res = await s.fetch(`/api/collections/${collectionId}/images?name=${encodeURIComponent(name)}${scale ? `&micronsPerPixel=${scale}` : ''}`, {
    method: 'POST',
    headers: { 'content-type': 'application/octet-stream' },
    body: new Uint8Array(body),
  });
  expect(res.status, await res.clone().text()).toBe(201);
  return ((await res.json()) as { image: { id: number } }).image.id;
}

type Answer = { status: string; candidates: { x: number; y: number; score: number }[]; method: string | null; params: Record<string, unknown> | null; ms: number | null; error: string | null; skipped: string | null; attempts: number };

async function settled(s: Session, imageId: number, want: string[] = ['done', 'failed'], timeoutMs = 40_000): Promise<Answer> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const r = await s.json<Answer>(`/api/images/${imageId}/candidates`);
    expect(r.status).toBe(200);
    if (want.includes(r.body.status)) return r.body;
    if (Date.now() > until) throw new Error(`image ${imageId} still ${r.body.status} after ${timeoutMs} ms`);
    await new Promise((res) => setTimeout(res, 150));
  }
}

const field = (seed: number, cells = 10) => generateField({ seed, width: 1200, height: 900, micronsPerPixel: 0.25, cells, format: 'jpeg' });

describe('candidates of a field image', () => {
  it('are found after the upload by the job, near the cells drawn, in image pixels', async () => {
    const s = await signedIn(USERS.tech);
    const collection = await newCollection(s);
    const f = await field(501, 12);
    const id = await upload(s, collection, 'found.jpg', f.image);
    // Queued with the upload itself; the upload did not wait for it.
    const job = await testDb()('candidate_jobs').where({ image_id: id }).first();
    expect(job).toBeTruthy();
    const a = await settled(s, id);
    expect(a).toMatchObject({ status: 'done', method: expect.any(String), ms: expect.any(Number), error: null });
    expect(a.params).toMatchObject({ micronsPerPixel: 0.25, scaleSource: 'image', polarity: 'bright', imageWidth: 1200, imageHeight: 900 });
    const pairing = pairPoints(f.cells, a.candidates, pairingDistancePx(0.25));
    expect(pairing.pairs.length / f.cells.length).toBeGreaterThanOrEqual(0.9);
    expect(pairing.onlySecond.length).toBeLessThanOrEqual(1);
    // The gallery's list carries the state and the count.
    const list = (await s.json(`/api/collections/${collection}/images`)).body.images as { id: number; candidates: { status: string; count: number } }[];
    expect(list.find((i) => i.id === id)?.candidates).toEqual({ status: 'done', count: a.candidates.length, error: null, skipped: null });
    expect(a).toMatchObject({ skipped: null });
  });

  it('are not searched for where a head is too few pixels long: done, none, and the reason in words', async () => {
    // 6 µm head (from memory) at 0.9 µm/px: 6.7 px long, under the 8 px the search needs.
    const s = await signedIn(USERS.tech);
    const collection = await newCollection(s);
    const f = await generateField({ seed: 503, width: 1200, height: 900, micronsPerPixel: 0.9, cells: 10, format: 'jpeg', look: 'phase' });
    const id = await upload(s, collection, 'coarse.jpg', f.image, 0.9);
    const a = await settled(s, id);
    expect(a).toMatchObject({ status: 'done', candidates: [], error: null, skipped: 'Cells are not found automatically at this scale (0.9 µm per pixel): mark them by hand.' });
    expect(a.method).toMatch(/ v3$/);
    expect(a.params).toMatchObject({ micronsPerPixel: 0.9, headLengthPx: 6.67, minHeadLengthPx: 8, skipped: 'scale too coarse: a head would be 6.7 px long; cell finding needs at least 8' });
    const list = (await s.json(`/api/collections/${collection}/images`)).body.images as { id: number; candidates: unknown }[];
    expect(list.find((i) => i.id === id)?.candidates).toEqual({ status: 'done', count: 0, error: null, skipped: a.skipped });
  });

  it('uses the lab setting for an image without a scale', async () => {
    const s = await signedIn(USERS.tech);
    const collection = await newCollection(s);
    const id = await upload(s, collection, 'unscaled.jpg', (await field(502, 4)).image, null);
    const a = await settled(s, id);
    expect(a.status).toBe('done');
    expect(a.params).toMatchObject({ scaleSource: 'lab setting', micronsPerPixel: 0.25 });
  });

  it('answers staff only: 401 signed out, 403 for a client, 404 for no image, 422 for a bad id', async () => {
    const tech = await signedIn(USERS.tech);
    const id = await upload(tech, await newCollection(tech), 'roles.jpg', (await field(503, 3)).image);
    const anon = new Session();
    expect((await anon.json(`/api/images/${id}/candidates`)).status).toBe(401);
    expect((await anon.json(`/api/images/${id}/candidates`, 'POST')).status).toBe(401);
    const client = await signedIn(USERS.owner);
    expect((await client.json(`/api/images/${id}/candidates`)).status).toBe(403);
    expect((await client.json(`/api/images/${id}/candidates`, 'POST')).status).toBe(403);
    const manager = await signedIn(USERS.manager);
    expect((await manager.json(`/api/images/${id}/candidates`)).status).toBe(200);
    expect((await tech.json('/api/images/99999999/candidates')).status).toBe(404);
    expect((await tech.json('/api/images/99999999/candidates', 'POST')).status).toBe(404);
    const bad = await tech.json('/api/images/abc/candidates');
    expect(bad.status).toBe(422);
    expect(bad.body.error.message).toMatch(/id/);
    await settled(tech, id);
  });

  it('a job that keeps failing is retried, then shows failed with its reason; a re-run after the fault finds the cells', async () => {
    const s = await signedIn(USERS.tech);
    const f = await field(504, 8);
    const id = await upload(s, await newCollection(s), 'lost.jpg', f.image);
    await settled(s, id);
    const { original_key: key } = await testDb()('field_images').where({ id }).first('original_key');
    const original = await getObject(key);
    await removeObject(key);
    try {
      const rerun = await s.json(`/api/images/${id}/candidates`, 'POST');
      expect(rerun).toEqual({ status: 202, body: { status: 'waiting' } });
      const failed = await settled(s, id, ['failed']);
      expect(failed.attempts).toBe(Number(process.env.CANDIDATE_MAX_ATTEMPTS ?? 3));
      expect(failed.error).toMatch(/could not be read from the image store/);
      expect(failed.candidates).toEqual([]);
      const audit = await testDb()('audit_log').where({ entity: 'candidates', entity_id: String(id) }).first();
      expect(audit).toBeTruthy();
    } finally {
      await putObject(key, original);
    }
    expect((await s.json(`/api/images/${id}/candidates`, 'POST')).status).toBe(202);
    const again = await settled(s, id);
    expect(again).toMatchObject({ status: 'done', error: null, attempts: 1 });
    expect(pairPoints(f.cells, again.candidates, pairingDistancePx(0.25)).pairs.length).toBeGreaterThanOrEqual(7);
  });

  it('competing workers take each job exactly once, and a job whose lease ran out is taken again', async () => {
    const s = await signedIn(USERS.tech);
    const collection = await newCollection(s);
    const ids: number[] = [];
    for (let i = 0; i < 8; i++) ids.push(await upload(s, collection, `race-${i}.jpg`, (await field(600 + i, 4)).image));
    for (const id of ids) await settled(s, id);

    // All due again in a moment, with two more workers here beside the app's own.
    const db = testDb();
    await db('candidate_jobs').whereIn('image_id', ids).update({ status: 'waiting', attempts: 0, worker: null, run_after: db.raw('now(3) + interval 1 second') });
    const taken: Record<string, number[]> = { 'test-worker-a': [], 'test-worker-b': [] };
    for (const name of Object.keys(taken)) {
      const base = { db, name, pollMs: 25, readObject: getObject, options: { leaseMs: 60_000, maxAttempts: 3, retryBaseMs: 200 } };
      workers.push(startWorker(base));
    }
    const until = Date.now() + 40_000;
    let rows: { image_id: number; status: string; attempts: number; worker: string }[] = [];
    while (Date.now() < until) {
      rows = await db('candidate_jobs').whereIn('image_id', ids).select('image_id', 'status', 'attempts', 'worker');
      if (rows.every((r) => r.status === 'done')) break;
      await new Promise((r) => setTimeout(r, 100));
    }
    expect(rows.map((r) => r.status)).toEqual(ids.map(() => 'done'));
    // Each claim counts an attempt: one each means no job was taken twice.
    expect(rows.map((r) => r.attempts)).toEqual(ids.map(() => 1));
    for (const r of rows) (taken[r.worker] ??= []).push(r.image_id);
    const here = [...taken['test-worker-a'], ...taken['test-worker-b']];
    expect(here.length).toBeGreaterThan(0);
    expect(new Set(rows.map((r) => r.image_id)).size).toBe(ids.length);

    // An instance died holding a job: its lease runs out, another worker takes it again.
    const dead = ids[0];
    await db('candidate_jobs').where({ image_id: dead }).update({ status: 'running', attempts: 1, lease_token: '00000000-0000-4000-8000-000000000000', lease_until: db.raw('now(3) - interval 1 second'), worker: 'dead-instance' });
    const recovered = await settled(s, dead, ['done']);
    expect(recovered.attempts).toBe(2);
    // The dead instance's late result is refused: its lease token is no longer the job's.
    expect(await completeJob(db, { id: dead, token: '00000000-0000-4000-8000-000000000000', attempts: 1 }, { candidates: [], method: 'late', params: {}, ms: 1 })).toBe(false);
    expect((await s.json<Answer>(`/api/images/${dead}/candidates`)).body).toMatchObject({ status: 'done', candidates: recovered.candidates });
  });
});
