import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { closeDb, getDb } from '@/db/connection';
import { assumptionVersions, mailOutbox, overduePolicyChanges } from '@/db/schema';
import { addDays, todayIso } from '@/lib/assumptions/dates';
import { createDraft, runScheduledTransitions, transition } from '@/lib/dal/assumptions';
import { getOverduePolicy, setOverduePolicy } from '@/lib/dal/overdue-policy';
import { createToken } from '@/lib/dal/tokens';
import * as inForceRoute from '@/app/api/v1/assumptions/route';
import * as policyRoute from '@/app/api/admin/overdue-policy/route';
import { makeUser } from '../../support/users';
import { call, draftBody, makeFitRun, type SessionUser } from '../../support/assumptions';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session } from '../../support/mock-session';

// A value past its review-by date: kept readable and flagged (the default), or withdrawn, by the
// administrators' policy; the consumer API says which, and the validators and administrators are
// told once. The policy's changes are kept so that an answer for a past date never changes.
let analyst: SessionUser;
let validator: SessionUser;
let admin: SessionUser;
let token: string;
const today = todayIso();
const segment = `Overdue segment ${Date.now().toString(36)}`;
let versionId = 0;

const inForce = (query: string) =>
  call(inForceRoute.GET, { url: `http://127.0.0.1/api/v1/assumptions?segment=${encodeURIComponent(segment)}${query}`, headers: { authorization: `Bearer ${token}` } });

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  admin = await makeUser('admin');
  token = (await createToken(admin, { name: 'Overdue test', scopes: ['assumptions:read'] })).token;
  // Published 40 days ago (its whole loop that day), due for review 5 days ago.
  const effective = addDays(today, -40);
  const at = new Date(`${effective}T09:00:00Z`);
  const { fitId } = await makeFitRun(analyst.id, segment);
  const v = await createDraft(analyst, draftBody(fitId, segment, { effectiveDate: effective, reviewBy: addDays(today, -5) }) as never, at);
  await transition(analyst, v.id, { action: 'submit' }, at);
  await transition(validator, v.id, { action: 'start-review' }, at);
  await transition(validator, v.id, { action: 'approve', comment: 'Checked.' }, at);
  await transition(validator, v.id, { action: 'publish' }, at);
  versionId = v.id;
});
afterAll(async () => {
  // Leave the default behaviour for the test files after this one.
  if ((await getOverduePolicy(admin)).current !== 'flag') await setOverduePolicy(admin, { policy: 'flag', reason: 'Back to the default after the test.' });
  await closeDb();
});

const escalations = (kind: string) => getDb().select().from(mailOutbox).where(and(eq(mailOutbox.versionId, versionId), eq(mailOutbox.kind, kind)));

describe('the overdue policy', () => {
  it('by default (flag): the value stays served past review-by, flagged overdue with a caution; escalated once to validators and administrators', async () => {
    expect((await getOverduePolicy(admin)).current).toBe('flag');
    const report = await runScheduledTransitions(new Date());
    await runScheduledTransitions(new Date());
    expect(report.overdue).toContain(versionId);
    expect(report.expired).not.toContain(versionId);
    const [row] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, versionId));
    expect(row.status).toBe('published');
    const mails = await escalations('review-overdue');
    expect(mails.map((m) => m.toAddress)).toEqual(expect.arrayContaining([validator.email, admin.email]));
    expect(mails.map((m) => m.toAddress)).not.toContain(analyst.email);
    expect(mails.filter((m) => m.toAddress === admin.email)).toHaveLength(1);

    const res = await inForce('');
    expect(res.status).toBe(200);
    const a = res.body.assumption as { review: { overdue: boolean; policy: string }; cautions: string[] };
    expect(a.review).toMatchObject({ overdue: true, policy: 'flag' });
    expect((res.body.cautions as string[]).some((c) => c.startsWith(`This value is past its review-by date (${addDays(today, -5)})`))).toBe(true);
    // Before its review-by date it was not overdue.
    const earlier = await inForce(`&asOf=${addDays(today, -10)}`);
    expect((earlier.body.assumption as { review: { overdue: boolean } }).review.overdue).toBe(false);
  });

  it('only administrators set it, with a reason; the change is kept and logged', async () => {
    session.user = validator;
    let res = await call(policyRoute.POST, { body: { policy: 'withdraw', reason: 'Our policy withdraws overdue values.' } });
    expect(res.status).toBe(403);
    session.user = admin;
    res = await call(policyRoute.POST, { body: { policy: 'withdraw', reason: 'short' } });
    expect(res.status).toBe(422);
    expect(res.body.field).toBe('reason');
    res = await call(policyRoute.POST, { body: { policy: 'flag', reason: 'Already the default, should be refused.' } });
    expect(res.status).toBe(409);
    session.user = null;
  });

  it('withdraw: the scheduler expires it and escalates; the API answers 404 naming the policy; an answer for a day under the old policy does not change', async () => {
    const pastDay = addDays(today, -2);
    const before = await inForce(`&asOf=${pastDay}`);
    expect(before.status).toBe(200);

    await setOverduePolicy(admin, { policy: 'withdraw', reason: 'The model-risk policy withdraws values past review.' }, new Date());
    const report = await runScheduledTransitions(new Date(Date.now() + 1000));
    expect(report.expired).toContain(versionId);
    const [row] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, versionId));
    expect(row.status).toBe('expired');
    const mails = await escalations('review-withdrawn');
    expect(mails.map((m) => m.toAddress)).toEqual(expect.arrayContaining([validator.email, admin.email]));
    expect(mails[0].subject).toMatch(/^Withdrawn past review-by: /);

    const now = await inForce('');
    expect(now.status).toBe(404);
    expect(now.body.code).toBe('not_found:assumption-expired');
    expect(now.body.policy).toBe('withdraw');
    expect(now.body.message).toMatch(/withdrawn under the institution's overdue policy/);

    // The same version, value and review state as answered before the change (its status and end
    // time are as of now: the version has ended since).
    const after = await inForce(`&asOf=${pastDay}`);
    expect(after.status).toBe(200);
    const pick = (b: Record<string, unknown>) => {
      const x = b.assumption as { version: number; value: number; review: unknown; cautions: string[] };
      return { version: x.version, value: x.value, review: x.review, cautions: x.cautions };
    };
    expect(pick(after.body)).toEqual(pick(before.body));
    expect(pick(after.body).review).toMatchObject({ overdue: true, policy: 'flag' });
  });

  it('the history of the policy is append-only in the database', async () => {
    const reason = (p: Promise<unknown>) =>
      p.then(
        () => 'succeeded',
        (e: Error & { cause?: Error }) => `${e.message} ${e.cause?.message ?? ''}`,
      );
    expect(await reason(getDb().update(overduePolicyChanges).set({ policy: 'flag' }))).toMatch(/append-only/);
    expect(await reason(getDb().delete(overduePolicyChanges))).toMatch(/append-only/);
  });
});
