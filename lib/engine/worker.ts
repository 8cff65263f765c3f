/**
 * Body of an engine worker thread: runs tasks posted by the pool (pool.ts) and posts back
 * progress after every replication and the result (or the error) at the end. Loaded through
 * worker-entry.mjs, which registers tsx first so that this TypeScript file runs under plain node,
 * tsx and vitest alike.
 */
import { parentPort } from 'node:worker_threads';
import { runTask, type EngineTask } from './tasks';

export type WorkerRequest = { type: 'run'; id: number; task: EngineTask };
export type WorkerResponse =
  | { type: 'ready' }
  | { type: 'progress'; id: number; done: number }
  | { type: 'done'; id: number; result: ReturnType<typeof runTask> }
  | { type: 'error'; id: number; name: string; message: string };

if (!parentPort) throw new Error('lib/engine/worker.ts must run in a worker thread (started by lib/engine/pool.ts).');
const port = parentPort;

port.on('message', (request: WorkerRequest) => {
  if (request.type !== 'run') return;
  const { id, task } = request;
  try {
    let done = 0;
    const result = runTask(task, () => {
      done++;
      port.postMessage({ type: 'progress', id, done } satisfies WorkerResponse);
    });
    port.postMessage({ type: 'done', id, result } satisfies WorkerResponse);
  } catch (err) {
    const e = err instanceof Error ? err : new Error(String(err));
    port.postMessage({ type: 'error', id, name: e.name, message: e.message } satisfies WorkerResponse);
  }
});
port.postMessage({ type: 'ready' } satisfies WorkerResponse);
