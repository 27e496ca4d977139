import { withAuth } from 'next-auth/middleware';

// Pages need a session; API routes answer 401/403 themselves (JSON, not a redirect),
// and every page and route checks the role again on the server.
export default withAuth({ pages: { signIn: '/sign-in' } });

export const config = {
  matcher: ['/((?!api|_next/static|_next/image|favicon.ico|sign-in|invite).*)'],
};
