import { describe, expect, it } from 'vitest';
import { asSentenceEnd, BodyTooLarge, crossSiteRefusal, isJsonContentType, readLimitedBody } from '@/lib/api/request-guard';

const APP = 'http://localhost:3000';
const req = (method: string, origin: string | null, secFetchSite: string | null = null) => ({ method, origin, secFetchSite });

describe('cross-site writes', () => {
  it('refuses a state-changing request whose Origin is not the app', () => {
    for (const m of ['POST', 'PUT', 'PATCH', 'DELETE']) {
      expect(crossSiteRefusal(req(m, 'https://evil.example'), APP), m).not.toBeNull();
      // A sibling on the same site is still another origin.
      expect(crossSiteRefusal(req(m, 'http://lims.localhost:3000'), APP), m).not.toBeNull();
      expect(crossSiteRefusal(req(m, 'null'), APP), m).not.toBeNull();
      expect(crossSiteRefusal(req(m, APP), APP), m).toBeNull();
    }
  });

  it('without Origin, refuses what the browser marks as from another site', () => {
    expect(crossSiteRefusal(req('POST', null, 'cross-site'), APP)).not.toBeNull();
    expect(crossSiteRefusal(req('POST', null, 'same-site'), APP)).not.toBeNull();
    expect(crossSiteRefusal(req('POST', null, 'same-origin'), APP)).toBeNull();
    // No browser page made it (curl, scripts): the session and role checks decide.
    expect(crossSiteRefusal(req('POST', null, null), APP)).toBeNull();
  });

  it('leaves reads alone', () => {
    expect(crossSiteRefusal(req('GET', 'https://evil.example'), APP)).toBeNull();
  });
});

describe('JSON bodies', () => {
  it('must say application/json', () => {
    expect(isJsonContentType('application/json')).toBe(true);
    expect(isJsonContentType('Application/JSON; charset=utf-8')).toBe(true);
    for (const v of ['text/plain', 'application/x-www-form-urlencoded', 'multipart/form-data; boundary=x', 'application/jsonp', null]) expect(isJsonContentType(v), String(v)).toBe(false);
  });

  const stream = (chunks: number[]) =>
    new ReadableStream<Uint8Array>({
      start(c) {
        for (const n of chunks) c.enqueue(new Uint8Array(n));
        c.close();
      },
    });

  it('are read whole within the limit', async () => {
    expect((await readLimitedBody(stream([400, 600]), null, 1000)).byteLength).toBe(1000);
  });

  it('are refused past the limit, by declared length before reading and by counting without one', async () => {
    await expect(readLimitedBody(stream([10]), '2000', 1000)).rejects.toBeInstanceOf(BodyTooLarge);
    await expect(readLimitedBody(stream([600, 600]), null, 1000)).rejects.toBeInstanceOf(BodyTooLarge);
  });
});

describe('validation messages', () => {
  it('end in exactly one full stop', () => {
    expect(asSentenceEnd('Enter a valid e-mail address.')).toBe('Enter a valid e-mail address.');
    expect(asSentenceEnd('Too small: expected number to be >0')).toBe('Too small: expected number to be >0.');
    expect(asSentenceEnd('Check the values… ')).toBe('Check the values.');
  });
});
