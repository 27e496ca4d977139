// Checks every state-changing API request passes before its handler runs (lib/api/handler.ts).
// Pure: no Next.js, so unit tests call them directly.

export const STATE_CHANGING_METHODS: ReadonlySet<string> = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/**
 * Why a request must be refused as cross-site, or null. Browsers send Origin with every POST,
 * PUT, PATCH and DELETE (fetch, XHR and forms alike); when it is not the app's own origin the
 * request was made by another site's page — also a sibling subdomain, where SameSite=Lax cookies
 * still ride along. Without Origin, Sec-Fetch-Site tells the same for browsers that send it.
 * A request with neither came from no browser page (curl, scripts) and carries no one's cookies
 * unwillingly, so it passes to the usual session and role checks.
 */
export function crossSiteRefusal(req: { method: string; origin: string | null; secFetchSite: string | null }, appOrigin: string): string | null {
  if (!STATE_CHANGING_METHODS.has(req.method.toUpperCase())) return null;
  if (req.origin !== null) return req.origin === appOrigin ? null : `Origin ${req.origin} is not ${appOrigin}`;
  if (req.secFetchSite === 'cross-site' || req.secFetchSite === 'same-site') return `Sec-Fetch-Site: ${req.secFetchSite}`;
  return null;
}

/** `application/json`, with or without parameters (`; charset=utf-8`). A form's text/plain is not JSON, whatever its body says. */
export function isJsonContentType(value: string | null): boolean {
  if (!value) return false;
  return value.split(';')[0]!.trim().toLowerCase() === 'application/json';
}

export class BodyTooLarge extends Error {
  constructor(public limitBytes: number) {
    super(`body over ${limitBytes} bytes`);
  }
}

/**
 * The whole body, or BodyTooLarge as soon as it passes `limitBytes`: a declared Content-Length is
 * refused before a byte is read, and a body without one is counted as it streams in, so an
 * oversized body is never held whole nor parsed.
 */
export async function readLimitedBody(body: ReadableStream<Uint8Array> | null, contentLength: string | null, limitBytes: number): Promise<Uint8Array> {
  if (contentLength !== null && Number(contentLength) > limitBytes) {
    if (body) await discardRest(body.getReader(), Number(contentLength) <= 4 * limitBytes ? Infinity : 0);
    throw new BodyTooLarge(limitBytes);
  }
  if (!body) return new Uint8Array(0);
  const reader = body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > limitBytes) {
      await discardRest(reader, 3 * limitBytes);
      throw new BodyTooLarge(limitBytes);
    }
    chunks.push(value);
  }
  const out = new Uint8Array(size);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  return out;
}

/**
 * Reads the rest of a refused body and drops it, up to `maxBytes` more (then cancels). A body
 * cancelled half-read leaves the connection stalled under Next's server, and the client's next
 * request on it hangs until the keep-alive timeout; one read to its end leaves it usable.
 */
export async function discardRest(reader: ReadableStreamDefaultReader<Uint8Array>, maxBytes: number): Promise<void> {
  let more = 0;
  try {
    while (more <= maxBytes) {
      const { done, value } = await reader.read();
      if (done) return;
      more += value.byteLength;
    }
    await reader.cancel();
  } catch {
    // The client went away: nothing left to read.
  }
}

/** A validation message as the end of a sentence: exactly one full stop, whatever the schema's message ended with. */
export function asSentenceEnd(message: string): string {
  return `${message.trim().replace(/[.!?…\s]+$/u, '')}.`;
}
