import { afterAll, describe, expect, it } from 'vitest';
import os from 'node:os';
import { closeDb, getDb } from '@/db/connection';
import { beat, latestHeartbeat, markStopped } from '@/lib/jobs/heartbeat';
import { getHealth } from '@/lib/dal/health';

afterAll(async () => {
  await closeDb();
});

describe('health and worker heartbeat', () => {
  it('reports the database up and the latest heartbeat of a running worker', async () => {
    const w = { workerId: `test:${process.pid}`, host: os.hostname(), pid: process.pid, startedAt: new Date() };
    await beat(getDb(), w);
    const h = await getHealth();
    expect(h.db).toBe('ok');
    expect(h.worker.lastHeartbeat).not.toBeNull();
    expect(h.worker.stale).toBe(false);
    expect(Date.now() - Date.parse(h.worker.lastHeartbeat!)).toBeLessThan(60_000);
    await markStopped(getDb(), w.workerId);
    const after = await latestHeartbeat(getDb());
    expect(after?.workerId).not.toBe(w.workerId);
  });
});
