#!/usr/bin/env node
// Backup and restore of Rhobook's database with MariaDB's own tools (mariadb-dump, mariadb), as
// `npm run db:backup` and `npm run db:restore FILE`. Plain Node, no dependencies.
//
//   node db/backup.mjs backup [--out DIR]                 a dump of DB_NAME and its manifest
//   node db/backup.mjs restore FILE [--database NAME]     into an empty database (default DB_NAME), then checked
//
// The dump is consistent without stopping the app: mariadb-dump --single-transaction reads every
// InnoDB table in one REPEATABLE READ snapshot (MariaDB Knowledge Base, "mariadb-dump"). It holds
// the schema, the rows, the append-only triggers and the migration history (__drizzle_migrations),
// gzip-compressed, beside a manifest: when, which database, schema version, the dump's SHA-256
// and byte size. A restore refuses a file whose SHA-256 differs from its manifest, a database that
// is not empty, and a dump newer than this checkout's migrations; after loading it checks the
// migration count and the tables and triggers against the manifest.
//
// It connects as the application (DB_HOST, DB_PORT, DB_USER, DB_PASSWORD, DB_NAME), so it works
// against the local instance and against a database elsewhere alike. The session secret in
// .data/nextauth-secret is not in the database and so not in the dump: keep it (or NEXTAUTH_SECRET)
// apart, or everyone signs in again after a restore to another machine.
import { spawn, execFileSync } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import { fileURLToPath } from 'node:url';
import zlib from 'node:zlib';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const settings = {
  host: process.env.DB_HOST ?? '127.0.0.1',
  port: Number(process.env.DB_PORT ?? 3307),
  user: process.env.DB_USER ?? 'rhobook',
  password: process.env.DB_PASSWORD ?? 'rhobook-local',
  database: process.env.DB_NAME ?? 'rhobook',
};
// The two append-only tables whose triggers refuse UPDATE and DELETE (db/migrations).
const APPEND_ONLY = ['admin_audit', 'assumption_audit'];

function say(msg) {
  process.stdout.write(`[backup] ${msg}\n`);
}

function which(cmd) {
  for (const d of (process.env.PATH ?? '').split(':').concat(['/usr/bin', '/usr/sbin'])) {
    const p = path.join(d, cmd);
    if (fs.existsSync(p)) return p;
  }
  throw new Error(`${cmd} is not installed: it comes with Debian's mariadb-client (npm start and npm run db:start install it).`);
}

/** A client options file readable only by us, so the password is on no command line. */
function withOptionsFile(fn) {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rhobook-backup-'));
  const file = path.join(dir, 'client.cnf');
  const quote = (s) => `"${String(s).replace(/\\/g, '\\\\').replace(/"/g, '\\"')}"`;
  fs.writeFileSync(file, `[client]\nhost=${settings.host}\nport=${settings.port}\nuser=${quote(settings.user)}\npassword=${quote(settings.password)}\nprotocol=TCP\ndefault-character-set=utf8mb4\n`, { mode: 0o600 });
  const cleanup = () => fs.rmSync(dir, { recursive: true, force: true });
  try {
    const r = fn(file);
    if (r && typeof r.then === 'function') return r.finally(cleanup);
    cleanup();
    return r;
  } catch (err) {
    cleanup();
    throw err;
  }
}

