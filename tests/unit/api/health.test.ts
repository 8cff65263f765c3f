import { describe, expect, it, vi } from 'vitest';

// The database is down: every query rejects as mysql2 does when the server does not answer.
vi.mock('@/db/client', () => ({
  getDb: () => ({
    execute: () => Promise.reject(new Error('connect ECONNREFUSED 127.0.0.1:3307')),
    select: () => {
      throw new Error('not reached');
    },
  }),
}));

describe('GET /api/health when the database is down', () => {
  it('answers 503 naming the failing part, without leaking the driver error', async () => {
    const { GET } = await import('@/app/api/health/route');
    const res = await GET();
    expect(res.status).toBe(503);
    const body = await res.json();
    expect(body).toMatchObject({ status: 'down', db: 'down', worker: { lastHeartbeat: null } });
    expect(body.error).toBe('The database does not answer.');
    expect(JSON.stringify(body)).not.toMatch(/ECONNREFUSED/);
  });
});
