/**
 * A small pool of worker threads (node:worker_threads) for the engine's replications. Tasks are
 * slices of an index range (tasks.ts); the pool hands them to idle workers as they free up and
 * returns the results in task order, so the merged result does not depend on the number of
 * threads or on which thread ran which slice.
 *
 * Not pure: owns threads. Close it (close()) when done; an aborted run terminates the workers and
 * closes the pool.
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { taskSize, type EngineTask, type EngineTaskResult } from './tasks';
import type { WorkerRequest, WorkerResponse } from './worker';

const ENTRY = new URL('./worker-entry.mjs', import.meta.url);

/** Most threads a pool may have. */
export const MAX_THREADS = 64;

/** Default thread count: the machine's available parallelism. */
export function defaultThreads(): number {
  return Math.max(1, Math.min(MAX_THREADS, availableParallelism()));
}

/** Raised when a run is stopped through its AbortSignal. */
export class EngineAbortError extends Error {
  constructor(message = 'The computation was stopped before it finished.') {
    super(message);
    this.name = 'AbortError';
  }
}

/** Options of {@link EnginePool.run}. */
export interface RunOptions {
  /**
   * Called after each finished replication with the work done so far: the sum over replications
   * of weight(task) (synchronous; keep it cheap).
   */
  onItems?: (done: number) => void;
  /** Cost of one replication of a task, for progress (default 1). */
  weight?: (task: EngineTask) => number;
  /** Stops the run: workers are terminated, the pool is closed and run() rejects with EngineAbortError. */
  signal?: AbortSignal;
}

interface Slot {
  worker: Worker;
  busy: boolean;
  /** Resolves when the worker has loaded its code (or rejects when it fails to). */
  ready: Promise<void>;
  /** The thread has exited (it is replaced at the next run). */
  exited: boolean;
}

export class EnginePool {
  readonly size: number;
  private slots: Slot[] = [];
  private closed = false;
  private running = false;

  constructor(threads: number = defaultThreads()) {
    if (!Number.isInteger(threads) || threads < 1 || threads > MAX_THREADS) {
      throw new RangeError(`EnginePool: threads must be a whole number from 1 to ${MAX_THREADS}; got ${threads}.`);
    }
    this.size = threads;
  }

  private spawn(): Slot {
    // Keep --conditions (the job worker runs with react-server); drop loader flags, the entry
    // registers tsx itself.
    const execArgv = process.execArgv.filter((a) => a.startsWith('--conditions='));
    const worker = new Worker(ENTRY, { execArgv });
    worker.unref();
    const ready = new Promise<void>((resolve, reject) => {
      const onMessage = (msg: WorkerResponse) => {
        if (msg.type !== 'ready') return;
        worker.off('message', onMessage);
        worker.off('error', onError);
        resolve();
      };
      const onError = (err: Error) => {
        worker.off('message', onMessage);
        reject(new Error(`An engine worker thread failed to start: ${err.message}`));
      };
      worker.on('message', onMessage);
      worker.once('error', onError);
    });
    ready.catch(() => undefined); // observed by start() or by run()'s error listener
    const slot: Slot = { worker, busy: false, ready, exited: false };
    worker.once('exit', () => {
      slot.exited = true;
    });
    return slot;
  }

  /**
   * Starts all the pool's threads and waits until each has loaded the engine code, so that later
   * runs (and their timings) do not include thread start-up. Optional: run() starts threads as
   * needed.
   */
  async start(): Promise<void> {
    if (this.closed) throw new Error('EnginePool: the pool is closed; create a new one.');
    while (this.slots.length < this.size) this.slots.push(this.spawn());
    await Promise.all(this.slots.map((s) => s.ready));
  }

