import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest';
import { and, asc, eq, isNull } from 'drizzle-orm';
import { closeDb, getDb } from '@/db/connection';
import { assumptionAudit, assumptionReviews, assumptionVersions, mailOutbox, users, workerHeartbeats } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import { contentHash } from '@/lib/assumptions/content';
import { todayIso } from '@/lib/assumptions/dates';
import { createDraft, getVersionPage, runScheduledTransitions, transition } from '@/lib/dal/assumptions';
import { beat, markStopped } from '@/lib/jobs/heartbeat';
import * as draftRoute from '@/app/api/assumptions/route';
import * as versionRoute from '@/app/api/assumptions/[id]/route';
import * as transitionRoute from '@/app/api/assumptions/[id]/transitions/route';
import * as auditRoute from '@/app/api/assumptions/[id]/audit/route';
import { makeUser } from '../../support/users';
import { call, draftBody, makeFitRun, PANEL_A_FIT, type ApiAnswer } from '../../support/assumptions';

// The route handlers run for real against MariaDB; only next-auth's session lookup is replaced by
// the user each test signs in as.
vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session } from '../../support/mock-session';

let analyst: SessionUser;
let analyst2: SessionUser;
let validator: SessionUser;
let validator2: SessionUser;
let viewer: SessionUser;
let admin: SessionUser;

beforeAll(async () => {
  analyst = await makeUser('analyst');
  analyst2 = await makeUser('analyst');
  validator = await makeUser('validator');
  validator2 = await makeUser('validator');
  viewer = await makeUser('viewer');
  admin = await makeUser('admin');
});
beforeEach(() => {
  session.user = null;
});
afterAll(async () => {
  await closeDb();
});

let segCounter = 0;
function newSegment() {
  segCounter += 1;
  return `Lifecycle segment ${Date.now().toString(36)}-${segCounter}`;
}

async function as(user: SessionUser | null, fn: () => Promise<ApiAnswer>) {
  session.user = user;
  try {
    return await fn();
  } finally {
    session.user = null;
  }
}

const draft = (user: SessionUser, body: unknown) => as(user, () => call(draftRoute.POST, { body }));
const act = (user: SessionUser, id: number, action: string, comment?: string) =>
  as(user, () => call(transitionRoute.POST, { body: { action, comment }, params: { id: String(id) } }));
const edit = (user: SessionUser, id: number, body: unknown) =>
  as(user, () => call(versionRoute.PATCH, { method: 'PATCH', body, params: { id: String(id) } }));

async function auditOf(versionId: number) {
  return getDb().select().from(assumptionAudit).where(eq(assumptionAudit.versionId, versionId)).orderBy(asc(assumptionAudit.id));
}
async function statusOf(versionId: number) {
  const [v] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, versionId));
  return v.status;
}

async function newDraft(maker = analyst, over: Record<string, unknown> = {}) {
  const segment = newSegment();
  const { fitId } = await makeFitRun(maker.id, segment);
  const res = await draft(maker, draftBody(fitId, segment, over));
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return { id: res.body.id as number, segment, fitId };
}

