// Shared steps of `npm start` and `npm test`. Plain Node with no dependencies: these run before
// node_modules is known to exist.
import { spawn, spawnSync } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
export const dataDir = path.resolve(root, process.env.RHOBOOK_DATA_DIR ?? '.data');

export function say(msg) {
  process.stdout.write(`[rhobook] ${msg}\n`);
}

/** Runs a command to completion; throws with its output when it fails. */
export function run(cmd, args, { env = {}, quiet = true, label } = {}) {
  const r = spawnSync(cmd, args, {
    cwd: root,
    env: { ...process.env, ...env },
    encoding: 'utf8',
    stdio: quiet ? ['ignore', 'pipe', 'pipe'] : 'inherit',
    maxBuffer: 256 * 1024 * 1024,
  });
  if (r.status !== 0) {
    const out = quiet ? `\n${r.stdout ?? ''}\n${r.stderr ?? ''}` : '';
    throw new Error(`${label ?? `${cmd} ${args.join(' ')}`} failed (exit ${r.status ?? r.signal})${out}`);
  }
  return r;
}

/** Installs dependencies when node_modules is missing or older than package-lock.json. */
export function ensureDependencies() {
  const marker = path.join(root, 'node_modules', '.package-lock.json');
  const lock = path.join(root, 'package-lock.json');
  const fresh = fs.existsSync(marker) && fs.statSync(marker).mtimeMs >= fs.statSync(lock).mtimeMs;
  if (fresh) return;
  say('installing dependencies (npm ci)...');
  run('npm', ['ci', '--no-audit', '--no-fund'], {
    env: { PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD: '1' },
    label: 'npm ci',
  });
}

/** Installs Debian's chromium when missing (for the end-to-end tests). */
export function ensureChromium() {
  if (fs.existsSync('/usr/bin/chromium')) return;
  if (process.getuid?.() !== 0) throw new Error('chromium is missing and only root can install it: apt-get install -y chromium');
  say('installing chromium from Debian packages...');
  const env = { DEBIAN_FRONTEND: 'noninteractive' };
  run('apt-get', ['update', '-qq'], { env, label: 'apt-get update' });
  run('apt-get', ['install', '-y', '-qq', 'chromium'], { env, label: 'apt-get install chromium' });
}

const BUILD_INPUTS = ['app', 'components', 'lib', 'db', 'public', 'proxy.ts', 'next.config.mjs', 'postcss.config.mjs', 'tsconfig.json', 'package-lock.json'];

function walk(p, out) {
  if (!fs.existsSync(p)) return;
  const st = fs.statSync(p);
  if (st.isDirectory()) {
    for (const name of fs.readdirSync(p).sort()) {
      if (name === 'node_modules' || name.startsWith('.')) continue;
      walk(path.join(p, name), out);
    }
  } else out.push(p);
}

/** A hash of everything the production build depends on. */
export function sourceHash() {
  const files = [];
  for (const i of BUILD_INPUTS) walk(path.join(root, i), files);
  const h = crypto.createHash('sha256');
  for (const f of files) {
    h.update(path.relative(root, f));
    h.update(fs.readFileSync(f));
  }
  return h.digest('hex');
}

/** Builds the Next app when .next is missing or built from other sources. */
export function ensureBuild({ quiet = true } = {}) {
  const stamp = path.join(root, '.next', 'rhobook-source-hash');
  const hash = sourceHash();
  const current = fs.existsSync(path.join(root, '.next', 'BUILD_ID')) && fs.existsSync(stamp) && fs.readFileSync(stamp, 'utf8') === hash;
  if (current) return false;
  say('building the web app (next build)...');
  run(path.join(root, 'node_modules', '.bin', 'next'), ['build'], {
    quiet,
    env: { NEXT_TELEMETRY_DISABLED: '1', NODE_ENV: 'production' },
    label: 'next build',
  });
  fs.writeFileSync(stamp, hash);
  return true;
}

/** A session secret kept in .data so that sign-ins survive a restart. */
export function localSecret() {
  if (process.env.NEXTAUTH_SECRET) return process.env.NEXTAUTH_SECRET;
  fs.mkdirSync(dataDir, { recursive: true });
  const f = path.join(dataDir, 'nextauth-secret');
  if (!fs.existsSync(f)) fs.writeFileSync(f, crypto.randomBytes(32).toString('hex'), { mode: 0o600 });
  return fs.readFileSync(f, 'utf8').trim();
}

export function tsx(script, args = [], opts = {}) {
  return run(process.execPath, ['--conditions=react-server', '--import', 'tsx', script, ...args], opts);
}

/** Starts a long-running child; its output is prefixed and passed through (or to a log file). */
export function startChild(name, cmd, args, { env = {}, logFile } = {}) {
  const child = spawn(cmd, args, { cwd: root, env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
  const sink = logFile ? fs.createWriteStream(logFile, { flags: 'a' }) : null;
  const forward = (stream, target) => {
    let buf = '';
    stream.on('data', (chunk) => {
      buf += chunk.toString();
      let i;
      while ((i = buf.indexOf('\n')) >= 0) {
        const line = buf.slice(0, i);
        buf = buf.slice(i + 1);
        if (sink) sink.write(`[${name}] ${line}\n`);
        else target.write(`[${name}] ${line}\n`);
      }
    });
  };
  forward(child.stdout, process.stdout);
  forward(child.stderr, process.stderr);
  return child;
}

/** Resolves once `url` answers (any HTTP status below 500), or rejects after `timeoutMs`. */
export async function waitForHttp(url, timeoutMs = 60_000) {
  const deadline = Date.now() + timeoutMs;
  let last;
  while (Date.now() < deadline) {
    try {
      const res = await fetch(url, { redirect: 'manual' });
      if (res.status < 500) return;
      last = `status ${res.status}`;
    } catch (err) {
      last = err instanceof Error ? err.message : String(err);
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`${url} did not answer within ${timeoutMs / 1000} s (${last})`);
}
