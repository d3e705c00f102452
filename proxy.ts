import { NextResponse, type NextRequest } from 'next/server';
import { safeNextPath } from './lib/next-path';

/**
 * Sends signed-out visitors of pages to the sign-in page. This is a convenience only: every page,
 * route handler and server action still authorises the caller itself through lib/authz/.
 */
const PUBLIC = [/^\/signin/, /^\/welcome/, /^\/reset(\/|$)/, /^\/not-permitted/, /^\/_next\//, /^\/fonts\//, /^\/favicon/];

export function proxy(request: NextRequest) {
  const { pathname } = request.nextUrl;
  if (PUBLIC.some((p) => p.test(pathname))) return NextResponse.next();
  const hasSession = request.cookies.has('next-auth.session-token') || request.cookies.has('__Secure-next-auth.session-token');
  if (!hasSession) {
    const url = request.nextUrl.clone();
    url.pathname = '/signin';
    url.search = '';
    // Back to the page asked for after signing in (a link in an e-mail, say); only same-site paths.
    if (pathname !== '/' && safeNextPath(pathname + request.nextUrl.search))
      url.searchParams.set('next', pathname + request.nextUrl.search);
    return NextResponse.redirect(url);
  }
  return NextResponse.next();
}

/**
 * Pages only. API routes answer 401 themselves, and must not pass through here: for a request
 * that runs the proxy, Next keeps a copy of the body and holds the route handler back until the
 * whole body has arrived, so an upload's own size and time limits could not act while it streams.
 */
export const config = { matcher: ['/((?!api/|_next/static|_next/image|favicon.ico).*)'] };