describe('drafting', () => {
  it('an analyst drafts from a fit: 201 with the id; the evidence is copied and frozen; the audit has a draft row', async () => {
    const segment = newSegment();
    const { fitId, datasetId, sha256 } = await makeFitRun(analyst.id, segment);
    const res = await draft(analyst, draftBody(fitId, segment));
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ status: 'draft', version: 1 });
    const [v] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, res.body.id as number));
    expect(v).toMatchObject({
      fitRunId: fitId,
      datasetId,
      datasetSha256: sha256,
      engineVersion: 'test-engine-1',
      seeds: { bootstrap: 7, audit: 11 },
      estimator: 'binomialMle',
      estimate: PANEL_A_FIT.rho,
      pd: PANEL_A_FIT.pd,
      intervalMethod: 'profile',
      intervalLevel: 0.95,
      intervalLower: PANEL_A_FIT.profile.lower,
      intervalUpper: PANEL_A_FIT.profile.upper,
      windowFrom: '2010',
      windowTo: '2019',
      authorId: analyst.id,
    });
    // 0.037091 + 0.01 + 0 + 0.02, by hand.
    expect(v.conservativeValue).toBe(0.067091);
    expect(v.finalValue).toBe(0.067091);
    // Review-by defaults to twelve months after the effective date.
    const eff = new Date(`${v.effectiveDate}T00:00:00Z`);
    expect(v.reviewBy.slice(0, 4)).toBe(String(eff.getUTCFullYear() + 1));
    const rows = await auditOf(v.id);
    expect(rows.map((r) => [r.action, r.fromStatus, r.toStatus, r.actorEmail, r.actorRole])).toEqual([['draft', null, 'draft', analyst.email, 'analyst']]);
    expect(rows[0].contentHash).toBe(v.contentHash);
    expect(v.contentHash).toMatch(/^[0-9a-f]{64}$/);
  });

  it('a viewer cannot draft: 403 and nothing written', async () => {
    const segment = newSegment();
    const { fitId } = await makeFitRun(analyst.id, segment);
    const before = await getDb().select().from(assumptionAudit);
    const res = await draft(viewer, draftBody(fitId, segment));
    expect(res.status).toBe(403);
    expect(res.body.code).toBe('forbidden:assumptions:draft');
    expect(res.body.message).toMatch(/Only analysts draft/);
    expect(await getDb().select().from(assumptionAudit)).toHaveLength(before.length);
  });

  it('validators and admins cannot draft either', async () => {
    const segment = newSegment();
    const { fitId } = await makeFitRun(analyst.id, segment);
    expect((await draft(validator, draftBody(fitId, segment))).status).toBe(403);
    expect((await draft(admin, draftBody(fitId, segment))).status).toBe(403);
  });

  it('an anonymous caller gets 401', async () => {
    const res = await as(null, () => call(draftRoute.POST, { body: {} }));
    expect(res.status).toBe(401);
  });

  it('bad input names the field: a missing rationale, a final value below the margins, a review-by beyond 12 months', async () => {
    const segment = newSegment();
    const { fitId } = await makeFitRun(analyst.id, segment);
    const noRationale = draftBody(fitId, segment, {
      margins: { data: { value: 0.01, rationale: '' }, practice: { value: 0, rationale: 'x' }, general: { value: 0, rationale: 'x' } },
    });
    let res = await draft(analyst, noRationale);
    expect(res.status).toBe(422);
    expect(res.body.field).toBe('margins.data.rationale');
    res = await draft(analyst, draftBody(fitId, segment, { finalValue: 0.05 }));
    expect(res.status).toBe(422);
    expect(res.body.field).toBe('finalValue');
    expect(res.body.message).toMatch(/below the estimate plus the margins \(0\.067091\)/);
    res = await draft(analyst, draftBody(fitId, segment, { effectiveDate: '2026-01-31', reviewBy: '2027-02-01' }));
    expect(res.status).toBe(422);
    expect(res.body.field).toBe('reviewBy');
    expect(res.body.message).toMatch(/at most 12 months/);
    res = await draft(analyst, draftBody(fitId, segment, { estimator: 'vasicekMle' }));
    expect(res.status).toBe(422);
    expect(res.body.message).toMatch(/vasicekMle gave no value/);
    res = await draft(analyst, draftBody(fitId, segment, { intervalMethod: 'wald' }));
    expect(res.status).toBe(422);
    expect(res.body.field).toBe('intervalMethod');
    expect(await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.windowFrom, 'never'))).toHaveLength(0);
  });

  it('a fit that has not finished cannot be drafted from', async () => {
    const segment = newSegment();
    const { fitId } = await makeFitRun(analyst.id, segment, undefined, { status: 'running' });
    const res = await draft(analyst, draftBody(fitId, segment));
    expect(res.status).toBe(409);
    expect(res.body.message).toMatch(/running/);
  });

  it('only one version of a segment is open at a time', async () => {
    const { segment, fitId } = await newDraft();
    const res = await draft(analyst, draftBody(fitId, segment));
    expect(res.status).toBe(409);
    expect(res.body.code).toBe('conflict:open-version');
  });
});

