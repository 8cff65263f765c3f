import 'server-only';
export { getDb, getPool, closeDb, type Db, type Tx, type DbOrTx } from './connection';
