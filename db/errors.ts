/**
 * MariaDB error numbers that the data access layer turns into answers for people (a duplicate
 * upload, a dataset still in use). mysql2 puts `errno` on its error; drizzle may wrap it in `cause`.
 */
function isMysqlError(err: unknown, errno: number): boolean {
  let e: unknown = err;
  for (let i = 0; i < 4 && e && typeof e === 'object'; i++) {
    if ((e as { errno?: number }).errno === errno) return true;
    e = (e as { cause?: unknown }).cause;
  }
  return false;
}

/** MariaDB errno 1062: duplicate entry for a unique key. */
export const isDuplicateKeyError = (err: unknown) => isMysqlError(err, 1062);
/** MariaDB errno 1451: cannot delete or update a parent row, a foreign key constraint fails. */
export const isForeignKeyRestrictError = (err: unknown) => isMysqlError(err, 1451);
