// The address a request came from, for the sign-in limits. Pure: the caller passes the headers.

/** '::ffff:10.0.0.1' and '10.0.0.1' are the same client; an IPv6 zone or brackets are noise. */
export function normaliseAddress(value: string): string {
  let v = value.trim().toLowerCase();
  if (v.startsWith('[') && v.includes(']')) v = v.slice(1, v.indexOf(']'));
  if (v.startsWith('::ffff:') && v.includes('.')) v = v.slice(7);
  const zone = v.indexOf('%');
  if (zone > 0) v = v.slice(0, zone);
  return v;
}

/**
 * The client's address: the socket's own (`peer`), unless `trustProxy` reverse proxies stand in
 * front of the app. Each proxy appends the address it was called from to X-Forwarded-For, so with
 * N trusted proxies the client is the N-th entry from the right of [...forwardedFor, peer]; entries
 * further left were written by the client and prove nothing. Without a peer (the app is not served
 * by server.mjs) the answer is 'unknown', so limits fall back to being stricter, never looser.
 */
export function clientAddress({ peer, forwardedFor, trustProxy }: { peer?: string | null; forwardedFor?: string | null; trustProxy: number }): string {
  if (!peer) return 'unknown';
  if (trustProxy <= 0) return normaliseAddress(peer);
  const hops = (forwardedFor ?? '').split(',').map((h) => h.trim()).filter(Boolean);
  const chain = [...hops, peer];
  // Fewer hops than trusted proxies: the leftmost one is as far as the chain goes.
  const pick = chain[Math.max(0, chain.length - 1 - trustProxy)]!;
  return normaliseAddress(pick);
}
