import { describe, expect, it } from 'vitest';
import { isConnectionError, isRetryableLockError } from '@/db/errors';
import { transactionWithRetry } from '@/db/transaction';
import { AppError, errorResponse, failureState } from '@/lib/errors';
import type { Db } from '@/db/connection';

// The shapes of mysql2's errors as it raises them (errno and code from the MariaDB error reference),
// wrapped by drizzle in `cause` as it does for a failed query.
const mysqlError = (errno: number | undefined, code: string, message = code) => Object.assign(new Error(message), { errno, code });
const wrapped = (cause: Error) => Object.assign(new Error('Failed query: select 1'), { cause });

describe('MariaDB errors', () => {
  it('connection failures are recognised, wrapped or not; query errors are not', () => {
    expect(isConnectionError(mysqlError(undefined, 'ECONNREFUSED'))).toBe(true);
    expect(isConnectionError(wrapped(mysqlError(undefined, 'PROTOCOL_CONNECTION_LOST')))).toBe(true);
    expect(isConnectionError(wrapped(mysqlError(1053, 'ER_SERVER_SHUTDOWN')))).toBe(true);
    expect(isConnectionError(new Error("Can't add new command when connection is in closed state"))).toBe(true);
    expect(isConnectionError(wrapped(mysqlError(1062, 'ER_DUP_ENTRY')))).toBe(false);
    expect(isConnectionError(new Error('something else'))).toBe(false);
  });

  it('a database that does not answer is 503 with a sentence for routes and server actions; other errors stay 500', async () => {
    const res = errorResponse(wrapped(mysqlError(undefined, 'ECONNREFUSED')));
    expect(res.status).toBe(503);
    expect(res.headers.get('retry-after')).toBe('5');
    expect(((await res.json()) as { code: string }).code).toBe('unavailable:database');
    expect(failureState(mysqlError(2013, 'PROTOCOL_CONNECTION_LOST')).message).toMatch(/^Rhobook cannot reach its database just now/);
    expect(errorResponse(new Error('bug')).status).toBe(500);
    expect(errorResponse(new AppError('conflict:x', 'Taken.')).status).toBe(409);
  });

  it('deadlocks and lock wait timeouts are retried from the start; other errors and the last attempt are thrown', async () => {
    expect(isRetryableLockError(wrapped(mysqlError(1213, 'ER_LOCK_DEADLOCK')))).toBe(true);
    expect(isRetryableLockError(mysqlError(1205, 'ER_LOCK_WAIT_TIMEOUT'))).toBe(true);
    let calls = 0;
    const db = {
      transaction: async (work: (tx: unknown) => Promise<unknown>) => {
        calls += 1;
        if (calls < 3) throw wrapped(mysqlError(1213, 'ER_LOCK_DEADLOCK'));
        return work({});
      },
    } as unknown as Db;
    expect(await transactionWithRetry(db, async () => 'done')).toBe('done');
    expect(calls).toBe(3);
    calls = 0;
    const always = { transaction: async () => { calls += 1; throw mysqlError(1213, 'ER_LOCK_DEADLOCK'); } } as unknown as Db;
    await expect(transactionWithRetry(always, async () => 1, { attempts: 4 })).rejects.toMatchObject({ errno: 1213 });
    expect(calls).toBe(4);
    calls = 0;
    const other = { transaction: async () => { calls += 1; throw mysqlError(1062, 'ER_DUP_ENTRY'); } } as unknown as Db;
    await expect(transactionWithRetry(other, async () => 1)).rejects.toMatchObject({ errno: 1062 });
    expect(calls).toBe(1);
  });
});
