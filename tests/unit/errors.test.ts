import { z } from 'zod';
import { describe, expect, it, vi } from 'vitest';
import { AppError, failureState, parseOrThrow } from '@/lib/errors';

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

describe('failureState (what a server action answers on failure)', () => {
  it("carries an AppError's sentence and every field's sentence from parseOrThrow", () => {
    const schema = z.object({ email: z.string().min(3, 'Give an e-mail.'), name: z.string().min(1, 'Give a name.') });
    let state;
    try {
      parseOrThrow(schema, { email: '', name: '' }, 'invalid:user');
    } catch (err) {
      state = failureState(err);
    }
    expect(state).toEqual({ ok: false, message: 'Give an e-mail.', field: 'email', fieldErrors: { email: 'Give an e-mail.', name: 'Give a name.' } });
  });

  it('marks the one field an AppError names when it has no field list', () => {
    expect(failureState(new AppError('invalid:segment', 'The owner must be active.', { field: 'ownerId' }))).toEqual({
      ok: false,
      message: 'The owner must be active.',
      field: 'ownerId',
      fieldErrors: { ownerId: 'The owner must be active.' },
    });
  });

  it('logs anything else and answers a plain sentence without its detail', () => {
    const log = vi.spyOn(console, 'error').mockImplementation(() => undefined);
    const state = failureState(new Error('ECONNREFUSED 127.0.0.1:3306'));
    expect(log).toHaveBeenCalledTimes(1);
    log.mockRestore();
    expect(state.ok).toBe(false);
    expect(state.message).toBe('Something went wrong on the server. The error has been logged.');
    expect(state.message).not.toContain('ECONNREFUSED');
  });
});
