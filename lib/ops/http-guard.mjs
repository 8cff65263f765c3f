// Checks of the web process (lib/ops/web-server.mjs) that come before Next sees anything.
// Plain Node, no dependencies.

/**
 * The methods the app answers. Anything else (TRACE, CONNECT, PROPFIND, made-up verbs) is refused
 * with 405 and an Allow header before it reaches Next: TRACE would echo the request back (cross-site
 * tracing), and unknown methods on a page would be rendered as if they were GET.
 */
export const ALLOWED_METHODS = ['GET', 'HEAD', 'POST', 'PUT', 'PATCH', 'DELETE', 'OPTIONS'];

/** Answers 405 and returns true when the request's method is not one the app serves. */
export function refuseUnknownMethod(req, res) {
  if (ALLOWED_METHODS.includes(req.method ?? '')) return false;
  const body = JSON.stringify({
    code: 'bad_request:method',
    message: `The method ${String(req.method).slice(0, 20)} is not served here; use one of ${ALLOWED_METHODS.join(', ')}.`,
  });
  res.writeHead(405, {
    Allow: ALLOWED_METHODS.join(', '),
    'Content-Type': 'application/json',
    'Content-Length': Buffer.byteLength(body),
    'Cache-Control': 'no-store',
  });
  res.end(req.method === 'HEAD' ? undefined : body);
  return true;
}

/** The session secret of lib/env.ts's default: public in this repository, so never for production. */
export const DEVELOPMENT_SECRET = 'rhobook-development-secret-change-me';

/**
 * Why a production start must not go on with this environment's session secret, or null when it
 * may: anyone who knows the secret can forge a session cookie for any account.
 */
export function productionSecretProblem(env) {
  if (env.NODE_ENV !== 'production') return null;
  const secret = env.NEXTAUTH_SECRET;
  if (!secret) return 'NEXTAUTH_SECRET is not set. Set it to a long random value (for example `openssl rand -hex 32`) before starting in production.';
  if (secret === DEVELOPMENT_SECRET) {
    return 'NEXTAUTH_SECRET is the public development default, with which anyone could forge a session. Set it to a long random value (for example `openssl rand -hex 32`).';
  }
  if (secret.length < 32) return `NEXTAUTH_SECRET has ${secret.length} characters; use at least 32 random ones in production.`;
  return null;
}
