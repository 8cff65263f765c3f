// The supervisor of `npm start`: keeps the web process, the worker and the database running.
// Plain Node, no dependencies.
//
// - A process that exits when nobody asked it to is started again after a pause that doubles with
//   each quick failure (1 s, 2 s, 4 s ... at most 30 s) and goes back to 1 s once a run lasted a
//   minute; every exit and restart is logged with its code or signal.
// - The database of this checkout (db/mariadb.mjs) is watched by its pid; when mariadbd dies it is
//   started again the same way, and the app's connection pools reconnect by themselves.
// - stop() sends SIGTERM to every child, waits for each to exit (a child that already died, whose
//   exitCode is null because a signal ended it, is not waited for: signalCode says it is gone),
//   then stops the database if this supervisor started it and leaves alone one it found running,
//   and says which.
const INITIAL_DELAY_MS = 1000;
const MAX_DELAY_MS = 30_000;
const STABLE_MS = 60_000;

/** True once the child has exited, whether by a code or by a signal. */
export function hasExited(child) {
  return child.exitCode !== null || child.signalCode !== null;
}

/** Resolves when the child has exited (at once when it already has). */
export function exited(child) {
  if (hasExited(child)) return Promise.resolve();
  return new Promise((resolve) => child.once('exit', () => resolve()));
}

/** The pause before the next start after `failures` quick exits in a row. */
export function backoffDelay(failures, { initialMs = INITIAL_DELAY_MS, maxMs = MAX_DELAY_MS } = {}) {
  return Math.min(maxMs, initialMs * 2 ** Math.max(0, failures - 1));
}

export class Supervisor {
  /**
   * @param {{ log?: (msg: string) => void, initialMs?: number, maxMs?: number, stableMs?: number, dbPollMs?: number }} [options]
   */
  constructor({ log = (m) => process.stdout.write(`[rhobook] ${m}\n`), initialMs = INITIAL_DELAY_MS, maxMs = MAX_DELAY_MS, stableMs = STABLE_MS, dbPollMs = 250 } = {}) {
    this.log = log;
    this.delays = { initialMs, maxMs };
    this.stableMs = stableMs;
    this.dbPollMs = dbPollMs;
    this.stopping = false;
    /** @type {Map<string, { start: () => import('node:child_process').ChildProcess, child: import('node:child_process').ChildProcess | null, failures: number, timer: NodeJS.Timeout | null, restarts: number }>} */
    this.processes = new Map();
    this.db = null;
  }

  /** Starts a process under supervision; `start` spawns it (again after each unexpected exit). */
  add(name, start) {
    const entry = { start, child: null, failures: 0, timer: null, restarts: 0 };
    this.processes.set(name, entry);
    this.#launch(name, entry);
    return entry;
  }

  #launch(name, entry) {
    entry.timer = null;
    if (this.stopping) return;
    const startedAt = Date.now();
    const child = entry.start();
    entry.child = child;
    child.once('exit', (code, signal) => {
      if (this.stopping) return;
      const ran = Date.now() - startedAt;
      entry.failures = ran >= this.stableMs ? 1 : entry.failures + 1;
      const delay = backoffDelay(entry.failures, this.delays);
      entry.restarts += 1;
      this.log(`${name} exited unexpectedly (${signal ? `signal ${signal}` : `code ${code}`}) after ${(ran / 1000).toFixed(1)} s; starting it again in ${delay / 1000} s`);
      entry.timer = setTimeout(() => this.#launch(name, entry), delay);
    });
  }

  /**
   * Watches the database of this checkout and starts it again when it dies.
   * @param {{ start: (o?: object) => Promise<{ started: boolean, pid: number }>, stop: (o?: object) => Promise<void>, isAlive: () => boolean }} mariadb db/mariadb.mjs
   * @param {{ started: boolean, pid: number }} state what mariadb.start() returned
   */
  watchDatabase(mariadb, state) {
    this.db = { mariadb, owned: state.started, pid: state.pid, failures: 0, restarts: 0, timer: null, restarting: false, lastStart: Date.now() };
    const poll = async () => {
      const db = this.db;
      if (this.stopping || db.restarting) return;
      if (mariadb.isAlive()) return;
      db.restarting = true;
      const ran = Date.now() - db.lastStart;
      db.failures = ran >= this.stableMs ? 1 : db.failures + 1;
      const delay = db.failures <= 1 ? 0 : backoffDelay(db.failures - 1, this.delays);
      this.log(`the database (pid ${db.pid}) has stopped; starting it again${delay ? ` in ${(delay / 1000).toFixed(0)} s` : ''}`);
      if (delay) await new Promise((r) => setTimeout(r, delay));
      try {
        if (!this.stopping) {
          const again = await mariadb.start({ quiet: true });
          db.pid = again.pid;
          db.owned = db.owned || again.started;
          db.restarts += 1;
          db.lastStart = Date.now();
          this.log(`the database is running again (pid ${again.pid})`);
        }
      } catch (err) {
        this.log(`the database did not start again: ${err instanceof Error ? err.message.split('\n')[0] : String(err)}`);
      } finally {
        db.restarting = false;
      }
    };
    this.db.timer = setInterval(() => void poll(), this.dbPollMs);
  }

  /** Stops every child and then the database this supervisor started; says what it did. */
  async stop() {
    if (this.stopping) return;
    this.stopping = true;
    if (this.db?.timer) clearInterval(this.db.timer);
    const waits = [];
    for (const [name, entry] of this.processes) {
      if (entry.timer) clearTimeout(entry.timer);
      const child = entry.child;
      if (!child || hasExited(child)) continue;
      child.kill('SIGTERM');
      const kill = setTimeout(() => {
        if (!hasExited(child)) {
          this.log(`${name} did not stop within 20 s; killing it`);
          child.kill('SIGKILL');
        }
      }, 20_000);
      waits.push(exited(child).then(() => clearTimeout(kill)));
    }
    await Promise.all(waits);
    if (this.db) {
      // Wait for a restart in progress, so that a database started in the meantime is stopped too.
      while (this.db.restarting) await new Promise((r) => setTimeout(r, 100));
      if (this.db.owned) {
        await this.db.mariadb.stop({ quiet: true });
        this.log('stopped the database this command started');
      } else {
        this.log(`left the database running: it was already running when this command started (pid ${this.db.pid}); stop it with npm run db:stop`);
      }
    }
  }
}
