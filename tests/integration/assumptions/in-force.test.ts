/**
 * The consumer API's version in force, on MariaDB: it follows the supersession chain by publication
 * time (also for rows stored before effective dates were tied to the approval date), an answer for a
 * past date never changes once given, and the data access layer's query gives the answer of the pure
 * rule in lib/assumptions/in-force.ts on random histories written through the real lifecycle with
 * its clock.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { eq, inArray, like } from 'drizzle-orm';
import { closeDb, getDb } from '@/db/connection';
import { assumptions, assumptionVersions, mailOutbox } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import { addDays, todayIso } from '@/lib/assumptions/dates';
import { versionInForceAt } from '@/lib/assumptions/in-force';
import { overduePolicyAt } from '@/lib/assumptions/overdue-policy';
import { policyChanges } from '@/lib/dal/overdue-policy';
import { createDraft, listInForce, runScheduledTransitions, transition, versionInForce } from '@/lib/dal/assumptions';
import { createToken } from '@/lib/dal/tokens';
import { AppError } from '@/lib/errors';
import * as inForceRoute from '@/app/api/v1/assumptions/route';
import { makeUser } from '../../support/users';
import { call, draftBody, makeFitRun } from '../../support/assumptions';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));

let analyst: SessionUser;
let validator: SessionUser;
let token = '';
let counter = 0;
const DAY = 86_400_000;

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  token = (await createToken(await makeUser('admin'), { name: 'In force', scopes: ['assumptions:read'] })).token;
});
afterAll(async () => {
  // The many notifications these histories queue would crowd the outbox of the mail tests.
  const mine = await getDb()
    .select({ id: assumptionVersions.id })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(like(assumptions.segment, 'In-force segment %'));
  if (mine.length) await getDb().delete(mailOutbox).where(inArray(mailOutbox.versionId, mine.map((r) => r.id)));
  await closeDb();
});

function newSegment(): string {
  counter += 1;
  return `In-force segment ${Date.now().toString(36)}-${counter}`;
}

/** Drafts, reviews, approves and publishes a version, every step at the clock `at`. */
async function publishAt(segment: string, fitId: number, effectiveDate: string, at: Date, reviewBy?: string) {
  const v = await createDraft(analyst, draftBody(fitId, segment, { effectiveDate, ...(reviewBy ? { reviewBy } : {}) }) as never, at);
  await transition(analyst, v.id, { action: 'submit' }, at);
  await transition(validator, v.id, { action: 'start-review' }, at);
  await transition(validator, v.id, { action: 'approve', comment: 'Checked.' }, at);
  if (effectiveDate <= todayIso(at)) await transition(validator, v.id, { action: 'publish' }, at);
  return v;
}

const inForce = (segment: string, asOf?: string) =>
  call(inForceRoute.GET, {
    url: `http://127.0.0.1/api/v1/assumptions?segment=${encodeURIComponent(segment)}${asOf ? `&asOf=${asOf}` : ''}`,
    headers: { authorization: `Bearer ${token}` },
  });

describe('data stored before the effective-date rule (a version back-dated 300 days)', () => {
  it('the published version is the one in force today, and a past answer does not change', async () => {
    const segment = newSegment();
    const { fitId } = await makeFitRun(analyst.id, segment);
    const today = todayIso();
    const v1 = await publishAt(segment, fitId, today, new Date(Date.now() - 60_000));
    const past = addDays(today, -100);
    const before = await inForce(segment, past);
    expect(before.status).toBe(404);

    const v2 = await publishAt(segment, fitId, today, new Date());
    // As such a version was stored by the first build: effective 300 days before its approval.
    await getDb().update(assumptionVersions).set({ effectiveDate: addDays(today, -300) }).where(eq(assumptionVersions.id, v2.id));

    const now = await inForce(segment);
    expect(now.status).toBe(200);
    const a = now.body.assumption as { version: number; status: string };
    expect(a).toMatchObject({ version: 2, status: 'published' });
    const after = await inForce(segment, past);
    expect(after.status).toBe(404);
    expect(after.body).toEqual(before.body);
    expect(v1.version).toBe(1);
  });
});

