/**
 * The browser's API client against answers shaped like the route handlers' (errorResponse and
 * Response.json), with fetch stubbed: what comes back, and which AppError is thrown.
 */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { apiGet, apiSend } from '@/lib/client/api';
import { AppError } from '@/lib/errors';

function answer(res: Response | Error) {
  const calls: { url: string; init: RequestInit }[] = [];
  vi.stubGlobal('fetch', async (url: string, init: RequestInit) => {
    calls.push({ url, init });
    if (res instanceof Error) throw res;
    return res;
  });
  return calls;
}

afterEach(() => {
  vi.unstubAllGlobals();
});

describe('the API client', () => {
  it('returns the JSON of a success and sends JSON with its content type', async () => {
    const calls = answer(Response.json({ id: 7, status: 'queued' }, { status: 202 }));
    expect(await apiSend('POST', '/api/fits', { datasetId: 1 })).toEqual({ id: 7, status: 'queued' });
    expect(calls[0].init.method).toBe('POST');
    expect(new Headers(calls[0].init.headers).get('content-type')).toBe('application/json');
    expect(calls[0].init.body).toBe('{"datasetId":1}');
  });

  it('answers undefined for 204 No Content', async () => {
    answer(new Response(null, { status: 204 }));
    expect(await apiSend('DELETE', '/api/datasets/3')).toBeUndefined();
  });

  it("throws the server's AppError: code, sentence and details", async () => {
    const server = new AppError('conflict:dataset-in-use', 'Dataset 3 cannot be deleted: a fit refers to it.', { datasetId: 3 });
    answer(server.toResponse());
    const err = await apiSend('DELETE', '/api/datasets/3').catch((e: unknown) => e);
    expect(err).toBeInstanceOf(AppError);
    expect(err).toMatchObject({ code: 'conflict:dataset-in-use', message: server.message, details: { datasetId: 3 } });
    expect((err as AppError).status).toBe(409);
  });

  it('turns an answer that is not JSON, and a lost connection, into sentences', async () => {
    answer(new Response('<html>Bad gateway</html>', { status: 502 }));
    const gateway = await apiGet('/api/datasets').catch((e: unknown) => e);
    expect(gateway).toMatchObject({ code: 'internal:unknown', message: 'The server gave an unexpected answer.' });
    answer(new Response('<html>login</html>', { status: 200 }));
    await expect(apiGet('/api/datasets')).rejects.toMatchObject({ message: 'The server gave an unexpected answer.' });
    answer(new TypeError('Failed to fetch'));
    const offline = await apiGet('/api/datasets').catch((e: unknown) => e);
    expect(offline).toBeInstanceOf(AppError);
    expect((offline as AppError).status).toBe(503);
    expect((offline as AppError).message).toMatch(/could not be reached/);
  });
});
