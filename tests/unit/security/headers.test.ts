import { describe, expect, it } from 'vitest';
import { contentSecurityPolicy, HSTS, makeNonce, pageSecurityHeaders } from '@/lib/security/headers';

const directives = (p: string) => Object.fromEntries(p.split('; ').map((d) => [d.split(' ')[0], d.split(' ').slice(1)]));

describe('page Content-Security-Policy', () => {
  it('runs only nonce scripts (and what they load), never eval in production, and cannot be framed', () => {
    const d = directives(contentSecurityPolicy({ nonce: 'abc123', dev: false, https: false }));
    expect(d['script-src']).toEqual(["'self'", "'nonce-abc123'", "'strict-dynamic'"]);
    expect(d['frame-ancestors']).toEqual(["'none'"]);
    expect(d['object-src']).toEqual(["'none'"]);
    expect(d['connect-src']).toEqual(["'self'"]);
    expect(d['upgrade-insecure-requests']).toBeUndefined();
  });

  it('allows eval only in development, and upgrades requests over https', () => {
    expect(directives(contentSecurityPolicy({ nonce: 'n', dev: true, https: false }))['script-src']).toContain("'unsafe-eval'");
    expect(directives(contentSecurityPolicy({ nonce: 'n', dev: false, https: true }))['upgrade-insecure-requests']).toEqual([]);
  });

  it('uses a fresh 128-bit nonce each time', () => {
    const a = makeNonce();
    expect(atob(a)).toHaveLength(16);
    expect(makeNonce()).not.toBe(a);
  });
});

describe('HSTS', () => {
  it('is sent only when the app is served over https', () => {
    expect(pageSecurityHeaders({ nonce: 'n', dev: false, appUrl: 'https://fieldmark.lab.example' })['Strict-Transport-Security']).toBe(HSTS);
    expect(pageSecurityHeaders({ nonce: 'n', dev: false, appUrl: 'http://localhost:3000' })['Strict-Transport-Security']).toBeUndefined();
    expect(HSTS).toMatch(/max-age=31536000/);
  });
});
