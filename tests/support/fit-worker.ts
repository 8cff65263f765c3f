/**
 * A real worker process for the reliability tests: the production job loop (workers/job-loop.ts)
 * with a short lease so that a killed worker's job is taken over within seconds. Prints one line
 * per event; the tests parse "job N (fit) succeeded" lines to count executions.
 *
 *   DB_NAME=rhobook_x_test WORKER_ID=w1 LEASE_MS=3000 node --conditions=react-server --import tsx tests/support/fit-worker.ts
 *   (with the server conditions, as npm run worker: the DAL imports server-only)
 */
import { closeDb, getDb } from '@/db/connection';
import { runJobLoop } from '@/workers/job-loop';

const controller = new AbortController();
process.on('SIGTERM', () => controller.abort());
process.on('SIGINT', () => controller.abort());

const workerId = process.env.WORKER_ID ?? `test-${process.pid}`;
console.log(`ready ${workerId}`);
runJobLoop({
  db: getDb(),
  workerId,
  signal: controller.signal,
  leaseMs: Number(process.env.LEASE_MS ?? 3000),
  idleMs: 100,
  kinds: ['fit'],
  log: (m) => console.log(m),
})
  .then(() => closeDb())
  .catch(async (err) => {
    console.error(err);
    await closeDb();
    process.exit(1);
  });
