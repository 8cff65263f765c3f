/**
 * The consumer API keeps its in-force answers while nothing they are built from changes
 * (lib/dal/answer-cache.ts), by the change stamp of the watched tables (lib/dal/change-stamp.ts,
 * db/migrations/0021). A wrong value in force is the worst thing the product can do, so these
 * tests check that the stamp moves with every write an answer could read and with nothing else,
 * that the tables the answers read are exactly the watched ones, that pruning never changes the
 * stamp or waits for a writer, and, on a seeded random history, that every answer the route serves
 * equals the one built afresh from the database at that moment.
 */
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import mysql from 'mysql2/promise';
import { eq, sql } from 'drizzle-orm';
import { closeDb, getDb, getPool } from '@/db/connection';
import { apiTokens, consumerChanges, datasets, users } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import { addDays, todayIso } from '@/lib/assumptions/dates';
import { cautions, cautionsFor, toConsumerVersion } from '@/lib/assumptions/consumer';
import { env } from '@/lib/env';
import { AppError } from '@/lib/errors';
import { answerCacheStats, cachedAnswer, clearAnswerCache } from '@/lib/dal/answer-cache';
import { createDraft, listInForce, transition, versionInForce } from '@/lib/dal/assumptions';
import { changeStamp, COVERED_TABLES, pruneChangeCounts, renewEpoch, WATCHED_TABLES } from '@/lib/dal/change-stamp';
import { getOverduePolicy, setOverduePolicy } from '@/lib/dal/overdue-policy';
import { authenticateToken, createToken } from '@/lib/dal/tokens';
import * as inForceRoute from '@/app/api/v1/assumptions/route';
import { makeUser } from '../../support/users';
import { call, draftBody, makeFitRun } from '../../support/assumptions';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));

let analyst: SessionUser;
let validator: SessionUser;
let admin: SessionUser;
let token: string;
const tag = Date.now().toString(36);
const segment = `Cached segment ${tag}`;
const today = todayIso();
const consumer = { kind: 'token' as const, tokenId: 0, name: 'test', scopes: ['assumptions:read' as const], modelId: null };

const bearer = () => ({ authorization: `Bearer ${token}` });
const inForce = (query: string) => call(inForceRoute.GET, { url: `http://127.0.0.1/api/v1/assumptions?${query}`, headers: bearer() });
const total = async () => Number((await changeStamp(getDb())).split(':')[1]);

/** Drafts, reviews and publishes a version of `seg` effective today (published now). */
async function publish(seg: string, rho: number) {
  const { fitId, datasetId } = await makeFitRun(analyst.id, seg, { rho, pd: 0.0133, profile: { level: 0.95, lower: rho / 3, upper: rho * 3 } });
  const v = await createDraft(analyst, draftBody(fitId, seg, { effectiveDate: today }) as never);
  await transition(analyst, v.id, { action: 'submit' });
  await transition(validator, v.id, { action: 'start-review' });
  await transition(validator, v.id, { action: 'approve', comment: 'Fine.' });
  await transition(validator, v.id, { action: 'publish' });
  return { ...v, datasetId };
}

/** What the route must answer now, built afresh from the database (no cache): status and JSON text. */
async function fresh(seg: string | null, asOf: string): Promise<{ status: number; text: string }> {
  const now = new Date();
  try {
    if (seg) {
      const c = toConsumerVersion(await versionInForce(consumer, seg, asOf, now));
      return { status: 200, text: JSON.stringify({ asOf, assumption: c, cautions: cautionsFor(c) }) };
    }
    const { versions, missing } = await listInForce(consumer, asOf, now);
    return { status: 200, text: JSON.stringify({ asOf, assumptions: versions.map(toConsumerVersion), missing, cautions }) };
  } catch (err) {
    if (err instanceof AppError) return { status: err.status, text: JSON.stringify(err.toJSON()) };
    throw err;
  }
}

/** Sets the institution's overdue policy (a change is refused when it is already that policy). */
async function setPolicy(policy: 'flag' | 'withdraw'): Promise<boolean> {
  if ((await getOverduePolicy(admin)).current === policy) return false;
  await setOverduePolicy(admin, { policy, reason: 'Answer cache test.' });
  return true;
}

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  admin = await makeUser('admin');
  token = (await createToken(admin, { name: `Cache test ${tag}`, scopes: ['assumptions:read'] })).token;
});
afterEach(() => {
  vi.useRealTimers();
});
afterAll(async () => {
  await setPolicy('flag'); // the default, for the tests after these
  await closeDb();
});

