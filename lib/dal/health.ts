import 'server-only';
import { sql } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { env } from '@/lib/env';
import { latestHeartbeat } from '@/lib/jobs/heartbeat';

export type Health = {
  status: 'ok' | 'degraded' | 'down';
  db: 'ok' | 'down';
  worker: { lastHeartbeat: string | null; stale: boolean };
  error?: string;
};

/** Health for /api/health: public, so it says what is failing but nothing about the data. */
export async function getHealth(): Promise<Health> {
  const db = getDb();
  try {
    await db.execute(sql`SELECT 1`);
  } catch {
    return { status: 'down', db: 'down', worker: { lastHeartbeat: null, stale: true }, error: 'The database does not answer.' };
  }
  const hb = await latestHeartbeat(db);
  const stale = !hb || Date.now() - hb.lastBeatAt.getTime() > env().WORKER_STALE_SECONDS * 1000;
  return {
    status: stale ? 'degraded' : 'ok',
    db: 'ok',
    worker: { lastHeartbeat: hb ? hb.lastBeatAt.toISOString() : null, stale },
  };
}
