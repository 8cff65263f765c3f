/**
 * The one error class of the application. Codes are stable strings of the form `kind:detail`; the
 * kind decides the HTTP status. Messages are plain sentences a user can act on; `details` carries
 * structured data (for example the findings of a rejected upload).
 */
import type { z } from 'zod';
import { isConnectionError } from '@/db/errors';

export type ErrorKind =
  | 'bad_request'
  | 'invalid'
  | 'unauthorized'
  | 'forbidden'
  | 'not_found'
  | 'conflict'
  | 'rate_limited'
  | 'too_large'
  | 'unsupported_media'
  | 'unavailable'
  | 'internal';

export type ErrorCode = `${ErrorKind}:${string}`;

const statusByKind: Record<ErrorKind, number> = {
  bad_request: 400,
  invalid: 422,
  unauthorized: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  rate_limited: 429,
  too_large: 413,
  unsupported_media: 415,
  unavailable: 503,
  internal: 500,
};

export class AppError extends Error {
  readonly code: ErrorCode;
  readonly details?: Record<string, unknown>;

  constructor(code: ErrorCode, message: string, details?: Record<string, unknown>) {
    super(message);
    this.name = 'AppError';
    this.code = code;
    this.details = details;
  }

  get kind(): ErrorKind {
    return this.code.split(':')[0] as ErrorKind;
  }

  get status(): number {
    return statusByKind[this.kind] ?? 500;
  }

  toJSON() {
    return { code: this.code, message: this.message, ...(this.details ?? {}) };
  }

  toResponse(): Response {
    return Response.json(this.toJSON(), { status: this.status });
  }

  /** Rebuilds the error from a JSON answer of the API (used by the client fetcher). */
  static fromJSON(body: unknown, fallbackStatus = 500): AppError {
    if (body && typeof body === 'object' && 'code' in body && 'message' in body) {
      const { code, message, ...rest } = body as { code: string; message: string };
      if (/^[a-z_]+:/.test(code)) return new AppError(code as ErrorCode, message, rest);
    }
    return new AppError(fallbackStatus >= 500 ? 'internal:unknown' : 'bad_request:unknown', 'The server gave an unexpected answer.');
  }
}

/** The sentence for a request that failed because the database did not answer (503). */
export const DATABASE_UNAVAILABLE =
  'Rhobook cannot reach its database just now, so nothing was read or changed. It usually comes back within seconds: try again shortly, and tell an administrator if it lasts.';

/**
 * The AppError for a failure that is not the request's fault and has a known cause: the database
 * not answering (down, restarting, out of connections) is 503 `unavailable:database`. Null otherwise.
 */
export function knownFailure(err: unknown): AppError | null {
  if (isConnectionError(err)) return new AppError('unavailable:database', DATABASE_UNAVAILABLE);
  return null;
}

/**
 * Turns any thrown value into a Response. AppErrors keep their status and sentence; a database that
 * does not answer is 503 with a sentence (and Retry-After); anything else is logged with detail and
 * shown to the user as a plain sentence.
 */
export function errorResponse(err: unknown): Response {
  if (err instanceof AppError) return err.toResponse();
  const known = knownFailure(err);
  if (known) {
    console.error(`[rhobook] ${known.code}: ${err instanceof Error ? err.message : String(err)}`);
    return Response.json(known.toJSON(), { status: known.status, headers: { 'Retry-After': '5' } });
  }
  console.error('[rhobook] unexpected error', err);
  return new AppError('internal:unexpected', 'Something went wrong on the server. The error has been logged.').toResponse();
}

/**
 * Parses `input` with `schema` or throws an AppError with `code`. The message is the first issue's
 * sentence; `details.field` names its field (dotted path, for forms to mark) and
 * `details.fieldErrors` maps every failing field to its first sentence, so a form can show each
 * error beside its field. Paths are for the form, never for the sentence shown to a person.
 */
export function parseOrThrow<S extends z.ZodType>(
  schema: S,
  input: unknown,
  code: ErrorCode,
  fallback = 'The request is not valid.',
): z.output<S> {
  const parsed = schema.safeParse(input);
  if (parsed.success) return parsed.data;
  const fieldErrors: Record<string, string> = {};
  for (const issue of parsed.error.issues) {
    const key = issue.path.map(String).join('.');
    if (!(key in fieldErrors)) fieldErrors[key] = issue.message;
  }
  const first = parsed.error.issues[0];
  const field = first && first.path.length > 0 ? first.path.map(String).join('.') : null;
  throw new AppError(code, first?.message ?? fallback, { field, fieldErrors });
}

/**
 * What a server action returns when it fails (see components/form-state.ts): an AppError's
 * sentence with the field it names and every field's sentence; anything else is logged with
 * detail and told as a plain sentence, as errorResponse does for route handlers.
 */
export function failureState(err: unknown): { ok: false; message: string; field: string | null; fieldErrors: Record<string, string> } {
  if (err instanceof AppError) {
    const field = typeof err.details?.field === 'string' ? err.details.field : null;
    const fieldErrors = (err.details?.fieldErrors as Record<string, string> | undefined) ?? (field ? { [field]: err.message } : {});
    return { ok: false, message: err.message, field, fieldErrors };
  }
  const known = knownFailure(err);
  if (known) return { ok: false, message: known.message, field: null, fieldErrors: {} };
  console.error('[rhobook] unexpected error in a server action', err);
  return { ok: false, message: 'Something went wrong on the server. The error has been logged.', field: null, fieldErrors: {} };
}