describe('the change stamp', () => {
  it('has a trigger for every write to each watched table, and none elsewhere', async () => {
    const [rows] = await getPool().query<mysql.RowDataPacket[]>(
      `SELECT event_object_table AS t, action_timing AS timing, event_manipulation AS event FROM information_schema.triggers WHERE trigger_schema = DATABASE() AND trigger_name LIKE '%consumer_change%'`,
    );
    const got = rows.map((r) => `${r.t} ${r.timing} ${r.event}`).sort();
    const want = WATCHED_TABLES.flatMap((t) => ['INSERT', 'UPDATE', 'DELETE'].map((e) => `${t} AFTER ${e}`)).sort();
    expect(got).toEqual(want);
  });

  it('counts every row written to a watched table, one by one, and nothing written elsewhere', async () => {
    const db = getDb();
    const [u] = await db.select().from(users).where(eq(users.id, analyst.id));
    let before = await total();
    // one row of each watched table changed (through SQL: the triggers, not the DAL, must catch it)
    await db.update(users).set({ name: `${u.name}.` }).where(eq(users.id, analyst.id));
    expect(await total()).toBe(before + 1);
    const { datasetId } = await makeFitRun(analyst.id, `${segment} stamp`); // one dataset row
    expect(await total()).toBe(before + 2);
    await db.update(datasets).set({ description: 'changed' }).where(eq(datasets.id, datasetId));
    expect(await total()).toBe(before + 3);
    await db.execute(sql`INSERT INTO segments (name) VALUES (${`Stamp segment ${tag}`})`);
    await db.execute(sql`UPDATE segments SET description = 'x' WHERE name = ${`Stamp segment ${tag}`}`);
    await db.execute(sql`DELETE FROM segments WHERE name = ${`Stamp segment ${tag}`}`);
    expect(await total()).toBe(before + 6);
    const current = (await getOverduePolicy(admin)).current;
    await setPolicy(current === 'flag' ? 'withdraw' : 'flag'); // one policy row (and the administration log, not watched)
    expect(await total()).toBe(before + 7);
    // a multi-row statement counts each row
    await db.execute(sql`UPDATE users SET updated_at = DATE_ADD(updated_at, INTERVAL 1 SECOND) WHERE id IN (${analyst.id}, ${validator.id})`);
    expect(await total()).toBe(before + 9);
    before += 9;
    // writes the answers never read: the token's last use, the job queue, the mail outbox
    await db.update(apiTokens).set({ lastUsedAt: new Date() }).where(eq(apiTokens.name, `Cache test ${tag}`));
    await db.execute(sql`INSERT INTO worker_heartbeats (worker_id, pid, host, started_at, last_beat_at) VALUES (${`stamp-${tag}`}, 1, 'test', NOW(3), NOW(3))`);
    expect(await total()).toBe(before);
  });

  it('is read with the token in the same statement, and equals the stamp read alone', async () => {
    const p = await authenticateToken(`Bearer ${token}`, 'assumptions:read');
    expect(p.stamp).toBe(await changeStamp(getDb()));
    expect(p.stamp).toMatch(/^[0-9a-f-]{36}:\d+$/);
  });

  it('does not change when idle counts are pruned, and pruning skips a writer in flight instead of waiting for it', async () => {
    const db = getDb();
    const e = env();
    const other = await mysql.createConnection({ host: e.DB_HOST, port: e.DB_PORT, user: e.DB_USER, password: e.DB_PASSWORD, database: e.DB_NAME });
    try {
      // Rows of connections that wrote and left (as after a day of pool churn): enough for a
      // delete by a list of them to scan the table rather than look each one up.
      for (let i = 0; i < 12; i++) {
        const c = await mysql.createConnection({ host: e.DB_HOST, port: e.DB_PORT, user: e.DB_USER, password: e.DB_PASSWORD, database: e.DB_NAME });
        await c.query('UPDATE users SET updated_at = NOW(3) WHERE id = ?', [validator.id]);
        await c.end();
      }
      const s0 = await changeStamp(db);
      // A writer on another connection, its transaction open (its count row locked or not yet committed).
      await other.beginTransaction();
      await other.query('UPDATE users SET name = CONCAT(name, ?) WHERE id = ?', ['!', validator.id]);
      const started = Date.now();
      const folded = await pruneChangeCounts(db, new Date(Date.now() + 60_000));
      expect(Date.now() - started).toBeLessThan(5_000); // did not wait for the writer (innodb_lock_wait_timeout is 50 s)
      expect(folded).toBeGreaterThan(0);
      expect(await changeStamp(db)).toBe(s0); // the uncommitted write is not seen, and folding kept the sum
      await other.commit();
      expect(await total()).toBe(Number(s0.split(':')[1]) + 1); // the writer's row counted once, not lost
      // Everything folded now: one row at most (this test's pool connection wrote nothing since).
      await pruneChangeCounts(db, new Date(Date.now() + 60_000));
      expect(await db.select().from(consumerChanges)).toEqual([]);
      expect(await total()).toBe(Number(s0.split(':')[1]) + 1);
    } finally {
      await other.end();
    }
  });

  it('a new epoch (a restore) matches no earlier stamp', async () => {
    const s0 = await changeStamp(getDb());
    await renewEpoch(getDb());
    const s1 = await changeStamp(getDb());
    expect(s1.split(':')[0]).not.toBe(s0.split(':')[0]);
    expect(s1).not.toBe(s0);
  });
});

