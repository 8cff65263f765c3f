/**
 * The Rhobook worker process: connects to MariaDB, writes a heartbeat that /api/health reports,
 * and runs the job loop (lib/jobs). Several workers may run side by side, on one machine or many.
 * SIGINT/SIGTERM stop it cleanly: the current job finishes or its lease lapses for another worker.
 *
 *   npm run worker           (started by `npm start` beside the web app)
 */
import os from 'node:os';
import { randomUUID } from 'node:crypto';
import { closeDb, getDb } from '@/db/connection';
import { beat, markStopped } from '@/lib/jobs/heartbeat';
import { runJobLoop } from './job-loop';
import { runMailLoop } from './mail-loop';
import { runScheduler } from './scheduler';

const HEARTBEAT_MS = 5_000;

async function main() {
  const db = getDb();
  const identity = {
    workerId: `${os.hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`,
    host: os.hostname(),
    pid: process.pid,
    startedAt: new Date(),
  };
  await beat(db, identity);
  console.log(`[worker] ${identity.workerId} connected; heartbeat every ${HEARTBEAT_MS / 1000} s`);

  const controller = new AbortController();
  const timer = setInterval(() => {
    beat(db, identity).catch((err) => console.error('[worker] heartbeat failed:', err instanceof Error ? err.message : err));
  }, HEARTBEAT_MS);

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`[worker] ${signal}: stopping`);
    controller.abort();
  };
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGTERM', () => void stop('SIGTERM'));

  try {
    await Promise.all([
      runJobLoop({ db, workerId: identity.workerId, signal: controller.signal }),
      runMailLoop({ db, signal: controller.signal }),
      runScheduler({ db, signal: controller.signal }),
    ]);
  } finally {
    clearInterval(timer);
    await markStopped(db, identity.workerId).catch(() => undefined);
    await closeDb();
    console.log('[worker] stopped');
  }
}

main().catch(async (err) => {
  console.error('[worker] fatal:', err instanceof Error ? err.stack : err);
  await closeDb().catch(() => undefined);
  process.exit(1);
});
