import { describe, expect, it } from 'vitest';
import { AppError } from '@/lib/errors';
import { datasetIdFrom, routeId } from '@/lib/http/route-params';

const ctx = (id: string) => ({ params: Promise.resolve({ id }) });

describe('routeId', () => {
  it('reads a positive whole-number id', async () => {
    expect(await routeId(ctx('42'), 'id', 'not_found:fit', 'There is no such fit run.')).toBe(42);
    expect(await datasetIdFrom(ctx('7'))).toBe(7);
  });

  it('answers any other shape as the missing resource (404 with its sentence)', async () => {
    for (const bad of ['', 'x', '-1', '0', '1.5', '1e3x', '9007199254740993']) {
      const err = await routeId(ctx(bad), 'id', 'not_found:fit', 'There is no such fit run.').catch((e: unknown) => e);
      expect(err, bad).toBeInstanceOf(AppError);
      expect((err as AppError).status).toBe(404);
      expect((err as AppError).message).toBe('There is no such fit run.');
    }
  });
});