/** Runs one SQL text with the mariadb client and returns its tab-separated rows. */
function query(sql, database) {
  return withOptionsFile((cnf) => {
    const args = [`--defaults-extra-file=${cnf}`, '--batch', '--skip-column-names'];
    if (database) args.push(database);
    args.push('-e', sql);
    const out = execFileSync(which('mariadb'), args, { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'] });
    return out.split('\n').filter(Boolean).map((l) => l.split('\t'));
  });
}

const ident = (name) => {
  if (!/^[A-Za-z0-9_]+$/.test(name)) throw new Error(`"${name}" is not a database name (letters, digits and _ only).`);
  return `\`${name}\``;
};

function journalCount() {
  const journal = JSON.parse(fs.readFileSync(path.join(root, 'db', 'migrations', 'meta', '_journal.json'), 'utf8'));
  return journal.entries.map((e) => e.tag);
}

/** The schema version of a database: how many migrations it has applied, and the last one's name. */
function schemaVersion(database) {
  const [[n]] = query('SELECT COUNT(*) FROM __drizzle_migrations', database);
  const count = Number(n);
  const tags = journalCount();
  return { migrations: count, lastMigration: tags[count - 1] ?? null };
}

function tablesOf(database) {
  return query(`SELECT table_name FROM information_schema.tables WHERE table_schema = '${database}' AND table_type = 'BASE TABLE' ORDER BY table_name`).map((r) => r[0]);
}

function triggersOf(database) {
  return query(`SELECT trigger_name FROM information_schema.triggers WHERE trigger_schema = '${database}' ORDER BY trigger_name`).map((r) => r[0]);
}

async function sha256(file) {
  const h = crypto.createHash('sha256');
  await pipeline(fs.createReadStream(file), h);
  return h.digest('hex');
}

function stamp(d) {
  return d.toISOString().replace(/[-:]/g, '').replace(/\.\d+Z$/, 'Z');
}

export async function backup({ outDir = path.join(root, process.env.RHOBOOK_DATA_DIR ?? '.data', 'backups') } = {}) {
  const db = settings.database;
  ident(db);
  fs.mkdirSync(outDir, { recursive: true });
  const at = new Date();
  const base = path.join(outDir, `${db}-${stamp(at)}`);
  const file = `${base}.sql.gz`;
  const version = schemaVersion(db);
  const tables = tablesOf(db);
  const triggers = triggersOf(db);
  say(`dumping ${db} (${tables.length} tables, schema at migration ${version.migrations}) in one transaction...`);
  await withOptionsFile(async (cnf) => {
    const dump = spawn(
      which('mariadb-dump'),
      [`--defaults-extra-file=${cnf}`, '--single-transaction', '--quick', '--triggers', '--routines', '--events', '--hex-blob', '--no-tablespaces', '--skip-lock-tables', db],
      { stdio: ['ignore', 'pipe', 'pipe'] },
    );
    let err = '';
    dump.stderr.on('data', (b) => (err += b.toString()));
    const exit = new Promise((resolve) => dump.once('close', (code) => resolve(code)));
    await pipeline(dump.stdout, zlib.createGzip({ level: 6 }), fs.createWriteStream(file, { mode: 0o600 }));
    const code = await exit;
    if (code !== 0) {
      fs.rmSync(file, { force: true });
      throw new Error(`mariadb-dump failed (exit ${code}): ${err.trim()}`);
    }
  });
  const manifest = {
    format: 'rhobook-backup/1',
    createdAt: at.toISOString(),
    database: db,
    schema: version,
    tables,
    triggers,
    file: path.basename(file),
    bytes: fs.statSync(file).size,
    sha256: await sha256(file),
    tool: execFileSync(which('mariadb-dump'), ['--version'], { encoding: 'utf8' }).trim(),
    note: 'The session secret (.data/nextauth-secret or NEXTAUTH_SECRET) is not in this dump; keep it apart.',
  };
  const manifestFile = `${base}.manifest.json`;
  fs.writeFileSync(manifestFile, JSON.stringify(manifest, null, 2) + '\n', { mode: 0o600 });
  say(`wrote ${path.relative(process.cwd(), file)} (${manifest.bytes.toLocaleString('en-GB')} bytes, sha256 ${manifest.sha256.slice(0, 16)}...)`);
  say(`and its manifest ${path.relative(process.cwd(), manifestFile)}`);
  return { file, manifestFile, manifest };
}

function manifestFor(file) {
  const m = file.replace(/\.sql\.gz$/, '.manifest.json');
  if (m === file || !fs.existsSync(m)) throw new Error(`There is no manifest beside ${file} (expected ${m}); a restore needs it to check the file.`);
  return JSON.parse(fs.readFileSync(m, 'utf8'));
}

export async function restore(file, { database = settings.database } = {}) {
  ident(database);
  if (!fs.existsSync(file)) throw new Error(`There is no file ${file}.`);
  const manifest = manifestFor(file);
  const actual = await sha256(file);
  if (actual !== manifest.sha256) {
    throw new Error(`${path.basename(file)} is not the file its manifest describes (SHA-256 ${actual.slice(0, 16)}... instead of ${manifest.sha256.slice(0, 16)}...): it was changed or cut short. Nothing was restored.`);
  }
  const known = journalCount().length;
  if (manifest.schema.migrations > known) {
    throw new Error(`The backup's schema is at migration ${manifest.schema.migrations} (${manifest.schema.lastMigration}); this checkout knows only ${known}. Restore it with the version of Rhobook that made it. Nothing was restored.`);
  }
  query(`CREATE DATABASE IF NOT EXISTS ${ident(database)} CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  const present = tablesOf(database);
  if (present.length > 0) {
    throw new Error(`The database ${database} is not empty (${present.length} tables, ${present.slice(0, 3).join(', ')}...). Restore into an empty one: drop it first, or name another with --database. Nothing was restored.`);
  }
  say(`restoring ${path.basename(file)} (${manifest.database}, ${manifest.createdAt}) into ${database}...`);
  await withOptionsFile(async (cnf) => {
    const client = spawn(which('mariadb'), [`--defaults-extra-file=${cnf}`, database], { stdio: ['pipe', 'ignore', 'pipe'] });
    let err = '';
    client.stderr.on('data', (b) => (err += b.toString()));
    const exit = new Promise((resolve) => client.once('close', (code) => resolve(code)));
    await pipeline(fs.createReadStream(file), zlib.createGunzip(), client.stdin);
    const code = await exit;
    if (code !== 0) throw new Error(`Loading the dump failed (exit ${code}): ${err.trim()}. The database ${database} may hold part of it: drop it before trying again.`);
  });
  // Checks: the migration history, the tables and the append-only triggers are those of the manifest.
  const version = schemaVersion(database);
  const problems = [];
  if (version.migrations !== manifest.schema.migrations) problems.push(`migrations ${version.migrations} instead of ${manifest.schema.migrations}`);
  const tables = tablesOf(database);
  if (JSON.stringify(tables) !== JSON.stringify(manifest.tables)) problems.push(`tables [${tables.join(', ')}] instead of [${manifest.tables.join(', ')}]`);
  const triggers = triggersOf(database);
  if (JSON.stringify(triggers) !== JSON.stringify(manifest.triggers)) problems.push(`triggers [${triggers.join(', ')}] instead of [${manifest.triggers.join(', ')}]`);
  for (const t of APPEND_ONLY) {
    if (manifest.tables.includes(t) && !triggers.some((name) => name.startsWith(t))) problems.push(`no trigger guards ${t}`);
  }
  if (problems.length) throw new Error(`The restored database ${database} does not match the backup: ${problems.join('; ')}.`);
  // A new epoch for the consumer API's change stamp (lib/dal/change-stamp.ts): a web process that
  // cached an answer from this database before it was dropped must not serve it again.
  if (tables.includes('consumer_change_epoch')) query('UPDATE consumer_change_epoch SET epoch = UUID() WHERE id = 1', database);
  say(`restored and checked: ${tables.length} tables, ${triggers.length} triggers, schema at migration ${version.migrations} (${version.lastMigration})`);
  if (version.migrations < known) say(`this checkout has ${known - version.migrations} newer migration(s); npm start applies them`);
  return { database, tables, triggers, schema: version };
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url);
if (isMain) {
  const [cmd, ...rest] = process.argv.slice(2);
  const opt = (name) => {
    const i = rest.indexOf(name);
    return i >= 0 ? rest[i + 1] : undefined;
  };
  try {
    if (cmd === 'backup') await backup(opt('--out') ? { outDir: path.resolve(opt('--out')) } : {});
    else if (cmd === 'restore' && rest[0] && !rest[0].startsWith('--')) await restore(path.resolve(rest[0]), opt('--database') ? { database: opt('--database') } : {});
    else {
      process.stderr.write('usage: npm run db:backup [-- --out DIR]\n       npm run db:restore FILE [-- --database NAME]\n');
      process.exit(2);
    }
  } catch (err) {
    process.stderr.write(`[backup] ${err instanceof Error ? err.message : String(err)}\n`);
    process.exit(1);
  }
}