// ---------------------------------------------------------------------------------------------
// Random histories through the real lifecycle (drafts, reviews, publication on the effective date
// by the scheduler, retirement, expiry), all in 2021-2023 with the lifecycle's clock so that the
// scheduler runs of other test files (at today) have nothing to do with them.
// ---------------------------------------------------------------------------------------------

type Asked = { asOf: string; at: Date; answer: string };

function label(p: Promise<unknown>): Promise<string> {
  return p.then(
    (v) => `v${(v as { version: number }).version}`,
    (e: unknown) => (e instanceof AppError ? e.code : `thrown ${String(e)}`),
  );
}

const codeOf: Record<string, string> = { none: 'not_found:assumption', expired: 'not_found:assumption-expired', retired: 'not_found:assumption-retired', ended: 'not_found:assumption' };

async function modelAnswer(segment: string, asOf: string, now: Date): Promise<string> {
  const rows = await getDb()
    .select({ v: assumptionVersions })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(eq(assumptions.segment, segment));
  // Under the overdue policy of the cutoff, as the consumer API reads it.
  const changes = await policyChanges(getDb());
  const a = versionInForceAt(rows.map((r) => r.v), asOf, now, (t) => overduePolicyAt(changes, t));
  return a.kind === 'in-force' ? `v${a.version.version}` : codeOf[a.kind];
}

describe('random histories (12, seeded): the query agrees with the rule, and past answers hold', () => {
  it('after every step and at the end', async () => {
    let seed = 4242;
    const next = () => (seed = (Math.imul(seed, 1103515245) + 12345) >>> 0);
    for (let h = 0; h < 12; h++) {
      const segment = newSegment();
      const { fitId } = await makeFitRun(analyst.id, segment);
      let clock = Date.parse('2021-01-01T06:00:00Z') + (next() % 200) * DAY;
      let current: { id: number; reviewBy: string } | null = null;
      const asked: Asked[] = [];
      for (let step = 0; step < 6; step++) {
        clock += (1 + (next() % 90)) * DAY + (next() % 3_600_000);
        const at = new Date(clock);
        const r = next() % 10;
        if (current && r < 2) {
          await transition(validator, current.id, { action: 'retire', comment: 'No longer used.' }, at);
          current = null;
        } else if (current && r < 4 && todayIso(at) > current.reviewBy) {
          await runScheduledTransitions(at);
          current = null;
        } else {
          const wait = next() % 3;
          const effective = addDays(todayIso(at), wait);
          const reviewBy = addDays(effective, 30 + (next() % 300));
          const v = await publishAt(segment, fitId, effective, at, reviewBy);
          if (wait > 0) {
            clock += wait * DAY;
            await runScheduledTransitions(new Date(clock));
          }
          current = { id: v.id, reviewBy };
        }
        const now = new Date(clock);
        for (let q = 0; q < 4; q++) {
          const asOf = todayIso(new Date(clock - (next() % 400) * DAY));
          const answer = await label(versionInForce({ kind: 'token', tokenId: 0, name: 'test', scopes: ['assumptions:read'], modelId: null }, segment, asOf, now));
          expect(answer, `${segment} asOf ${asOf} at ${now.toISOString()}`).toBe(await modelAnswer(segment, asOf, now));
          // every segment at once (one set of queries for all) answers each segment as the single lookup does
          const all = await listInForce({ kind: 'token', tokenId: 0, name: 'test', scopes: ['assumptions:read'], modelId: null }, asOf, now);
          const mine = all.versions.find((v) => v.segment === segment);
          if (answer.startsWith('v')) expect(mine ? `v${mine.version}` : 'not listed', `list ${segment} asOf ${asOf}`).toBe(answer);
          else expect(mine, `list ${segment} asOf ${asOf}: ${answer}`).toBeUndefined();
          if (asOf < todayIso(now)) asked.push({ asOf, at: now, answer });
        }
      }
      const end = new Date(clock + 400 * DAY);
      for (const q of asked) {
        const later = await label(versionInForce({ kind: 'token', tokenId: 0, name: 'test', scopes: ['assumptions:read'], modelId: null }, segment, q.asOf, end));
        expect(later, `${segment} asOf ${q.asOf}, first asked at ${q.at.toISOString()}`).toBe(q.answer);
      }
    }
  });
});
