// A body refused for its size (an image over the upload limit, JSON over the body limit) is read
// to its end and dropped, so the connection it came on answers the client's next request at once.
// (Cancelled half-read, the connection stalled and the next request on it waited for the 65 s
// keep-alive timeout, then failed.)
import { Readable } from 'node:stream';
import { Agent, fetch, type BodyInit } from 'undici';
import { afterAll, describe, expect, it } from 'vitest';
import { closeTestDb } from '../support/db';
import { goodCollection, makeStallion } from '../support/fixtures';
import { APP_URL, signedIn, USERS } from '../support/http';

afterAll(closeTestDb);

// One connection only: the request after the refused one goes on the same socket.
const oneSocket = new Agent({ connections: 1, pipelining: 1 });
afterAll(() => oneSocket.close());

/** `chunked`: sent as a stream without a Content-Length, so only reading it shows its size. */
async function refusedThenNext(cookie: string, path: string, bytes: Uint8Array, contentType: string, chunked = false) {
  const body: BodyInit = chunked
    ? Readable.from((function* () {
        for (let at = 0; at < bytes.length; at += 64 * 1024) yield bytes.subarray(at, at + 64 * 1024);
      })())
    : bytes;
  const refused = await fetch(`${APP_URL}${path}`, { method: 'POST', headers: { cookie, 'content-type': contentType }, body, duplex: 'half', dispatcher: oneSocket });
  const refusal = (await refused.json()) as { error: { code: string; message: string } };
  const t0 = performance.now();
  const next = await fetch(`${APP_URL}/api/health`, { headers: { cookie }, dispatcher: oneSocket, signal: AbortSignal.timeout(10_000) });
  await next.text();
  return { status: refused.status, refusal, nextStatus: next.status, nextMs: performance.now() - t0 };
}

describe('a body refused for its size', () => {
  it('an image over the upload limit: 413, and the same connection answers the next request at once', async () => {
    const s = await signedIn(USERS.tech);
    const st = await makeStallion();
    const id = (await s.json('/api/collections', 'POST', goodCollection(st.id))).body.collection.id as number;
    const r = await refusedThenNext(s.cookieHeader, `/api/collections/${id}/images?name=big.tif`, new Uint8Array(9 * 1024 * 1024).fill(7), 'application/octet-stream');
    expect(r.status).toBe(413);
    expect(r.refusal.error.message).toMatch(/big\.tif: the file is larger than the 8 MB limit/);
    expect(r.nextStatus).toBe(200);
    expect(r.nextMs).toBeLessThan(5_000);
  });

  it.each([
    ['with its length declared', false],
    ['sent in chunks without a length', true],
  ])('JSON over the body limit, %s: 413, and the same connection answers the next request at once', async (_how, chunked) => {
    const s = await signedIn(USERS.tech);
    const json = new TextEncoder().encode(JSON.stringify({ notes: 'x'.repeat(2 * 1024 * 1024) }));
    const r = await refusedThenNext(s.cookieHeader, '/api/stallions', json, 'application/json', chunked);
    expect(r.status).toBe(413);
    expect(r.refusal.error.message).toMatch(/larger than \d+ kB/);
    expect(r.nextStatus).toBe(200);
    expect(r.nextMs).toBeLessThan(5_000);
  });
});
