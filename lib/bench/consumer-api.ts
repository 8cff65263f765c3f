/**
 * Consumer API load (`npm run bench:api`): what a downstream model's calls cost at a steady rate.
 * Seeds the demo organisation into a database of its own (BENCH_DB, default rhobook_bench, made
 * afresh), creates an API token, starts the production web process (lib/ops/web-server.mjs, the
 * build of `next build`) on 127.0.0.1:BENCH_PORT (3400), and drives it with autocannon at a fixed
 * overall rate (200 requests a second for 30 s by default) over three calls a consumer makes:
 * the version in force for a segment today, the same at a past date, and every segment in force.
 * autocannon runs in a clean process of its own (lib/bench/load-runner.mjs), not in this one, which
 * has loaded the app's modules to seed: the latency measured is the server's, not this heap's.
 *
 * Printed per call and overall: requests, rate, latency p50 / p90 / p99 / max, errors, timeouts and
 * answers other than 2xx. The target (README, "Operations"): p99 under 60 ms at 200 requests a
 * second with no error. Loopback only; the run is bounded by --duration and stops by itself.
 *
 *   npm run bench:api [-- --rate 200 --duration 30 --connections 20]
 *   (needs `npm run db:start`)
 */
import { spawn } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import mysql from 'mysql2/promise';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
const arg = (name: string, fallback: number) => {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? Number(process.argv[i + 1]) : fallback;
};
const RATE = arg('rate', 200);
const DURATION = arg('duration', 30);
const CONNECTIONS = arg('connections', 20);
const PORT = Number(process.env.BENCH_PORT ?? 3400);
const DB = process.env.BENCH_DB ?? 'rhobook_bench';
const TARGET_P99_MS = 60;

/** One line of the load generator's report (lib/bench/load-runner.mjs). */
type Row = { name: string; requests: number; rate: number; p50: number; p90: number; p99: number; max: number; errors: number; non2xx: number };

function run(cmd: string, args: string[], env: Record<string, string>): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(cmd, args, { cwd: root, env: { ...process.env, ...env }, stdio: ['ignore', 'inherit', 'inherit'] });
    child.once('exit', (code) => (code === 0 ? resolve() : reject(new Error(`${cmd} ${args.join(' ')} exited ${code}`))));
  });
}

async function main() {
  const env = { DB_NAME: DB, NEXTAUTH_SECRET: 'rhobook-bench-secret-0123456789abcdef-0123', NEXTAUTH_URL: `http://127.0.0.1:${PORT}`, NEXT_TELEMETRY_DISABLED: '1' };
  process.env.DB_NAME = DB;
  const { ensureBuild } = await import('../ops/common.mjs');
  const { env: appEnv } = await import('@/lib/env');
  const e = appEnv();
  const admin = await mysql.createConnection({ host: e.DB_HOST, port: e.DB_PORT, user: e.DB_USER, password: e.DB_PASSWORD });
  await admin.query(`DROP DATABASE IF EXISTS \`${DB}\``);
  await admin.query(`CREATE DATABASE \`${DB}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  await admin.end();
  console.log(`[bench] seeding the demo organisation into ${DB}...`);
  const tsxNode = [process.execPath, '--conditions=react-server', '--import', 'tsx'];
  await run(tsxNode[0], [...tsxNode.slice(1), 'db/migrate.ts'], env);
  await run(tsxNode[0], [...tsxNode.slice(1), 'db/seed.ts'], env);

  const { getDb, closeDb } = await import('@/db/connection');
  const { users } = await import('@/db/schema');
  const { eq } = await import('drizzle-orm');
  const { createToken, authenticateToken } = await import('@/lib/dal/tokens');
  const { listInForce } = await import('@/lib/dal/assumptions');
  const [a] = await getDb().select().from(users).where(eq(users.role, 'admin')).limit(1);
  const { token } = await createToken({ id: a.id, email: a.email, name: a.name, role: a.role }, { name: 'Load benchmark', scopes: ['assumptions:read'] });
  const principal = await authenticateToken(`Bearer ${token}`, 'assumptions:read');
  const today = new Date().toISOString().slice(0, 10);
  const { versions } = await listInForce(principal, today);
  if (versions.length === 0) throw new Error('The demo library has no version in force to ask for.');
  const segment = encodeURIComponent(versions[0].segment);
  await closeDb();

  if (ensureBuild()) console.log('[bench] built the app');
  const { webNodeFlags } = await import('../ops/web-processes.mjs');
  const web = spawn(process.execPath, [...webNodeFlags(), 'lib/ops/web-server.mjs'], {
    cwd: root,
    env: { ...process.env, ...env, NODE_ENV: 'production', HOST: '127.0.0.1', PORT: String(PORT) },
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  try {
    const base = `http://127.0.0.1:${PORT}`;
    for (let i = 0; ; i++) {
      try {
        if ((await fetch(`${base}/api/health`)).status < 500) break;
      } catch {
        // not listening yet
      }
      if (i > 300) throw new Error('the web process did not answer within 60 s');
      await new Promise((r) => setTimeout(r, 200));
    }
    const headers = { authorization: `Bearer ${token}` };
    const past = new Date(Date.now() - 60 * 86_400_000).toISOString().slice(0, 10);
    const calls = [
      { name: 'in force today', path: `/api/v1/assumptions?segment=${segment}` },
      { name: 'in force 60 days ago', path: `/api/v1/assumptions?segment=${segment}&asOf=${past}` },
      { name: 'every segment in force', path: '/api/v1/assumptions' },
    ];
    console.log(`[bench] ${RATE} requests a second for ${DURATION} s over ${CONNECTIONS} connections, loopback, each call on its own, then the three in turn`);
    // The load generator runs in a clean process of its own (lib/bench/load-runner.mjs).
    const plan = JSON.stringify({ base, headers, rate: RATE, duration: DURATION, connections: CONNECTIONS, calls });
    const rows = await new Promise<Row[]>((resolve, reject) => {
      const child = spawn(process.execPath, ['lib/bench/load-runner.mjs', plan], { cwd: root, stdio: ['ignore', 'pipe', 'inherit'] });
      let out = '';
      child.stdout.on('data', (b) => (out += b.toString()));
      child.once('exit', (code) => (code === 0 ? resolve(JSON.parse(out.trim().split('\n').at(-1)!) as Row[]) : reject(new Error(`the load generator exited ${code}`))));
    });
    console.log('call                      requests   req/s   p50 ms  p90 ms  p99 ms  max ms  errors  non-2xx');
    for (const r of rows) {
      console.log(
        `${r.name.padEnd(25)} ${String(r.requests).padStart(8)} ${r.rate.toFixed(0).padStart(7)} ${String(r.p50).padStart(8)} ${String(r.p90).padStart(7)} ${String(r.p99).padStart(7)} ${String(r.max).padStart(7)} ${String(r.errors).padStart(7)} ${String(r.non2xx).padStart(8)}`,
      );
    }
    const worst = Math.max(...rows.map((r) => r.p99));
    const failures = rows.reduce((n, r) => n + r.errors + r.non2xx, 0);
    console.log(`[bench] worst p99 ${worst} ms (target under ${TARGET_P99_MS} ms), ${failures} errors or non-2xx answers: ${worst < TARGET_P99_MS && failures === 0 ? 'target held' : 'TARGET MISSED'}`);
  } finally {
    web.kill('SIGTERM');
    await new Promise((r) => web.once('exit', r));
  }
}

main().catch((err) => {
  console.error('[bench] failed:', err instanceof Error ? err.stack : err);
  process.exit(1);
});