describe('the whole lifecycle through the API', () => {
  it('draft, submit, review, request changes, fix, resubmit, approve, publish; audit rows and e-mails at each step', async () => {
    const { id, segment } = await newDraft(analyst);

    expect((await act(analyst, id, 'submit')).body).toMatchObject({ status: 'submitted', previous: 'draft' });
    let mail = await getDb().select().from(mailOutbox).where(eq(mailOutbox.versionId, id));
    expect(mail.filter((m) => m.kind === 'awaiting-review').map((m) => m.toAddress)).toEqual(expect.arrayContaining([validator.email, validator2.email]));
    expect(mail.some((m) => m.toAddress === analyst.email)).toBe(false);

    expect((await act(validator, id, 'start-review')).body.status).toBe('in_review');
    // Request changes needs a comment.
    let res = await act(validator, id, 'request-changes');
    expect(res.status).toBe(422);
    expect(res.body.message).toMatch(/comment is required/);
    res = await act(validator, id, 'request-changes', 'Justify the general margin against the bootstrap bias.');
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('draft');
    mail = await getDb().select().from(mailOutbox).where(and(eq(mailOutbox.versionId, id), eq(mailOutbox.kind, 'changes-requested')));
    expect(mail.map((m) => m.toAddress)).toEqual([analyst.email]);
    expect(mail[0].body).toContain('Justify the general margin');

    res = await edit(analyst, id, {
      margins: {
        data: { value: 0.01, rationale: 'Ten annual observations only.' },
        practice: { value: 0, rationale: 'No change in lending practice.' },
        general: { value: 0.03, rationale: 'Bootstrap bias of about 0.02, plus rounding.' },
      },
    });
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('draft');
    expect((await act(analyst, id, 'submit')).body.status).toBe('submitted');
    expect((await act(validator, id, 'start-review')).body.status).toBe('in_review');
    res = await act(validator, id, 'approve', 'Margins justified.');
    expect(res.body).toEqual({ id, status: 'approved', previous: 'in_review' });
    mail = await getDb().select().from(mailOutbox).where(and(eq(mailOutbox.versionId, id), eq(mailOutbox.kind, 'approved')));
    expect(mail.map((m) => m.toAddress)).toEqual([analyst.email]);

    res = await act(validator, id, 'publish');
    expect(res.body.status).toBe('published');

    const [v] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, id));
    expect(v.validatorId).toBe(validator.id);
    expect(v.finalValue).toBe(0.077091);
    expect(v.publishedAt).not.toBeNull();

    const rows = await auditOf(id);
    expect(rows.map((r) => `${r.action}:${r.fromStatus ?? '-'}>${r.toStatus}:${r.actorRole}`)).toEqual([
      'draft:->draft:analyst',
      'submit:draft>submitted:analyst',
      'start-review:submitted>in_review:validator',
      'request-changes:in_review>draft:validator',
      'edit:draft>draft:analyst',
      'submit:draft>submitted:analyst',
      'start-review:submitted>in_review:validator',
      'approve:in_review>approved:validator',
      'publish:approved>published:validator',
    ]);
    // The hash changes with the edit and every later row carries the reviewed content.
    expect(rows[3].contentHash).not.toBe(rows[4].contentHash);
    expect(new Set(rows.slice(4).map((r) => r.contentHash))).toEqual(new Set([v.contentHash]));
    expect(rows[3].comment).toBe('Justify the general margin against the bootstrap bias.');

    // The page data: the audit CSV carries every row, with the segment.
    session.user = viewer;
    const csv = await call(auditRoute.GET, { params: { id: String(id) } });
    session.user = null;
    expect(csv.status).toBe(200);
    expect(csv.headers.get('content-type')).toMatch(/text\/csv/);
    expect(csv.text.trim().split('\r\n')).toHaveLength(1 + rows.length);
    expect(csv.text).toContain(segment);
  });

  it('the content hash recomputes from the stored content', async () => {
    const { id } = await newDraft();
    const page = await getVersionPage(analyst, id);
    expect(contentHash(page.version)).toBe(page.version.contentHash);
  });
});

