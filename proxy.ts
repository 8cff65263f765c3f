import { getToken } from 'next-auth/jwt';
import { NextResponse, type NextRequest } from 'next/server';
import { databaseDownPage, databaseReachable } from '@/lib/http/database-probe';
import { contentSecurityPolicy, newNonce, PERMISSIONS_POLICY } from '@/lib/http/security-headers';

/**
 * Runs before every page and API route (but the upload route: see `config`):
 *
 * - a page while the database does not accept connections is answered 503 with a sentence (API
 *   routes say the same through their own errors: lib/errors.ts);
 * - every page gets a fresh CSP nonce: the policy goes on the request (Next puts the nonce on its
 *   own scripts) and on the response (lib/http/security-headers.ts);
 * - anonymous visitors go to the sign-in page (API callers get 401 JSON), and a person who signed in
 *   with a one-time password goes to their account page to change it.
 *
 * This is a convenience, not the security boundary: the data access layer checks the user, the
 * session version and the role on every read and write (lib/auth/session.ts).
 */
const PUBLIC_PREFIXES = ['/sign-in', '/api/auth', '/api/health', '/api/v1', '/api/openapi', '/api/webhook-receiver', '/samples', '/_next', '/favicon', '/icon'];
// Pages a person with a one-time password may still open: where it is changed, and signing in or out.
const PASSWORD_CHANGE_PATHS = ['/account', '/sign-in', '/api/auth'];

const startsWithAny = (pathname: string, prefixes: string[]) =>
  prefixes.some((p) => pathname === p || pathname.startsWith(p + '/') || pathname.startsWith(p + '.'));

export async function proxy(req: NextRequest) {
  const { pathname, search } = req.nextUrl;
  const isApi = pathname.startsWith('/api/');
  const isAsset = pathname.startsWith('/_next/') || pathname.startsWith('/samples/') || pathname.startsWith('/favicon');

  if (!isApi && !isAsset && !(await databaseReachable(process.env.DB_HOST ?? '127.0.0.1', Number(process.env.DB_PORT ?? 3307)))) {
    return new NextResponse(databaseDownPage(), {
      status: 503,
      headers: { 'Content-Type': 'text/html; charset=utf-8', 'Retry-After': '5', 'Cache-Control': 'no-store', 'Permissions-Policy': PERMISSIONS_POLICY },
    });
  }

  const requestHeaders = new Headers(req.headers);
  let csp: string | null = null;
  if (!isApi && !isAsset) {
    const nonce = newNonce();
    csp = contentSecurityPolicy(nonce, { dev: process.env.NODE_ENV === 'development' });
    requestHeaders.set('x-nonce', nonce);
    requestHeaders.set('content-security-policy', csp);
  }
  const pass = () => {
    const res = NextResponse.next({ request: { headers: requestHeaders } });
    if (csp) {
      res.headers.set('Content-Security-Policy', csp);
      res.headers.set('Permissions-Policy', PERMISSIONS_POLICY);
    }
    return res;
  };

  if (startsWithAny(pathname, PUBLIC_PREFIXES)) return pass();
  const token = await getToken({ req, secret: process.env.NEXTAUTH_SECRET ?? 'rhobook-development-secret-change-me' });
  if (token) {
    if (token.mcp === true && !isApi && !startsWithAny(pathname, PASSWORD_CHANGE_PATHS)) {
      const url = req.nextUrl.clone();
      url.pathname = '/account';
      url.search = '';
      return NextResponse.redirect(url);
    }
    return pass();
  }
  if (isApi) {
    return NextResponse.json({ code: 'unauthorized:session', message: 'Sign in to continue.' }, { status: 401 });
  }
  const url = req.nextUrl.clone();
  url.pathname = '/sign-in';
  url.search = pathname === '/' ? '' : `?callbackUrl=${encodeURIComponent(pathname + search)}`;
  return NextResponse.redirect(url);
}

export const config = {
  // Not the upload route (/api/datasets): Next buffers a copy of every request body that passes
  // through the proxy, and cuts it at 10 MB, which corrupted larger uploads and would hold whole
  // files in memory. The route streams the body and answers 401 itself without a session.
  // Nor the consumer API (/api/v1/...) and the health check: public to the proxy anyway (token
  // checks are the routes' own, headers come from next.config.mjs), and going through it costs each
  // call a copy of its headers and a second pass through Next's routing.
  matcher: ['/((?!_next/static|_next/image|favicon.ico|api/datasets$|api/v1/|api/health$).*)'],
};
