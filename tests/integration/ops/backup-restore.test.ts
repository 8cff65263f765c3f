/**
 * npm run db:backup and npm run db:restore round-trip the demo database: every table's CHECKSUM
 * TABLE and row count are equal after the restore into an empty database, the migration history
 * came along, and the append-only triggers still refuse updates and deletes. A changed file, a
 * database that is not empty, and a file without its manifest are refused with a sentence.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import mysql from 'mysql2/promise';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';

const root = path.resolve(import.meta.dirname, '../../..');
const SOURCE = 'rhobook_backup_source_test';
const TARGET = 'rhobook_backup_target_test';
const out = mkdtempSync(path.join(os.tmpdir(), 'rhobook-backups-'));
let conn: mysql.Connection;

function script(args: string[], database: string) {
  const r = spawnSync(process.execPath, ['db/backup.mjs', ...args], { cwd: root, env: { ...process.env, DB_NAME: database }, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

async function checksums(database: string) {
  const [tables] = await conn.query<mysql.RowDataPacket[]>(
    `SELECT table_name AS t FROM information_schema.tables WHERE table_schema = ? AND table_type = 'BASE TABLE' ORDER BY table_name`,
    [database],
  );
  const result: Record<string, { checksum: string; rows: number }> = {};
  for (const { t } of tables) {
    const [[c]] = await conn.query<mysql.RowDataPacket[]>(`CHECKSUM TABLE \`${database}\`.\`${t}\``);
    const [[n]] = await conn.query<mysql.RowDataPacket[]>(`SELECT COUNT(*) AS n FROM \`${database}\`.\`${t}\``);
    result[t] = { checksum: String(c.Checksum), rows: Number(n.n) };
  }
  return result;
}

beforeAll(async () => {
  // The demo organisation, seeded into a database of this test's own.
  vi.stubEnv('DB_NAME', SOURCE);
  vi.resetModules();
  const { resetTestDatabase } = await import('../../support/reset-database');
  await resetTestDatabase({ seed: true });
  const { closeDb } = await import('@/db/connection');
  await closeDb();
  const { env } = await import('@/lib/env');
  const e = env();
  conn = await mysql.createConnection({ host: e.DB_HOST, port: e.DB_PORT, user: e.DB_USER, password: e.DB_PASSWORD });
  await conn.query(`DROP DATABASE IF EXISTS \`${TARGET}\``);
}, 300_000);
afterAll(async () => {
  await conn.query(`DROP DATABASE IF EXISTS \`${TARGET}\``);
  await conn.query(`DROP DATABASE IF EXISTS \`${SOURCE}\``);
  await conn.end();
  vi.unstubAllEnvs();
  rmSync(out, { recursive: true, force: true });
});

describe('backup and restore', () => {
  it('round-trips the demo database: equal table checksums and counts, the migrations, and triggers that still refuse changes', async () => {
    const b = script(['backup', '--out', out], SOURCE);
    expect(b.code, b.err).toBe(0);
    const file = /wrote (\S+\.sql\.gz)/.exec(b.out)![1];
    const manifestFile = path.resolve(root, file).replace(/\.sql\.gz$/, '.manifest.json');
    const manifest = JSON.parse(readFileSync(manifestFile, 'utf8'));
    expect(manifest).toMatchObject({ format: 'rhobook-backup/1', database: SOURCE });
    expect(manifest.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(Date.now() - Date.parse(manifest.createdAt)).toBeLessThan(600_000);
    const journal = JSON.parse(readFileSync(path.join(root, 'db/migrations/meta/_journal.json'), 'utf8'));
    expect(manifest.schema).toEqual({ migrations: journal.entries.length, lastMigration: journal.entries.at(-1).tag });
    // every append-only table's two triggers (db/migrations: 0001, 0004, 0009, 0012, 0019), and the
    // change stamp's three on each watched table (0021, lib/dal/change-stamp.ts)
    const { WATCHED_TABLES } = await import('@/lib/dal/change-stamp');
    const stampTriggers = WATCHED_TABLES.flatMap((t) => ['ad', 'ai', 'au'].map((s) => `${t}_consumer_change_${s}`));
    expect([...manifest.triggers].sort()).toEqual([
      'admin_audit_no_delete',
      'admin_audit_no_update',
      'assumption_audit_no_delete',
      'assumption_audit_no_update',
      'factor_matrix_audit_no_delete',
      'factor_matrix_audit_no_update',
      'finding_events_no_delete',
      'finding_events_no_update',
      'overdue_policy_changes_no_delete',
      'overdue_policy_changes_no_update',
      ...stampTriggers,
    ].sort());
    expect(manifest.note).toMatch(/session secret .* is not in this dump/);

    const r = script(['restore', path.resolve(root, file), '--database', TARGET], SOURCE);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toMatch(new RegExp(`restored and checked: \\d+ tables, ${10 + stampTriggers.length} triggers`));

    const before = await checksums(SOURCE);
    const after = await checksums(TARGET);
    expect(Object.keys(before).length).toBeGreaterThan(15);
    // The demo's data is there: users, datasets with their rows, a fit, the library and its audit trail.
    for (const t of ['users', 'datasets', 'cohort_rows', 'fit_runs', 'assumption_versions', 'assumption_audit']) expect(before[t].rows, t).toBeGreaterThan(0);
    // The change stamp's epoch is new after a restore (a web process's cached answers from before
    // never match again); every other table, and that one's pruned count, is as it was.
    const epochOf = async (db: string) => (await conn.query<mysql.RowDataPacket[]>(`SELECT epoch, pruned FROM \`${db}\`.consumer_change_epoch`))[0][0];
    const [e0, e1] = [await epochOf(SOURCE), await epochOf(TARGET)];
    expect(e1.epoch).not.toBe(e0.epoch);
    expect(e1.pruned).toBe(e0.pruned);
    const { consumer_change_epoch: _b, ...beforeRest } = before;
    const { consumer_change_epoch: _a, ...afterRest } = after;
    expect(afterRest).toEqual(beforeRest);
    expect(_a.rows).toBe(1);

    // The demo writes no administration log; a row appended now (appending is allowed) gives the trigger a row to guard.
    expect(before.assumption_audit.rows).toBeGreaterThan(0);
    await conn.query(`INSERT INTO \`${TARGET}\`.admin_audit (actor_email, action, target_type, target_id) VALUES ('admin@fenmoor.example', 'test', 'user', '1')`);
    for (const t of ['admin_audit', 'assumption_audit']) {
      await expect(conn.query(`UPDATE \`${TARGET}\`.\`${t}\` SET id = id`)).rejects.toThrow(`${t} is append-only: rows cannot be updated`);
      await expect(conn.query(`DELETE FROM \`${TARGET}\`.\`${t}\``)).rejects.toThrow(`${t} is append-only: rows cannot be deleted`);
    }

    // Into a database that is not empty: refused, nothing touched.
    const again = script(['restore', path.resolve(root, file), '--database', TARGET], SOURCE);
    expect(again.code).toBe(1);
    expect(again.err).toMatch(new RegExp(`The database ${TARGET} is not empty \\(\\d+ tables`));
    expect((await checksums(TARGET)).cohort_rows).toEqual(before.cohort_rows);

    // A file changed after the backup: refused before anything is loaded.
    const bytes = readFileSync(path.resolve(root, file));
    bytes[bytes.length - 20] ^= 0xff;
    const tampered = path.join(out, 'tampered.sql.gz');
    writeFileSync(tampered, bytes);
    writeFileSync(tampered.replace(/\.sql\.gz$/, '.manifest.json'), JSON.stringify(manifest));
    await conn.query(`DROP DATABASE \`${TARGET}\``);
    const bad = script(['restore', tampered, '--database', TARGET], SOURCE);
    expect(bad.code).toBe(1);
    expect(bad.err).toMatch(/tampered\.sql\.gz is not the file its manifest describes \(SHA-256 [0-9a-f]{16}\.\.\. instead of [0-9a-f]{16}\.\.\.\)/);

    // A dump without its manifest.
    const lone = path.join(out, 'lone.sql.gz');
    writeFileSync(lone, bytes);
    expect(script(['restore', lone, '--database', TARGET], SOURCE).err).toMatch(/There is no manifest beside/);
  }, 300_000);
});
