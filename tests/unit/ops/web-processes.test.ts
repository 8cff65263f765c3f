/**
 * Several web processes on one machine (lib/ops/web-processes.mjs): how many, and the primary that
 * keeps them running. The primary is run for real with stand-in copies (tests/support/web-primary.mjs)
 * that answer their pid: a copy killed outright is started again, connections are shared between
 * the copies, SIGTERM stops them all, and a primary killed outright leaves no copy behind.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { webNodeFlags, webProcessCount } from '@/lib/ops/web-processes.mjs';
import { alive, sparePort } from '../../support/processes';

const root = path.resolve(import.meta.dirname, '../../..');
const procs: ChildProcess[] = [];
afterAll(() => {
  for (const p of procs) if (p.exitCode === null && p.signalCode === null) p.kill('SIGKILL');
});

describe('how many web processes', () => {
  it('one per core up to two by default; WEB_PROCESSES when set', () => {
    expect(webProcessCount({}, 1)).toBe(1);
    expect(webProcessCount({}, 2)).toBe(2);
    expect(webProcessCount({}, 64)).toBe(2);
    expect(webProcessCount({ WEB_PROCESSES: '' }, 4)).toBe(2);
    expect(webProcessCount({ WEB_PROCESSES: '1' }, 8)).toBe(1);
    expect(webProcessCount({ WEB_PROCESSES: '6' }, 2)).toBe(6);
  });

  it('collects garbage on one thread when the web processes take every core, in parallel otherwise', () => {
    expect(webNodeFlags({}, 1)).toEqual(['--single-threaded-gc']);
    expect(webNodeFlags({}, 2)).toEqual(['--single-threaded-gc']);
    expect(webNodeFlags({}, 8)).toEqual([]);
    expect(webNodeFlags({ WEB_PROCESSES: '8' }, 8)).toEqual(['--single-threaded-gc']);
    expect(webNodeFlags({ WEB_PROCESSES: '1' }, 2)).toEqual([]);
  });

  it('refuses anything but a whole number from 1 to 16, naming the setting and the value', () => {
    for (const bad of ['0', '-1', '1.5', 'two', '17', '1e9']) {
      expect(() => webProcessCount({ WEB_PROCESSES: bad }, 2)).toThrow(`WEB_PROCESSES must be a whole number from 1 to 16 (the web processes to run); it is "${bad}".`);
    }
  });
});

async function until<T>(what: string, f: () => T | undefined | false, ms = 15_000): Promise<T> {
  const end = Date.now() + ms;
  for (;;) {
    const v = f();
    if (v) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

function start(port: number) {
  let out = '';
  const proc = spawn(process.execPath, ['tests/support/web-primary.mjs'], { cwd: root, env: { ...process.env, PORT: String(port), WEB_PROCESSES: '2' }, stdio: ['ignore', 'pipe', 'pipe'] });
  procs.push(proc);
  proc.stdout!.on('data', (b) => (out += b.toString()));
  proc.stderr!.on('data', (b) => (out += b.toString()));
  const copies = () => [...out.matchAll(/^copy (\d) (\d+)$/gm)].map((m) => ({ slot: Number(m[1]), pid: Number(m[2]) }));
  return { proc, output: () => out, copies };
}

describe('the primary', () => {
  it('shares the port between its copies and starts a killed copy again, with the pause logged', async () => {
    const port = await sparePort();
    const p = start(port);
    const first = await until('two copies', () => p.copies().length === 2 && p.copies());
    // Connections go to both copies in turn (the primary hands them out round-robin).
    const pids = new Set<string>();
    for (let i = 0; i < 8; i++) pids.add(await (await fetch(`http://127.0.0.1:${port}/`, { headers: { connection: 'close' } })).text());
    expect([...pids].sort()).toEqual(first.map((c) => String(c.pid)).sort());

    process.kill(first[0].pid, 'SIGKILL');
    const line = new RegExp(`web process ${first[0].slot + 1} of 2 \\(pid ${first[0].pid}\\) exited \\(signal SIGKILL\\); starting it again in 200 ms`);
    await until('the restart line', () => line.test(p.output()));
    const again = await until('a third copy', () => p.copies().length === 3 && p.copies()[2]);
    expect(again.slot).toBe(first[0].slot);
    expect(alive(again.pid)).toBe(true);
    expect(await (await fetch(`http://127.0.0.1:${port}/`)).text()).toMatch(/^\d+$/);

    // SIGTERM: passed on to every copy, and the primary leaves with code 0.
    p.proc.kill('SIGTERM');
    const code = await new Promise<number | null>((r) => p.proc.once('exit', (c) => r(c)));
    expect(code).toBe(0);
    for (const c of [first[1], again]) await until(`copy ${c.pid} to stop`, () => !alive(c.pid), 5_000);
  }, 30_000);

  it('a primary killed outright leaves no copy behind', async () => {
    const port = await sparePort();
    const p = start(port);
    const copies = await until('two copies', () => p.copies().length === 2 && p.copies());
    p.proc.kill('SIGKILL');
    for (const c of copies) await until(`copy ${c.pid} to leave`, () => !alive(c.pid), 5_000);
  }, 30_000);
});
