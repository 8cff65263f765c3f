import { desc, eq, isNull, sql } from 'drizzle-orm';
import type { Db } from '@/db/connection';
import { workerHeartbeats } from '@/db/schema';

/** Writes (or refreshes) this worker's heartbeat row. */
export async function beat(db: Db, w: { workerId: string; host: string; pid: number; startedAt: Date }): Promise<void> {
  await db
    .insert(workerHeartbeats)
    .values({ ...w, lastBeatAt: new Date(), stoppedAt: null })
    .onDuplicateKeyUpdate({ set: { lastBeatAt: sql`CURRENT_TIMESTAMP(3)`, stoppedAt: null } });
}

/** Marks the worker as stopped (clean shutdown). */
export async function markStopped(db: Db, workerId: string): Promise<void> {
  await db.update(workerHeartbeats).set({ stoppedAt: new Date() }).where(eq(workerHeartbeats.workerId, workerId));
}

/** The most recent heartbeat of any running worker, or null when none has ever beaten. */
export async function latestHeartbeat(db: Db): Promise<{ workerId: string; lastBeatAt: Date } | null> {
  const [row] = await db
    .select({ workerId: workerHeartbeats.workerId, lastBeatAt: workerHeartbeats.lastBeatAt })
    .from(workerHeartbeats)
    .where(isNull(workerHeartbeats.stoppedAt))
    .orderBy(desc(workerHeartbeats.lastBeatAt))
    .limit(1);
  return row ?? null;
}
