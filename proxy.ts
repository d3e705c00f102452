import { NextResponse, type NextRequest } from 'next/server';

/**
 * Sends signed-out visitors of pages to the sign-in page. This is a convenience only: every page,
 * route handler and server action still authorises the caller itself through lib/authz.ts.
 */
const PUBLIC = [/^\/signin/, /^\/welcome/, /^\/reset(\/|$)/, /^\/not-permitted/, /^\/api\//, /^\/_next\//, /^\/fonts\//, /^\/favicon/];

export function proxy(request: NextRequest) {
  const { pathname } = request.nextUrl;
  if (PUBLIC.some((p) => p.test(pathname))) return NextResponse.next();
  const hasSession = request.cookies.has('next-auth.session-token') || request.cookies.has('__Secure-next-auth.session-token');
  if (!hasSession) {
    const url = request.nextUrl.clone();
    url.pathname = '/signin';
    url.search = '';
    return NextResponse.redirect(url);
  }
  return NextResponse.next();
}

export const config = { matcher: ['/((?!_next/static|_next/image|favicon.ico).*)'] };