describe('forbidden moves, with the status code and the audit rows they leave (none)', () => {
  it('the maker cannot approve their own version: an analyst by role (403), a maker who became a validator by person (403)', async () => {
    const { id } = await newDraft(analyst2);
    await act(analyst2, id, 'submit');
    await act(validator, id, 'start-review');
    const before = (await auditOf(id)).length;
    let res = await act(analyst2, id, 'approve');
    expect(res.status).toBe(403);
    expect(res.body.message).toMatch(/Only validators review/);

    // The drafter becomes a validator: the system, not a policy, refuses them.
    await getDb().update(users).set({ role: 'validator' }).where(eq(users.id, analyst2.id));
    const turned = { ...analyst2, role: 'validator' as const };
    res = await act(turned, id, 'approve');
    expect(res.status).toBe(403);
    expect(res.body.code).toBe('forbidden:approve:maker');
    expect(res.body.message).toMatch(/You drafted or edited this version/);
    res = await act(turned, id, 'reject', 'no');
    expect(res.status).toBe(403);
    await getDb().update(users).set({ role: 'analyst' }).where(eq(users.id, analyst2.id));
    expect(await auditOf(id)).toHaveLength(before);
    expect(await statusOf(id)).toBe('in_review');
  });

  it('a validator who edited a version cannot review it', async () => {
    const { id } = await newDraft(analyst);
    const editor = await makeUser('analyst');
    expect((await edit(editor, id, { limitations: 'Edited by a second analyst.' })).status).toBe(200);
    await act(analyst, id, 'submit');
    await getDb().update(users).set({ role: 'validator' }).where(eq(users.id, editor.id));
    const res = await act({ ...editor, role: 'validator' }, id, 'start-review');
    expect(res.status).toBe(403);
    expect(res.body.code).toBe('forbidden:start-review:maker');
    expect((await act(validator, id, 'start-review')).status).toBe(200);
  });

  it('an administrator cannot approve (403, whatever the state)', async () => {
    const { id } = await newDraft();
    await act(analyst, id, 'submit');
    await act(validator, id, 'start-review');
    const before = (await auditOf(id)).length;
    const res = await act(admin, id, 'approve');
    expect(res.status).toBe(403);
    expect(res.body.message).toBe('An administrator cannot approve assumptions: only a validator who did not draft or edit the version can.');
    expect(await auditOf(id)).toHaveLength(before);
  });

  it('a viewer cannot submit, review or publish (403)', async () => {
    const { id } = await newDraft();
    for (const a of ['submit', 'start-review', 'approve', 'publish', 'retire']) {
      expect((await act(viewer, id, a)).status).toBe(403);
    }
    expect(await auditOf(id)).toHaveLength(1);
  });

  it('publishing a rejected version is refused (409) and leaves no audit row', async () => {
    const { id } = await newDraft();
    await act(analyst, id, 'submit');
    await act(validator, id, 'start-review');
    expect((await act(validator, id, 'reject')).status).toBe(422); // a comment is required
    const rej = await act(validator, id, 'reject', 'The window leaves out the 2009 downturn.');
    expect(rej.body.status).toBe('rejected');
    const mail = await getDb().select().from(mailOutbox).where(and(eq(mailOutbox.versionId, id), eq(mailOutbox.kind, 'rejected')));
    expect(mail.map((m) => m.toAddress)).toEqual([analyst.email]);
    const before = (await auditOf(id)).length;
    const res = await act(validator, id, 'publish');
    expect(res.status).toBe(409);
    expect(res.body.message).toMatch(/A rejected version cannot be published: only a approved version can\. Draft a new version instead\./);
    expect(await auditOf(id)).toHaveLength(before);
    expect((await edit(analyst, id, { limitations: 'x' })).status).toBe(409);
  });

  it('editing a published version is refused (409): published versions are immutable', async () => {
    const { id } = await newDraft();
    await act(analyst, id, 'submit');
    await act(validator, id, 'start-review');
    await act(validator, id, 'approve', 'Checked.');
    await act(analyst, id, 'publish');
    const [before] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, id));
    const auditBefore = (await auditOf(id)).length;
    const res = await edit(analyst, id, { limitations: 'Quietly changed.' });
    expect(res.status).toBe(409);
    expect(res.body.message).toBe('A published version is immutable: a correction is a new version.');
    const [after] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, id));
    expect(after.limitations).toBe(before.limitations);
    expect(after.contentHash).toBe(before.contentHash);
    expect(await auditOf(id)).toHaveLength(auditBefore);
  });

  it('approval without a comment is refused (422 naming the comment): the validator states a conclusion; nothing is written', async () => {
    const { id } = await newDraft();
    await act(analyst, id, 'submit');
    await act(validator, id, 'start-review');
    const before = (await auditOf(id)).length;
    for (const comment of [undefined, '', '   ']) {
      const res = await act(validator, id, 'approve', comment);
      expect(res.status).toBe(422);
      expect(res.body.code).toBe('invalid:comment');
      expect(res.body.field).toBe('comment');
      expect(res.body.message).toBe('Write your conclusion when you approve a version (what you checked and why it holds): a comment is required.');
    }
    expect(await statusOf(id)).toBe('in_review');
    expect(await auditOf(id)).toHaveLength(before);
    const res = await act(validator, id, 'approve', 'Profile interval and margins checked; fit for economic capital.');
    expect(res.status).toBe(200);
    const [row] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, id));
    expect(row.decisionComment).toBe('Profile interval and margins checked; fit for economic capital.');
  });

  it('the version page offers Publish only while no scheduler runs, and says when it publishes', async () => {
    const { id } = await newDraft();
    await act(analyst, id, 'submit');
    await act(validator, id, 'start-review');
    expect((await getVersionPage(validator, id)).publication?.text).toContain(`publishes on ${todayIso()}`);
    await act(validator, id, 'approve', 'Checked.');
    // A worker's fresh heartbeat means the scheduler runs: nobody is asked to publish.
    const w = { workerId: `lifecycle-test:${process.pid}`, host: 'test', pid: process.pid, startedAt: new Date() };
    await beat(getDb(), w);
    let page = await getVersionPage(validator, id);
    expect(page.publication?.kind).toBe('due');
    expect(page.actions).not.toContain('publish');
    // Without a running worker (every heartbeat of the test database stopped) a person publishes.
    await markStopped(getDb(), w.workerId);
    await getDb().update(workerHeartbeats).set({ stoppedAt: new Date() }).where(isNull(workerHeartbeats.stoppedAt));
    page = await getVersionPage(validator, id);
    expect(page.publication?.kind).toBe('waiting');
    expect(page.actions).toContain('publish');
  });

  it('transitions not allowed from the state answer 409 with a sentence', async () => {
    const { id } = await newDraft();
    let res = await act(validator, id, 'approve', 'Checked.');
    expect(res.status).toBe(409);
    expect(res.body.message).toBe('A draft version cannot be approved: only a in review version can.');
    res = await act(analyst, id, 'withdraw');
    expect(res.status).toBe(409);
    res = await act(analyst, id, 'publish');
    expect(res.status).toBe(409);
    res = await as(analyst, () => call(transitionRoute.POST, { body: { action: 'teleport' }, params: { id: String(id) } }));
    expect(res.status).toBe(422);
    expect(res.body.message).toMatch(/must be one of/);
  });

  it('an approved version is not published before its effective date', async () => {
    const future = new Date(Date.now() + 10 * 86_400_000).toISOString().slice(0, 10);
    const { id } = await newDraft(analyst, { effectiveDate: future });
    await act(analyst, id, 'submit');
    await act(validator, id, 'start-review');
    await act(validator, id, 'approve', 'Checked.');
    const res = await act(validator, id, 'publish');
    expect(res.status).toBe(409);
    expect(res.body.message).toContain(`becomes effective on ${future}`);
  });

  it('back-dating: an effective date before the approval date is refused at approval (409, a sentence), and the button stays to say why', async () => {
    const yesterday = new Date(Date.now() - 86_400_000).toISOString().slice(0, 10);
    const { id } = await newDraft(analyst, { effectiveDate: yesterday });
    await act(analyst, id, 'submit');
    await act(validator, id, 'start-review');
    expect((await getVersionPage(validator, id)).actions).toContain('approve');
    const before = (await auditOf(id)).length;
    const res = await act(validator, id, 'approve', 'Looks right.');
    expect(res.status).toBe(409);
    expect(res.body.code).toBe('conflict:approve:back-dated');
    expect(res.body.message).toBe(
      `The effective date ${yesterday} is before today, ${todayIso()}: a version cannot take effect before it is approved, or answers already given for past dates would change. Edit the effective date to ${todayIso()} or later, then approve.`,
    );
    expect(await statusOf(id)).toBe('in_review');
    expect(await auditOf(id)).toHaveLength(before);
    // The analyst moves the date to today; after a new review the approval goes through.
    expect((await edit(analyst, id, { effectiveDate: todayIso() })).status).toBe(200);
    await act(analyst, id, 'submit');
    await act(validator, id, 'start-review');
    expect((await act(validator, id, 'approve', 'Checked.')).status).toBe(200);
  });

  it('back-dating: an approved version whose effective date is before its approval date is not published, by a person (409) or by the scheduler', async () => {
    const { id } = await newDraft(analyst);
    await act(analyst, id, 'submit');
    await act(validator, id, 'start-review');
    await act(validator, id, 'approve', 'Checked.');
    // As a version approved before the rule, or changed in the database, would be stored.
    const earlier = new Date(Date.now() - 3 * 86_400_000).toISOString().slice(0, 10);
    await getDb().update(assumptionVersions).set({ effectiveDate: earlier }).where(eq(assumptionVersions.id, id));
    const res = await act(validator, id, 'publish');
    expect(res.status).toBe(409);
    expect(res.body.code).toBe('conflict:publish:back-dated');
    expect(res.body.message).toMatch(new RegExp(`^The effective date ${earlier} is before the approval date ${todayIso()}: a version cannot take effect before it was approved\\.`));
    const report = await runScheduledTransitions();
    expect(report.published).not.toContain(id);
    expect(report.refused).toContainEqual({ id, reason: res.body.message });
    expect(await statusOf(id)).toBe('approved');
  });

  it('the lifecycle takes its clock: a version approved a week before its effective date is published on that date', async () => {
    const segment = newSegment();
    const { fitId } = await makeFitRun(analyst.id, segment);
    const approvedAt = new Date(Date.now() - 10 * 86_400_000);
    const effective = todayIso(new Date(Date.now() - 3 * 86_400_000));
    const v = await createDraft(analyst, draftBody(fitId, segment, { effectiveDate: effective }) as never, approvedAt);
    await transition(analyst, v.id, { action: 'submit' }, approvedAt);
    await transition(validator, v.id, { action: 'start-review' }, approvedAt);
    await transition(validator, v.id, { action: 'approve', comment: 'Fine.' }, approvedAt);
    await transition(validator, v.id, { action: 'publish' }, new Date(`${effective}T08:00:00Z`));
    const trail = await auditOf(v.id);
    expect(trail.map((r) => r.at.toISOString().slice(0, 10))).toEqual([...Array(4).fill(todayIso(approvedAt)), effective]);
    const [row] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, v.id));
    expect(row.publishedAt!.toISOString()).toBe(`${effective}T08:00:00.000Z`);
    expect(row.createdAt.toISOString()).toBe(approvedAt.toISOString());
  });

  it('an unknown version is 404; a viewer cannot see a draft (404)', async () => {
    const { id } = await newDraft();
    expect((await act(validator, 999_999, 'approve')).status).toBe(404);
    const res = await as(viewer, () => call(versionRoute.GET, { params: { id: String(id) } }));
    expect(res.status).toBe(404);
  });
});

