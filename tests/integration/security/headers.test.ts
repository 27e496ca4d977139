import { afterAll, describe, expect, it } from 'vitest';
import { jpegOf } from '../../unit/images/fixtures';
import { closeTestDb, testDb } from '../support/db';
import { goodCollection, makeStallion } from '../support/fixtures';
import { APP_URL, Session, signedIn, USERS } from '../support/http';

afterAll(closeTestDb);

const directive = (policy: string, name: string) => policy.split(';').map((d) => d.trim()).find((d) => d.startsWith(`${name} `) || d === name);

describe('security headers', () => {
  it('pages carry a nonce policy that matches their scripts, cannot be framed, and are not sniffed', async () => {
    const res = await fetch(`${APP_URL}/sign-in`);
    const policy = res.headers.get('content-security-policy') ?? '';
    const nonce = /'nonce-([^']+)'/.exec(directive(policy, 'script-src') ?? '')?.[1];
    expect(nonce).toBeTruthy();
    expect(policy).not.toMatch(/unsafe-eval/);
    expect(directive(policy, 'frame-ancestors')).toBe("frame-ancestors 'none'");
    const html = await res.text();
    const scripts = [...html.matchAll(/<script\b[^>]*>/g)].map((m) => m[0]);
    expect(scripts.length).toBeGreaterThan(0);
    for (const tag of scripts) expect(tag).toContain(`nonce="${nonce}"`);
    expect(res.headers.get('x-content-type-options')).toBe('nosniff');
    expect(res.headers.get('referrer-policy')).toBe('same-origin');
    // Served over http here: no HSTS (lib/security/headers.ts sends it for an https APP_URL).
    expect(res.headers.get('strict-transport-security')).toBeNull();
    // A new nonce per request.
    const again = (await fetch(`${APP_URL}/sign-in`)).headers.get('content-security-policy');
    expect(again).not.toBe(policy);
  });

  it('API answers allow nothing to load and are not sniffed', async () => {
    const res = await fetch(`${APP_URL}/api/health`);
    expect(res.headers.get('content-security-policy')).toBe("default-src 'none'; frame-ancestors 'none'");
    expect(res.headers.get('x-content-type-options')).toBe('nosniff');
  });

  it('the tab icon and robots.txt are served to anyone, and robots.txt keeps search engines out', async () => {
    const icon = await fetch(`${APP_URL}/icon.svg`, { redirect: 'manual' });
    expect(icon.status).toBe(200);
    expect(icon.headers.get('content-type')).toMatch(/^image\/svg\+xml/);
    const robots = await fetch(`${APP_URL}/robots.txt`, { redirect: 'manual' });
    expect(robots.status).toBe(200);
    expect(await robots.text()).toMatch(/User-agent: \*\s+Disallow: \/\s*$/m);
    expect(await (await fetch(`${APP_URL}/sign-in`)).text()).toContain('<link rel="icon" href="/icon.svg"');
  });
});

describe('body size limit', () => {
  const bigJson = (bytes: number) => JSON.stringify({ changes: [], padding: 'x'.repeat(bytes) });

  it('refuses a JSON body over 1 MB with 413 before it is parsed, with or without a declared length', async () => {
    const s = await signedIn(USERS.tech);
    const declared = await s.json('/api/reads/1/sync', 'POST', bigJson(1024 * 1024 + 10));
    expect(declared.status).toBe(413);
    expect(declared.body.error.code).toBe('too_large');
    const bytes = new TextEncoder().encode(bigJson(1024 * 1024 + 10));
    const streamed = await s.fetch('/api/reads/1/sync', {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: new ReadableStream({
        start(c) {
          for (let i = 0; i < bytes.length; i += 65536) c.enqueue(bytes.slice(i, i + 65536));
          c.close();
        },
      }),
      duplex: 'half',
    } as RequestInit);
    expect(streamed.status).toBe(413);
  });

  it('refuses an oversized sign-in body too', async () => {
    const s = new Session();
    const { body } = await s.json<{ csrfToken: string }>('/api/auth/csrf');
    const form = new URLSearchParams({ csrfToken: body.csrfToken, email: USERS.tech, password: 'x'.repeat(1024 * 1024 + 10), json: 'true' });
    const res = await s.fetch('/api/auth/callback/credentials', { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: form.toString() });
    expect(res.status).toBe(413);
  });

  it('a full mark sync of 200 changes fits well inside the limit', async () => {
    const tech = await signedIn(USERS.tech);
    const st = await makeStallion();
    const collectionId = (await tech.json('/api/collections', 'POST', goodCollection(st.id))).body.collection.id;
    const up = await tech.fetch(`/api/collections/${collectionId}/images?name=f.jpg`, { method: 'POST', headers: { 'content-type': 'application/octet-stream' }, body: new Uint8Array(await jpegOf(1000, 800)) });
    const imageId = ((await up.json()) as { image: { id: number } }).image.id;
    const readId = (await tech.json(`/api/collections/${collectionId}/reads`, 'POST', { kind: 'first' })).body.read.id;
    const changes = Array.from({ length: 200 }, (_, i) => {
      const markId = crypto.randomUUID();
      return { opId: crypto.randomUUID(), markId, kind: 'upsert', queuedAt: Date.now(), payload: { id: markId, imageId, x: 10 + i * 4, y: 20 + i * 3, classKey: 'proximal_droplet', tags: ['bent_coiled_tail', 'acrosome_defect'] } };
    });
    expect(JSON.stringify({ changes }).length).toBeLessThan(100 * 1024);
    const r = await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes });
    expect(r.status, JSON.stringify(r.body).slice(0, 300)).toBe(200);
    expect(r.body.acked).toHaveLength(200);
    expect(await testDb()('marks').where({ read_id: readId }).count({ n: '*' }).first()).toEqual({ n: 200 });
  });
});
