/**
 * The supervisor of `npm start` (lib/ops/supervisor.mjs) on a MariaDB instance of this test's own
 * (its own data directory and a spare port; the shared test database is never touched):
 *
 * - mariadbd killed (SIGKILL) under eight concurrent writers: the supervisor starts it again, the
 *   app's own pool and health check recover with no person, in under 10 s, and every write that was
 *   acknowledged before the kill is still there (InnoDB's redo log; nothing acknowledged is lost);
 * - Ctrl-C stops the database it started and leaves alone one it found running, saying which;
 * - a process that dies is started again with a growing pause, and the stop path does not wait for
 *   a child that a signal already ended (its exitCode is null, its signalCode is not).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { alive, sparePort } from '../../support/processes';

const root = path.resolve(import.meta.dirname, '../../..');
const dataDir = mkdtempSync(path.join(os.tmpdir(), 'rhobook-supervisor-'));
const DB = 'rhobook_supervised_test';
let port: number;
const procs: ChildProcess[] = [];

type Supervised = { proc: ChildProcess; output: () => string; waitFor: (re: RegExp, ms?: number) => Promise<string> };

function supervise(extra: Record<string, string> = {}): Promise<Supervised> {
  let out = '';
  const proc = spawn(process.execPath, ['tests/support/db-supervisor.mjs'], {
    cwd: root,
    env: { ...process.env, RHOBOOK_DATA_DIR: dataDir, DB_PORT: String(port), DB_NAME: DB, DB_TEST_NAME: DB, ...extra },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  procs.push(proc);
  proc.stdout!.on('data', (b) => (out += b.toString()));
  proc.stderr!.on('data', (b) => (out += b.toString()));
  const waitFor = async (re: RegExp, ms = 120_000) => {
    const end = Date.now() + ms;
    for (;;) {
      const m = re.exec(out);
      if (m) return m[0];
      if (proc.exitCode !== null && !re.exec(out)) throw new Error(`the supervisor exited: ${out}`);
      if (Date.now() > end) throw new Error(`timed out waiting for ${re}: ${out}`);
      await new Promise((r) => setTimeout(r, 50));
    }
  };
  return waitFor(/^ready$/m).then(() => ({ proc, output: () => out, waitFor }));
}

const mariadbPid = () => Number(readFileSync(path.join(dataDir, 'mariadb', 'mariadb.pid'), 'utf8').trim());

async function interrupt(s: Supervised) {
  const done = new Promise((r) => s.proc.once('exit', r));
  s.proc.kill('SIGINT');
  await done;
}

beforeAll(async () => {
  port = await sparePort();
});
afterAll(async () => {
  for (const p of procs) if (p.exitCode === null && p.signalCode === null) p.kill('SIGKILL');
  try {
    const pid = mariadbPid();
    if (alive(pid)) process.kill(pid, 'SIGKILL');
  } catch {
    // no instance left
  }
  const { closeDb } = await import('@/db/connection');
  await closeDb();
  vi.unstubAllEnvs();
  rmSync(dataDir, { recursive: true, force: true });
});

describe('the supervisor of npm start', () => {
  it('mariadbd killed under concurrent writers: started again, the app healthy in under 10 s, nothing acknowledged lost', async () => {
    const s = await supervise();
    expect(s.output()).toMatch(/database started pid \d+/);
    // The app's own modules, pointed at the supervised instance.
    vi.stubEnv('DB_PORT', String(port));
    vi.stubEnv('DB_NAME', DB);
    vi.resetModules();
    const { closeDb, getDb } = await import('@/db/connection');
    await closeDb();
    const { runMigrations } = await import('@/db/migrate');
    await runMigrations();
    const { getHealth } = await import('@/lib/dal/health');
    const { signInFailures } = await import('@/db/schema');
    expect((await getHealth()).db).toBe('ok');

    const acknowledged: number[] = [];
    const failed: string[] = [];
    let stop = false;
    let killedAt = 0;
    let firstWriteAfterKill = 0;
    const writer = async (w: number) => {
      for (let i = 0; !stop; i++) {
        try {
          const [res] = await getDb().insert(signInFailures).values({ email: `writer-${w}@test.example`, clientAddress: `w${w}-${i}` });
          acknowledged.push(Number(res.insertId));
          if (killedAt && !firstWriteAfterKill) firstWriteAfterKill = Date.now();
        } catch (err) {
          failed.push(err instanceof Error ? err.message : String(err));
          await new Promise((r) => setTimeout(r, 100));
        }
        await new Promise((r) => setTimeout(r, 10));
      }
    };
    const writers = Array.from({ length: 8 }, (_, w) => writer(w));
    await new Promise((r) => setTimeout(r, 1500));
    const before = acknowledged.length;
    expect(before).toBeGreaterThan(50);

    const victim = mariadbPid();
    process.kill(victim, 'SIGKILL');
    killedAt = Date.now();
    let healthyAt = 0;
    while (Date.now() - killedAt < 30_000) {
      const h = await getHealth();
      if (h.db === 'ok') {
        healthyAt = Date.now();
        break;
      }
      await new Promise((r) => setTimeout(r, 100));
    }
    expect(healthyAt, s.output()).toBeGreaterThan(0);
    const recovery = healthyAt - killedAt;
    console.log(`[supervisor test] mariadbd killed; healthy again after ${recovery} ms; first write after ${firstWriteAfterKill ? firstWriteAfterKill - killedAt : 'none yet'} ms`);
    expect(recovery).toBeLessThan(10_000);
    await new Promise((r) => setTimeout(r, 1000));
    stop = true;
    await Promise.all(writers);
    expect(firstWriteAfterKill - killedAt).toBeLessThan(10_000);
    expect(failed.length).toBeGreaterThan(0); // the kill was felt
    expect(acknowledged.length).toBeGreaterThan(before);

    const stored = new Set((await getDb().select({ id: signInFailures.id }).from(signInFailures)).map((r) => r.id));
    const lost = acknowledged.filter((id) => !stored.has(id));
    expect(lost).toEqual([]);
    expect(s.output()).toMatch(new RegExp(`the database \\(pid ${victim}\\) has stopped; starting it again`));
    expect(s.output()).toMatch(/the database is running again \(pid \d+\)/);
    expect(alive(mariadbPid())).toBe(true);
    await closeDb();

    // Ctrl-C: the database this supervisor started is stopped, and it says so.
    const pid = mariadbPid();
    await interrupt(s);
    expect(s.output()).toContain('stopped the database this command started');
    expect(alive(pid)).toBe(false);
  }, 240_000);

  it('Ctrl-C leaves alone a database that was already running, and says so', async () => {
    const owner = await supervise();
    expect(owner.output()).toMatch(/database started/);
    const guest = await supervise();
    expect(guest.output()).toMatch(/database reused pid \d+/);
    const pid = mariadbPid();
    await interrupt(guest);
    expect(guest.output()).toMatch(new RegExp(`left the database running: it was already running when this command started \\(pid ${pid}\\)`));
    expect(alive(pid)).toBe(true);
    await interrupt(owner);
    expect(owner.output()).toContain('stopped the database this command started');
    expect(alive(pid)).toBe(false);
  }, 180_000);

  it('a process that dies is started again after pauses that double, each exit logged with its code', async () => {
    const s = await supervise({ SUPERVISE_CHILD: 'crash', SUPERVISE_INITIAL_MS: '100' });
    await s.waitFor(/crash exited unexpectedly \(code 3\).*starting it again in 0\.4 s/, 20_000);
    const pauses = [...s.output().matchAll(/crash exited unexpectedly \(code 3\) after [\d.]+ s; starting it again in ([\d.]+) s/g)].map((m) => Number(m[1]));
    expect(pauses.slice(0, 3)).toEqual([0.1, 0.2, 0.4]);
    await interrupt(s);
  }, 120_000);

  it('stopping does not wait for a child a signal already ended (exitCode null, signalCode set)', async () => {
    const s = await supervise({ SUPERVISE_CHILD: 'signal', SUPERVISE_INITIAL_MS: '60000' });
    await s.waitFor(/signal exited unexpectedly \(signal SIGKILL\)/, 20_000);
    const pid = mariadbPid();
    await interrupt(s);
    const ms = Number(/stopped in (\d+) ms/.exec(s.output())![1]);
    expect(ms).toBeLessThan(15_000);
    expect(s.output()).toContain('stopped the database this command started');
    expect(alive(pid)).toBe(false);
  }, 120_000);
});