describe('the tables an in-force answer reads', () => {
  it('are all watched (or written only with a watched one)', async () => {
    const v = await publish(`${segment} tables`, 0.05);
    const pool = getPool();
    const seen: string[] = [];
    const original = pool.query.bind(pool) as (...a: unknown[]) => unknown;
    const spy = vi.spyOn(pool, 'query').mockImplementation(((...args: unknown[]) => {
      const q = args[0] as string | { sql: string };
      seen.push(typeof q === 'string' ? q : q.sql);
      return original(...args);
    }) as never);
    try {
      await versionInForce(consumer, `${segment} tables`, today);
      await versionInForce(consumer, `${segment} tables`, addDays(today, -30)).catch(() => undefined);
      await listInForce(consumer, today);
    } finally {
      spy.mockRestore();
    }
    expect(v.datasetId).toBeGreaterThan(0);
    const tables = new Set<string>();
    for (const text of seen) for (const m of text.matchAll(/\b(?:from|join)\s+`([a-z_]+)`/gi)) tables.add(m[1]);
    // the evidence reads ran (the version has a dataset): datasets and the later cohort rows
    expect([...tables]).toEqual(expect.arrayContaining(['assumption_versions', 'assumptions', 'users', 'overdue_policy_changes', 'datasets', 'cohort_rows', 'segments', 'evidence_backtests']));
    const allowed = new Set<string>([...WATCHED_TABLES, ...Object.keys(COVERED_TABLES)]);
    expect([...tables].filter((t) => !allowed.has(t))).toEqual([]);
  });
});

