#!/usr/bin/env node
// Rhobook's private MariaDB instance: installed from Debian's packages when missing, started on
// loopback with its own data directory, socket and pid file under .data/, utf8mb4 throughout.
//
//   node db/mariadb.mjs start    start (or reuse) the instance and create databases + app user
//   node db/mariadb.mjs stop     stop the instance started from this checkout
//   node db/mariadb.mjs status   print whether it is running
//
// Plain Node (no dependencies) because `npm start` calls it before anything else is known to work.
// Settings come from the environment (see lib/env.ts for the application's side):
//   DB_PORT (3307), DB_USER (rhobook), DB_PASSWORD (rhobook-local), DB_NAME (rhobook),
//   DB_TEST_NAME (rhobook_test), RHOBOOK_DATA_DIR (.data)
import { spawn, spawnSync, execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const dataRoot = path.resolve(root, process.env.RHOBOOK_DATA_DIR ?? '.data');
const dir = path.join(dataRoot, 'mariadb');
const datadir = path.join(dir, 'data');
const socket = path.join(dir, 'mariadb.sock');
const pidFile = path.join(dir, 'mariadb.pid');
const logFile = path.join(dir, 'mariadb.log');
const port = Number(process.env.DB_PORT ?? 3307);
const appUser = process.env.DB_USER ?? 'rhobook';
const appPassword = process.env.DB_PASSWORD ?? 'rhobook-local';
const databases = [process.env.DB_NAME ?? 'rhobook', process.env.DB_TEST_NAME ?? 'rhobook_test'];
const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;
const osUser = os.userInfo().username;

function log(msg) {
  process.stdout.write(`[mariadb] ${msg}\n`);
}

function which(cmd) {
  for (const d of (process.env.PATH ?? '').split(':').concat(['/usr/sbin', '/usr/bin', '/sbin'])) {
    const p = path.join(d, cmd);
    if (fs.existsSync(p)) return p;
  }
  return null;
}

/** Installs the server and client from Debian's packages when mariadbd is missing. */
export function ensureInstalled() {
  // mariadb-dump (npm run db:backup) is in Debian's mariadb-client, not in mariadb-client-core.
  if (which('mariadbd') && which('mariadb') && which('mariadb-install-db') && which('mariadb-dump')) return;
  if (!isRoot) {
    throw new Error(
      'MariaDB is not installed and this user cannot install it. Run as root, or install the Debian ' +
        'packages mariadb-server-core, mariadb-client-core and mariadb-client.',
    );
  }
  log('installing mariadb-server-core, mariadb-client-core and mariadb-client from Debian packages...');
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  const update = spawnSync('apt-get', ['update', '-qq'], { stdio: 'inherit', env });
  if (update.status !== 0) throw new Error('apt-get update failed; see the output above.');
  const install = spawnSync(
    'apt-get',
    ['install', '-y', '-qq', '--no-install-recommends', 'mariadb-server-core', 'mariadb-client-core', 'mariadb-client'],
    { stdio: 'inherit', env },
  );
  if (install.status !== 0) throw new Error('apt-get install of MariaDB failed; see the output above.');
}

function client(sql, { database } = {}) {
  const args = [`--socket=${socket}`, `--user=${osUser}`, '--batch', '--skip-column-names'];
  if (database) args.push(database);
  args.push('-e', sql);
  return execFileSync(which('mariadb'), args, { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'] });
}

function ping() {
  try {
    client('SELECT 1');
    return true;
  } catch {
    return false;
  }
}

function readPid() {
  try {
    const pid = Number(fs.readFileSync(pidFile, 'utf8').trim());
    return Number.isInteger(pid) && pid > 0 ? pid : null;
  } catch {
    return null;
  }
}

function alive(pid) {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

function sleep(ms) {
  return new Promise((r) => setTimeout(r, ms));
}

function initialise() {
  fs.mkdirSync(datadir, { recursive: true });
  log(`initialising a new data directory in ${path.relative(root, datadir)}`);
  const args = [
    `--datadir=${datadir}`,
    '--auth-root-authentication-method=socket',
    '--skip-test-db',
    '--skip-name-resolve',
  ];
  if (isRoot) args.push('--user=root');
  const r = spawnSync(which('mariadb-install-db'), args, { encoding: 'utf8' });
  if (r.status !== 0) {
    throw new Error(`mariadb-install-db failed:\n${r.stdout}\n${r.stderr}`);
  }
}

/**
 * Starts the instance (or reuses a running one) and makes sure the databases and the application
 * user exist. Returns { started: boolean } so a caller knows whether it owns the process.
 */
export async function start({ quiet = false } = {}) {
  ensureInstalled();
  fs.mkdirSync(dir, { recursive: true });
  const existing = readPid();
  if (existing && alive(existing) && ping()) {
    if (!quiet) log(`reusing the instance already running (pid ${existing}, port ${port})`);
    bootstrap();
    return { started: false, pid: existing };
  }
  if (!fs.existsSync(path.join(datadir, 'mysql'))) initialise();
  const args = [
    '--no-defaults',
    `--datadir=${datadir}`,
    `--socket=${socket}`,
    `--pid-file=${pidFile}`,
    `--port=${port}`,
    '--bind-address=127.0.0.1',
    '--skip-name-resolve',
    '--character-set-server=utf8mb4',
    '--collation-server=utf8mb4_unicode_ci',
    `--log-error=${logFile}`,
    '--innodb-buffer-pool-size=256M',
    '--max-allowed-packet=256M',
    '--max-connections=300',
    '--skip-log-bin',
  ];
  if (isRoot) args.push('--user=root');
  const child = spawn(which('mariadbd'), args, { detached: true, stdio: 'ignore' });
  child.unref();
  const deadline = Date.now() + 60_000;
  while (Date.now() < deadline) {
    if (ping()) break;
    if (child.exitCode !== null) break;
    await sleep(250);
  }
  if (!ping()) {
    const tail = fs.existsSync(logFile) ? fs.readFileSync(logFile, 'utf8').split('\n').slice(-20).join('\n') : '';
    throw new Error(`MariaDB did not start within 60 s on port ${port}. Last lines of ${logFile}:\n${tail}`);
  }
  if (!quiet) log(`started on 127.0.0.1:${port} (pid ${readPid() ?? child.pid}, data in ${path.relative(root, dir)})`);
  bootstrap();
  return { started: true, pid: readPid() ?? child.pid };
}

function sqlString(s) {
  return `'${String(s).replace(/\\/g, '\\\\').replace(/'/g, "\\'")}'`;
}

function bootstrap() {
  const stmts = [];
  for (const db of databases) {
    stmts.push(`CREATE DATABASE IF NOT EXISTS \`${db}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;`);
  }
  for (const host of ['127.0.0.1', 'localhost']) {
    stmts.push(`CREATE USER IF NOT EXISTS ${sqlString(appUser)}@${sqlString(host)} IDENTIFIED BY ${sqlString(appPassword)};`);
    stmts.push(`ALTER USER ${sqlString(appUser)}@${sqlString(host)} IDENTIFIED BY ${sqlString(appPassword)};`);
    for (const db of databases) {
      stmts.push(`GRANT ALL PRIVILEGES ON \`${db}\`.* TO ${sqlString(appUser)}@${sqlString(host)};`);
    }
    // Developers' and tests' own databases (rhobook_<name>_test and the like) under the same prefix.
    stmts.push(`GRANT ALL PRIVILEGES ON \`${databases[0]}\\_%\`.* TO ${sqlString(appUser)}@${sqlString(host)};`);
  }
  client(stmts.join('\n'));
}

/** Stops the instance started from this checkout, waiting for it to exit. */
export async function stop({ quiet = false } = {}) {
  const pid = readPid();
  if (!pid || !alive(pid)) {
    if (!quiet) log('not running');
    return;
  }
  process.kill(pid, 'SIGTERM');
  const deadline = Date.now() + 60_000;
  while (alive(pid) && Date.now() < deadline) await sleep(200);
  if (alive(pid)) {
    process.kill(pid, 'SIGKILL');
    if (!quiet) log(`killed pid ${pid} after 60 s`);
  } else if (!quiet) {
    log(`stopped (pid ${pid})`);
  }
}

/** Whether the mariadbd of this checkout is alive (by its pid file; cheap enough to poll). */
export function isAlive() {
  const pid = readPid();
  return Boolean(pid && alive(pid));
}

/** The connection settings of this checkout's instance, for the backup and restore scripts. */
export function connection() {
  return { socket, port, osUser, client: which('mariadb'), dump: which('mariadb-dump') };
}

export function status() {
  const pid = readPid();
  return { running: Boolean(pid && alive(pid) && ping()), pid, port, socket };
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url);
if (isMain) {
  const cmd = process.argv[2] ?? 'status';
  try {
    if (cmd === 'start') await start();
    else if (cmd === 'stop') await stop();
    else if (cmd === 'status') {
      const s = status();
      log(s.running ? `running (pid ${s.pid}, port ${s.port})` : 'not running');
    } else {
      process.stderr.write('usage: node db/mariadb.mjs start|stop|status\n');
      process.exit(2);
    }
  } catch (err) {
    process.stderr.write(`[mariadb] ${err instanceof Error ? err.message : String(err)}\n`);
    process.exit(1);
  }
}
