// Several web processes on one machine, with Node's own cluster module: the first process (the
// primary) forks WEB_PROCESSES copies of lib/ops/web-server.mjs that share its port (the primary
// accepts each connection and hands it to a copy in turn), restarts a copy that dies with the
// supervisor's backoff, and passes SIGINT and SIGTERM on. A copy leaves when the primary is gone,
// so a primary killed outright leaves no process behind. The processes keep no state of their own
// (sessions, throttles and jobs are in the database; each keeps its own in-force answers, checked
// against the database on every call), so any copy can answer any request.
import cluster from 'node:cluster';
import os from 'node:os';
import { backoffDelay } from './supervisor.mjs';

const MAX_PROCESSES = 16;
const STABLE_MS = 60_000;

/**
 * How many web processes to run: WEB_PROCESSES when set (1 to 16), else one per core up to two
 * (the cores are shared with the worker and, here, MariaDB). Throws a sentence naming the setting
 * when it is not a whole number in range.
 */
export function webProcessCount(env = process.env, cores = os.availableParallelism()) {
  const raw = env.WEB_PROCESSES;
  if (raw === undefined || raw.trim() === '') return Math.max(1, Math.min(2, cores));
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1 || n > MAX_PROCESSES) {
    throw new Error(`WEB_PROCESSES must be a whole number from 1 to ${MAX_PROCESSES} (the web processes to run); it is "${raw}".`);
  }
  return n;
}

/**
 * The Node flags of the web process: `--single-threaded-gc` when the web processes take every core
 * (the default up to two cores). V8 collects the young generation with helper threads; when every
 * core is already running a web process (and here MariaDB and the worker too), a collection waits
 * for helpers that get no core, and a pause of one process delays every request it holds.
 * Measured with `npm run bench:api` on the 2-core machine, two web processes: worst p99 35-56 ms
 * over three runs with the flag, 59-71 ms without.
 */
export function webNodeFlags(env = process.env, cores = os.availableParallelism()) {
  return webProcessCount(env, cores) >= cores ? ['--single-threaded-gc'] : [];
}

/**
 * Runs the primary: forks `count` web processes and keeps them running until SIGINT or SIGTERM,
 * which it passes on before leaving (at the latest after `graceMs`). Never resolves.
 */
export function runPrimary(count, { log = (m) => process.stdout.write(`[web] ${m}\n`), graceMs = 4000, initialMs, maxMs } = {}) {
  let stopping = false;
  const failures = new Map();
  const fork = (slot) => {
    const started = Date.now();
    const w = cluster.fork({ WEB_PROCESS_SLOT: String(slot) });
    w.once('exit', (code, signal) => {
      if (stopping) {
        if (Object.keys(cluster.workers ?? {}).length === 0) process.exit(0);
        return;
      }
      const f = Date.now() - started >= STABLE_MS ? 1 : (failures.get(slot) ?? 0) + 1;
      failures.set(slot, f);
      const delay = backoffDelay(f, { ...(initialMs ? { initialMs } : {}), ...(maxMs ? { maxMs } : {}) });
      log(`web process ${slot + 1} of ${count} (pid ${w.process.pid}) exited (${signal ? `signal ${signal}` : `code ${code}`}); starting it again in ${delay} ms`);
      setTimeout(() => {
        if (!stopping) fork(slot);
      }, delay).unref();
    });
  };
  for (let slot = 0; slot < count; slot++) fork(slot);
  log(`${count} web processes (set WEB_PROCESSES to change)`);
  for (const signal of ['SIGINT', 'SIGTERM']) {
    process.on(signal, () => {
      if (stopping) return;
      stopping = true;
      const workers = Object.values(cluster.workers ?? {});
      if (workers.length === 0) process.exit(0);
      for (const w of workers) w?.process.kill(signal);
      setTimeout(() => process.exit(0), graceMs).unref();
    });
  }
  // Keeps the primary alive: its only work is the cluster's.
  return new Promise(() => {});
}

/** In a forked web process: leave when the primary is gone (its channel closes). */
export function leaveWithPrimary() {
  if (cluster.isWorker) process.on('disconnect', () => process.exit(0));
}
