import 'server-only';
import { env } from '@/lib/env';
import { clientAddress } from '@/lib/net/client-address';

let warned = false;

/**
 * The client's address for a request. server.mjs writes the socket's address into a header of its
 * own (and says so in FIELDMARK_PEER_HEADER); served any other way, the address is unknown.
 */
export function requestAddress(header: (name: string) => string | null | undefined): string {
  const peerHeader = process.env.FIELDMARK_PEER_HEADER;
  if (!peerHeader && !warned) {
    warned = true;
    console.warn('[fieldmark] not served by server.mjs: client addresses are unknown, so sign-in limits count per account only');
  }
  return clientAddress({ peer: peerHeader ? header(peerHeader) : null, forwardedFor: header('x-forwarded-for'), trustProxy: env().TRUST_PROXY });
}
