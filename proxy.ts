import { getToken } from 'next-auth/jwt';
import { NextResponse, type NextRequest } from 'next/server';

/**
 * Sends anonymous visitors to the sign-in page (API callers get 401 JSON). This is a convenience,
 * not the security boundary: the data access layer checks the user and role on every read and write.
 */
const PUBLIC_PREFIXES = ['/sign-in', '/api/auth', '/api/health', '/api/v1', '/api/openapi', '/samples', '/_next', '/favicon', '/icon'];

export async function proxy(req: NextRequest) {
  const { pathname, search } = req.nextUrl;
  if (PUBLIC_PREFIXES.some((p) => pathname === p || pathname.startsWith(p + '/') || pathname.startsWith(p + '.'))) {
    return NextResponse.next();
  }
  const token = await getToken({ req, secret: process.env.NEXTAUTH_SECRET ?? 'rhobook-development-secret-change-me' });
  if (token) return NextResponse.next();
  if (pathname.startsWith('/api/')) {
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
  matcher: ['/((?!_next/static|_next/image|favicon.ico|api/datasets$).*)'],
};