describe('editing after submission', () => {
  it('returns the version to draft, voids the reviews and changes the content hash', async () => {
    const { id } = await newDraft();
    await act(analyst, id, 'submit');
    await act(validator, id, 'start-review');
    const [before] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, id));
    const res = await edit(analyst, id, { intendedUses: 'Economic capital only.' });
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('draft');
    expect(res.body.contentHash).not.toBe(before.contentHash);
    const reviews = await getDb().select().from(assumptionReviews).where(eq(assumptionReviews.versionId, id));
    expect(reviews).toHaveLength(1);
    expect(reviews[0].voided).toBe(true);
    expect(reviews[0].contentHash).toBe(before.contentHash);
    const last = (await auditOf(id)).at(-1)!;
    expect(last).toMatchObject({ action: 'edit', fromStatus: 'in_review', toStatus: 'draft' });
    expect(last.comment).toMatch(/earlier reviews voided/);
  });

  it('a validator cannot edit (403)', async () => {
    const { id } = await newDraft();
    const res = await edit(validator, id, { limitations: 'x' });
    expect(res.status).toBe(403);
  });
});

describe('publication supersedes the previous version', () => {
  it('publishing version 2 makes version 1 superseded, with a system audit row', async () => {
    const { id: v1, segment } = await newDraft();
    for (const [u, a] of [[analyst, 'submit'], [validator, 'start-review'], [validator, 'approve'], [analyst, 'publish']] as const) await act(u, v1, a, 'Checked.');
    const { fitId } = await makeFitRun(analyst.id, segment, { rho: 0.05, pd: 0.0133, profile: { level: 0.95, lower: 0.02, upper: 0.12 } });
    const res = await draft(analyst, draftBody(fitId, segment));
    expect(res.body.version).toBe(2);
    const v2 = res.body.id as number;
    for (const [u, a] of [[analyst, 'submit'], [validator, 'start-review'], [validator, 'approve'], [validator, 'publish']] as const) await act(u, v2, a, 'Checked.');
    expect(await statusOf(v1)).toBe('superseded');
    expect(await statusOf(v2)).toBe('published');
    const last = (await auditOf(v1)).at(-1)!;
    expect(last).toMatchObject({ action: 'supersede', fromStatus: 'published', toStatus: 'superseded', actorRole: 'system', comment: 'Superseded by version 2.' });
  });
});

describe('the audit trail is append-only', () => {
  it('refuses UPDATE and DELETE in the database itself', async () => {
    const { id } = await newDraft();
    const [row] = await auditOf(id);
    const reason = (p: Promise<unknown>) =>
      p.then(
        () => 'succeeded',
        (e: Error & { cause?: Error }) => `${e.message} ${e.cause?.message ?? ''}`,
      );
    expect(await reason(getDb().update(assumptionAudit).set({ comment: 'tampered' }).where(eq(assumptionAudit.id, row.id)))).toMatch(/append-only/);
    expect(await reason(getDb().delete(assumptionAudit).where(eq(assumptionAudit.id, row.id)))).toMatch(/append-only/);
    const [still] = await getDb().select().from(assumptionAudit).where(eq(assumptionAudit.id, row.id));
    expect(still.comment).toBe(row.comment);
  });
});
