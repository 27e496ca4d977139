import { describe, expect, it } from 'vitest';
import { clientAddress, normaliseAddress } from '@/lib/net/client-address';

describe('client address for the sign-in limits', () => {
  it('is the socket address unless proxies are trusted: X-Forwarded-For from a client proves nothing', () => {
    expect(clientAddress({ peer: '::ffff:198.51.100.7', forwardedFor: '203.0.113.9', trustProxy: 0 })).toBe('198.51.100.7');
    expect(clientAddress({ peer: '198.51.100.7', forwardedFor: null, trustProxy: 0 })).toBe('198.51.100.7');
  });

  it('with N trusted proxies, takes the N-th hop from the right (what the outermost trusted proxy saw)', () => {
    // One proxy at 10.0.0.2: it appended the client 198.51.100.7; the client forged the first entry.
    expect(clientAddress({ peer: '10.0.0.2', forwardedFor: '203.0.113.9, 198.51.100.7', trustProxy: 1 })).toBe('198.51.100.7');
    // Two proxies: the CDN saw the client, the load balancer saw the CDN.
    expect(clientAddress({ peer: '10.0.0.3', forwardedFor: '203.0.113.9, 198.51.100.7, 10.0.0.2', trustProxy: 2 })).toBe('198.51.100.7');
    // Fewer hops than trusted proxies: the furthest one known.
    expect(clientAddress({ peer: '10.0.0.2', forwardedFor: '', trustProxy: 3 })).toBe('10.0.0.2');
  });

  it('is unknown when the server did not say (not served by server.mjs)', () => {
    expect(clientAddress({ peer: undefined, forwardedFor: '203.0.113.9', trustProxy: 1 })).toBe('unknown');
  });

  it('normalises IPv4-mapped, bracketed and zoned IPv6 forms', () => {
    expect(normaliseAddress('::FFFF:127.0.0.1')).toBe('127.0.0.1');
    expect(normaliseAddress('[2001:db8::1]')).toBe('2001:db8::1');
    expect(normaliseAddress('fe80::1%eth0')).toBe('fe80::1');
  });
});
