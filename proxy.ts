import { withAuth } from 'next-auth/middleware';
import { NextResponse, type NextFetchEvent, type NextRequest } from 'next/server';
import { makeNonce, pageSecurityHeaders } from '@/lib/security/headers';

// Pages need a session (API routes answer 401/403 themselves, as JSON, and every page and route
// checks the role again on the server), except sign-in, invitations and the public verification
// of a report's code. Every page gets a Content-Security-Policy with a fresh nonce: Next reads it
// from the request's policy header and puts it on its own scripts.
const PUBLIC_PAGES = /^\/(sign-in|invite|verify)(\/|$)/;

function withPolicy(req: NextRequest): NextResponse {
  const page = pageSecurityHeaders({ nonce: makeNonce(), dev: process.env.NODE_ENV === 'development', appUrl: process.env.APP_URL ?? '' });
  const headers = new Headers(req.headers);
  headers.set('content-security-policy', page['Content-Security-Policy']!);
  const res = NextResponse.next({ request: { headers } });
  for (const [k, v] of Object.entries(page)) res.headers.set(k, v);
  return res;
}

const signedInOnly = withAuth((req) => withPolicy(req), { pages: { signIn: '/sign-in' } });

export default function proxy(req: NextRequest, event: NextFetchEvent) {
  if (PUBLIC_PAGES.test(req.nextUrl.pathname)) return withPolicy(req);
  return signedInOnly(req as Parameters<typeof signedInOnly>[0], event);
}

export const config = {
  matcher: ['/((?!api|_next/static|_next/image|favicon.ico|icon.svg|robots.txt).*)'],
};
