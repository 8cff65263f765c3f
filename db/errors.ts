/**
 * MariaDB error numbers that the data access layer turns into answers for people (a duplicate
 * upload, a dataset still in use, a lost race, a database that does not answer). mysql2 puts
 * `errno` and `code` on its error; drizzle may wrap it in `cause`.
 */
function causes(err: unknown): Array<{ errno?: unknown; code?: unknown; message?: unknown }> {
  const out: Array<{ errno?: unknown; code?: unknown; message?: unknown }> = [];
  let e: unknown = err;
  for (let i = 0; i < 5 && e && typeof e === 'object'; i++) {
    out.push(e as { errno?: unknown; code?: unknown; message?: unknown });
    e = (e as { cause?: unknown }).cause;
  }
  return out;
}

function isMysqlError(err: unknown, errno: number): boolean {
  return causes(err).some((e) => e.errno === errno);
}

/** MariaDB errno 1062: duplicate entry for a unique key. */
export const isDuplicateKeyError = (err: unknown) => isMysqlError(err, 1062);
/** MariaDB errno 1451: cannot delete or update a parent row, a foreign key constraint fails. */
export const isForeignKeyRestrictError = (err: unknown) => isMysqlError(err, 1451);
/**
 * MariaDB errno 1213 (deadlock found, the transaction was rolled back) and 1205 (lock wait timeout):
 * two transactions wanted the same rows; running the loser again is the documented remedy
 * (MariaDB Knowledge Base, "InnoDB Lock Modes"; MySQL Reference Manual 17.7.5 "Deadlocks in InnoDB").
 */
export const isRetryableLockError = (err: unknown) => isMysqlError(err, 1213) || isMysqlError(err, 1205);

// Client-side codes of mysql2 and Node when the server is not there or went away, and the server's
// own numbers for a shutdown, a killed connection and too many connections.
const CONNECTION_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EPIPE',
  'EHOSTUNREACH',
  'ENOTFOUND',
  'PROTOCOL_CONNECTION_LOST',
  'PROTOCOL_SEQUENCE_TIMEOUT',
  'ER_SERVER_SHUTDOWN',
  'ER_CON_COUNT_ERROR',
  'ER_CONNECTION_KILLED',
]);
// 1040 too many connections, 1053 server shutdown, 1927 connection killed, 2002/2003 cannot
// connect, 2006 server has gone away, 2013 lost connection during query, 4031 disconnected for inactivity.
const CONNECTION_ERRNOS = new Set([1040, 1053, 1927, 2002, 2003, 2006, 2013, 4031]);

/** True when the error says the database cannot be reached (down, restarting, unreachable, full). */
export function isConnectionError(err: unknown): boolean {
  return causes(err).some(
    (e) =>
      (typeof e.code === 'string' && CONNECTION_CODES.has(e.code)) ||
      (typeof e.errno === 'number' && CONNECTION_ERRNOS.has(e.errno)) ||
      // mysql2 reuses a connection the server closed and says so without a code.
      (typeof e.message === 'string' && /connection is in closed state|Pool is closed/i.test(e.message)),
  );
}