describe('the route serves a kept answer only while nothing it read has changed', () => {
  it('keeps, then rebuilds after a publication, a policy change, a renamed approver and a superseded dataset', async () => {
    clearAnswerCache();
    const seg = `${segment} route`;
    const q = `segment=${encodeURIComponent(seg)}`;
    // Nothing published yet: a 404, kept like an answer.
    expect((await inForce(q)).status).toBe(404);
    expect((await inForce(q)).status).toBe(404);
    expect(answerCacheStats).toEqual({ hits: 1, misses: 1 });

    const v1 = await publish(seg, 0.04);
    let a = await inForce(q);
    expect(a.status).toBe(200);
    expect((a.body.assumption as { version: number }).version).toBe(1);
    const again = await inForce(q);
    expect(again.text).toBe(a.text);
    expect(answerCacheStats).toEqual({ hits: 2, misses: 2 });

    const v2 = await publish(seg, 0.06);
    a = await inForce(q);
    expect((a.body.assumption as { version: number }).version).toBe(2);

    // The approver's name is part of the answer.
    await getDb().update(users).set({ name: `Renamed validator ${tag}` }).where(eq(users.id, validator.id));
    a = await inForce(q);
    expect((a.body.assumption as { approvedBy: string }).approvedBy).toBe(`Renamed validator ${tag}`);

    // A projection past the review-by date: flagged under flag, withdrawn under withdraw.
    const far = `${q}&asOf=${addDays(today, 800)}`;
    await setPolicy('flag');
    expect((await inForce(far)).status).toBe(200);
    await setPolicy('withdraw');
    expect((await inForce(far)).status).toBe(404);
    await setPolicy('flag');
    expect((await inForce(far)).status).toBe(200);

    // The version's dataset superseded by a newer upload: the evidence says so at once.
    expect((a.body.assumption as { evidence: { superseded: boolean } }).evidence.superseded).toBe(false);
    const { datasetId: newer } = await makeFitRun(analyst.id, `${seg} newer`);
    await getDb().update(datasets).set({ supersededById: newer }).where(eq(datasets.id, v2.datasetId));
    a = await inForce(q);
    expect((a.body.assumption as { evidence: { superseded: boolean } }).evidence.superseded).toBe(true);

    // Retired: no longer in force today; the past answer (version 1's day is today too) follows the rule.
    await transition(validator, v2.id, { action: 'retire', comment: 'Cache test.' });
    a = await inForce(q);
    expect(a.status).toBe(404);
    expect(a.body.code).toBe('not_found:assumption-retired');
    expect(v1.id).toBeGreaterThan(0);
  });

  it('rebuilds an answer about today at least once a minute even when nothing changed', async () => {
    clearAnswerCache();
    const q = `segment=${encodeURIComponent(`${segment} route`)}`;
    await inForce(q);
    await inForce(q);
    expect(answerCacheStats).toEqual({ hits: 1, misses: 1 });
    vi.useFakeTimers({ toFake: ['Date'] });
    vi.setSystemTime(Date.now() + 61_000);
    await inForce(q);
    expect(answerCacheStats).toEqual({ hits: 1, misses: 2 });
  });

  it('keeps a database failure out (it is not an answer) and holds at most 2,000 answers', async () => {
    clearAnswerCache();
    await expect(cachedAnswer('boom', today, async () => Promise.reject(new Error('database went away')), 'e:1')).rejects.toThrow('database went away');
    expect(await cachedAnswer('boom', today, async () => 'built', 'e:1')).toBe('built');
    for (let i = 0; i < 2_001; i++) await cachedAnswer(`k${i}`, '2020-01-01', async () => i, 'e:1');
    clearAnswerCache();
    for (let i = 0; i < 2_001; i++) await cachedAnswer(`k${i}`, '2020-01-01', async () => i, 'e:1');
    expect(answerCacheStats.misses).toBe(2_001);
    await cachedAnswer('k2000', '2020-01-01', async () => -1, 'e:1'); // the newest is kept
    expect(answerCacheStats.hits).toBe(1);
    expect(await cachedAnswer('k0', '2020-01-01', async () => -1, 'e:1')).toBe(-1); // the oldest was dropped
    expect(await cachedAnswer('k5', '2020-01-01', async () => -1, 'e:2')).toBe(-1); // another stamp: rebuilt
  });
});

describe('a seeded random history: every answer served equals the one built afresh', () => {
  it('after each of 24 steps, for today, a past date, a projection and the whole library', async () => {
    clearAnswerCache();
    let seed = 20261204;
    const next = () => (seed = (Math.imul(seed, 1103515245) + 12345) >>> 0);
    const segs = [`${segment} random A`, `${segment} random B`];
    const published = new Map<string, number>(); // segment -> id of its version in force (if any)
    const dates = [today, addDays(today, -3), addDays(today, 500)];
    for (let step = 0; step < 24; step++) {
      const seg = segs[next() % segs.length];
      switch (next() % 6) {
        case 0:
        case 1: {
          const v = await publish(seg, 0.02 + (next() % 50) / 1000);
          published.set(seg, v.id);
          break;
        }
        case 2:
          if (published.has(seg)) {
            await transition(validator, published.get(seg)!, { action: 'retire', comment: 'Random history.' });
            published.delete(seg);
          }
          break;
        case 3:
          await setPolicy(next() % 2 ? 'flag' : 'withdraw');
          break;
        case 4:
          await getDb().update(users).set({ name: `Validator ${tag} ${step}` }).where(eq(users.id, validator.id));
          break;
        case 5:
          // a write the answers do not read: nothing may change, and kept answers stay valid
          await getDb().update(apiTokens).set({ lastUsedAt: new Date() }).where(eq(apiTokens.name, `Cache test ${tag}`));
          break;
      }
      for (const s of [...segs, null]) {
        for (const asOf of dates) {
          if (s === null && asOf !== today) continue;
          const query = `${s ? `segment=${encodeURIComponent(s)}&` : ''}asOf=${asOf}`;
          // twice: the second is served from the cache when nothing changed
          for (let k = 0; k < 2; k++) {
            const served = await inForce(query);
            const want = await fresh(s, asOf);
            expect({ step, query, status: served.status, text: served.text }).toEqual({ step, query, status: want.status, text: want.text });
          }
        }
      }
    }
    expect(answerCacheStats.hits).toBeGreaterThan(100);
  }, 120_000);
});
