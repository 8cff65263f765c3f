import { z } from 'zod';
import { describe, expect, it } from 'vitest';
import { AppError, parseOrThrow } from '@/lib/errors';

describe('AppError', () => {
  it('maps the kind of its code to an HTTP status', () => {
    expect(new AppError('forbidden:users:manage', 'x').status).toBe(403);
    expect(new AppError('invalid:upload', 'x').status).toBe(422);
    expect(new AppError('conflict:last-admin', 'x').status).toBe(409);
    expect(new AppError('not_found:user', 'x').status).toBe(404);
    expect(new AppError('unauthorized:session', 'x').status).toBe(401);
  });

  it('round-trips through its JSON answer, details included', async () => {
    const e = new AppError('invalid:upload', 'The file has errors.', { issues: [{ row: 2 }] });
    const res = e.toResponse();
    expect(res.status).toBe(422);
    const back = AppError.fromJSON(await res.json(), res.status);
    expect(back.code).toBe('invalid:upload');
    expect(back.message).toBe('The file has errors.');
    expect(back.details).toEqual({ issues: [{ row: 2 }] });
  });

  it('turns an unexpected body into a plain sentence, not a crash', () => {
    const e = AppError.fromJSON('<html>', 502);
    expect(e.code).toBe('internal:unknown');
    expect(e.message).toMatch(/unexpected/);
  });
});

describe('parseOrThrow', () => {
  const schema = z.object({ name: z.string().min(1, 'Give a name.'), margins: z.object({ rationale: z.string().min(1, 'Say why.') }) });

  it('returns the parsed value', () => {
    expect(parseOrThrow(schema, { name: 'a', margins: { rationale: 'b' } }, 'invalid:thing')).toEqual({ name: 'a', margins: { rationale: 'b' } });
  });

  it('throws the given code with the first sentence and every field error', () => {
    let caught: unknown;
    try {
      parseOrThrow(schema, { name: '', margins: { rationale: '' } }, 'invalid:thing');
    } catch (err) {
      caught = err;
    }
    expect(caught).toBeInstanceOf(AppError);
    const e = caught as AppError;
    expect(e.code).toBe('invalid:thing');
    expect(e.status).toBe(422);
    expect(e.message).toBe('Give a name.');
    expect(e.details).toEqual({ field: 'name', fieldErrors: { name: 'Give a name.', 'margins.rationale': 'Say why.' } });
  });
});
