import 'server-only';
export { getDb, getPool, closeDb, type Db } from './connection';