  /**
   * Runs the tasks on the pool's threads and resolves with their results in task order.
   * One run at a time per pool. A task that throws in its worker rejects the run with an error of
   * the same name and message (RangeError stays RangeError) and closes the pool, as does a worker
   * that dies or an abort.
   */
  run(tasks: readonly EngineTask[], options: RunOptions = {}): Promise<EngineTaskResult[]> {
    if (this.closed) return Promise.reject(new Error('EnginePool: the pool is closed; create a new one.'));
    if (this.running) return Promise.reject(new Error('EnginePool: a run is already in progress on this pool; wait for it or use another pool.'));
    if (options.signal?.aborted) return Promise.reject(new EngineAbortError());
    if (tasks.length === 0) return Promise.resolve([]);
    this.running = true;
    // A thread that died between runs would never answer: replace it.
    this.slots = this.slots.map((slot) => (slot.exited ? this.spawn() : slot));
    while (this.slots.length < Math.min(this.size, tasks.length)) this.slots.push(this.spawn());

    return new Promise<EngineTaskResult[]>((resolve, reject) => {
      const results: (EngineTaskResult | undefined)[] = new Array(tasks.length);
      const partial = new Map<number, number>(); // task id -> items done in the unfinished task
      let next = 0;
      let finished = 0;
      let doneItems = 0;
      let settled = false;
      const listeners: (() => void)[] = [];

      const cleanup = () => {
        for (const off of listeners) off();
        listeners.length = 0;
        this.running = false;
      };
      const fail = (err: Error, terminate: boolean) => {
        if (settled) return;
        settled = true;
        cleanup();
        if (terminate) void this.close();
        reject(err);
      };
      const dispatch = (slot: Slot) => {
        if (settled) return;
        if (next >= tasks.length) {
          slot.busy = false;
          return;
        }
        const id = next++;
        slot.busy = true;
        slot.worker.postMessage({ type: 'run', id, task: tasks[id] } satisfies WorkerRequest);
      };

      for (const slot of this.slots) {
        const onMessage = (msg: WorkerResponse) => {
          if (settled || msg.type === 'ready') return;
          if (msg.type === 'progress') {
            const before = partial.get(msg.id) ?? 0;
            partial.set(msg.id, msg.done);
            doneItems += (msg.done - before) * (options.weight ? options.weight(tasks[msg.id]) : 1);
            options.onItems?.(doneItems);
          } else if (msg.type === 'done') {
            partial.delete(msg.id);
            results[msg.id] = msg.result;
            finished++;
            if (finished === tasks.length) {
              settled = true;
              for (const s of this.slots) s.busy = false;
              cleanup();
              resolve(results as EngineTaskResult[]);
            } else {
              dispatch(slot);
            }
          } else if (msg.type === 'error') {
            const ErrorClass = msg.name === 'RangeError' ? RangeError : Error;
            const err = new ErrorClass(msg.message);
            // Other workers may still be inside their slices: close the pool rather than let their
            // late answers reach a later run.
            fail(err, true);
          }
        };
        const onError = (err: Error) => fail(new Error(`An engine worker thread failed: ${err.message}`), true);
        const onExit = (code: number) => {
          if (!settled) fail(new Error(`An engine worker thread stopped unexpectedly (exit code ${code}).`), true);
        };
        slot.worker.on('message', onMessage);
        slot.worker.on('error', onError);
        slot.worker.on('exit', onExit);
        listeners.push(() => {
          slot.worker.off('message', onMessage);
          slot.worker.off('error', onError);
          slot.worker.off('exit', onExit);
        });
      }
      if (options.signal) {
        const signal = options.signal;
        const onAbort = () => fail(new EngineAbortError(), true);
        signal.addEventListener('abort', onAbort, { once: true });
        listeners.push(() => signal.removeEventListener('abort', onAbort));
      }
      for (const slot of this.slots) dispatch(slot);
    });
  }

  /** Stops every worker thread; the pool cannot be used afterwards. */
  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    const slots = this.slots;
    this.slots = [];
    await Promise.all(slots.map((s) => s.worker.terminate()));
  }

  get isClosed(): boolean {
    return this.closed;
  }
}

/** Total work of a list of tasks: replications times weight (default 1). */
export function totalItems(tasks: readonly EngineTask[], weight: (task: EngineTask) => number = () => 1): number {
  return tasks.reduce((s, t) => s + taskSize(t) * weight(t), 0);
}
