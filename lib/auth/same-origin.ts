import 'server-only';
import { headers as requestHeaders } from 'next/headers';
import { env } from '@/lib/env';
import { AppError } from '@/lib/errors';

/**
 * Protection against cross-origin state changes (cross-site request forgery), one helper for every
 * state-changing route handler and server action. A browser tells the server where a request comes
 * from: `Origin` on every POST, PATCH and DELETE, and `Sec-Fetch-Site` (Fetch Metadata) in current
 * browsers. The rule, as in Go's net/http CrossOriginProtection (Go 1.25):
 *
 * - `Origin` present: it must be the app's own origin exactly (scheme, host and port), so another
 *   port of the same host is another origin;
 * - otherwise `Sec-Fetch-Site` present: it must be `same-origin` (or `none`, a person's own action);
 * - neither: not a browser (a script, curl, a test), which cannot ride on a person's session
 *   cookie, so the request passes this check (it still needs a session or a token).
 *
 * The app's own origin is that of NEXTAUTH_URL; without it (a development server) the origin the
 * request was addressed to. Route handlers also insist on the content type they parse: a JSON route
 * refuses anything but `application/json` with 415, so a form posted as `text/plain` from elsewhere
 * never reaches the parser.
 */
export function appOrigin(fallbackUrl?: string): string | null {
  const configured = env().NEXTAUTH_URL;
  if (configured) return new URL(configured).origin;
  if (!fallbackUrl) return null;
  try {
    return new URL(fallbackUrl).origin;
  } catch {
    return null;
  }
}

/** The reason a request is cross-origin, or null when it may change state. */
export function crossOriginReason(h: Headers, ownOrigin: string | null): string | null {
  const origin = h.get('origin');
  if (origin !== null) {
    if (ownOrigin !== null && origin === ownOrigin) return null;
    return `it comes from ${origin === 'null' ? 'an opaque origin' : origin}, not from ${ownOrigin ?? 'this application'}`;
  }
  const site = h.get('sec-fetch-site');
  if (site === null || site === 'same-origin' || site === 'none') return null;
  return `the browser marks it as ${site}`;
}

function refuse(reason: string): AppError {
  return new AppError(
    'forbidden:cross-origin',
    `This change was refused because ${reason}. Make it from Rhobook's own pages (or from a script with an API token).`,
  );
}

/** Throws `forbidden:cross-origin` (403) unless the request may change state (see the file comment). */
export function assertSameOrigin(req: Request): void {
  const reason = crossOriginReason(req.headers, appOrigin(req.url));
  if (reason) throw refuse(reason);
}

/** The same check for a server action (the request's headers from next/headers). */
export async function assertSameOriginAction(): Promise<void> {
  const h = await requestHeaders();
  const host = h.get('host');
  const reason = crossOriginReason(new Headers(h), appOrigin(host ? `http://${host}` : undefined));
  if (reason) throw refuse(reason);
}

function mediaType(req: Request): string {
  return (req.headers.get('content-type') ?? '').split(';')[0].trim().toLowerCase();
}

function tooLarge(limit: number): AppError {
  return new AppError(
    'too_large:json',
    `The request body is larger than ${limit.toLocaleString('en-GB')} bytes, the most a JSON request may carry (JSON_BODY_MAX_BYTES). Send less, or upload data files through the upload form.`,
  );
}

/**
 * The body as text, refused with 413 as soon as it passes `limit` bytes: a declared Content-Length
 * above it is refused before reading, and a body without one (chunked) is counted as it streams and
 * cut off there, so a large body is never held in memory.
 */
async function readBodyText(req: Request, limit: number): Promise<string> {
  const declared = Number(req.headers.get('content-length') ?? NaN);
  if (Number.isFinite(declared) && declared > limit) throw tooLarge(limit);
  if (!req.body) return '';
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > limit) {
      await reader.cancel().catch(() => undefined);
      throw tooLarge(limit);
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks).toString('utf8');
}

/**
 * For a state-changing JSON route: checks the origin, requires `application/json` (415 otherwise)
 * and parses the body (400 when it is not JSON, 413 when it is larger than JSON_BODY_MAX_BYTES). Returns the parsed value for the route's schema.
 */
export async function readJsonBody(req: Request): Promise<unknown> {
  assertSameOrigin(req);
  if (mediaType(req) !== 'application/json') {
    throw new AppError(
      'unsupported_media:json',
      `Send the request body as JSON with the header Content-Type: application/json (got ${mediaType(req) || 'no content type'}).`,
    );
  }
  const text = await readBodyText(req, env().JSON_BODY_MAX_BYTES);
  try {
    return JSON.parse(text) as unknown;
  } catch {
    throw new AppError('bad_request:json', 'The request body is not valid JSON.');
  }
}

/** For the upload route: checks the origin and requires multipart/form-data (415 otherwise). */
export function assertMultipartRequest(req: Request): void {
  assertSameOrigin(req);
  if (mediaType(req) !== 'multipart/form-data') {
    throw new AppError(
      'unsupported_media:multipart',
      `Send the upload as multipart/form-data with the file in a part named "file" (got ${mediaType(req) || 'no content type'}).`,
    );
  }
}
