import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import { closeDb, getDb } from '@/db/connection';
import { assumptionAudit, assumptionVersions, findingEvents, mailOutbox } from '@/db/schema';
import { addDays, todayIso } from '@/lib/assumptions/dates';
import { createDraft, transition } from '@/lib/dal/assumptions';
import { queueFindingReminders } from '@/lib/dal/findings';
import * as findingsRoute from '@/app/api/findings/route';
import * as findingRoute from '@/app/api/findings/[id]/route';
import * as transitionRoute from '@/app/api/assumptions/[id]/transitions/route';
import { makeUser } from '../../support/users';
import { call, draftBody, makeFitRun, type ApiAnswer, type SessionUser } from '../../support/assumptions';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session } from '../../support/mock-session';

let analyst: SessionUser;
let validator: SessionUser;
let validator2: SessionUser;
let viewer: SessionUser;

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  validator2 = await makeUser('validator');
  viewer = await makeUser('viewer');
});
beforeEach(() => {
  session.user = null;
});
afterAll(async () => {
  await closeDb();
});

async function as(user: SessionUser, fn: () => Promise<ApiAnswer>) {
  session.user = user;
  try {
    return await fn();
  } finally {
    session.user = null;
  }
}
const record = (user: SessionUser, body: Record<string, unknown>) => as(user, () => call(findingsRoute.POST, { body }));
const change = (user: SessionUser, id: number, body: Record<string, unknown>) =>
  as(user, () => call(findingRoute.PATCH, { method: 'PATCH', body, params: { id: String(id) } }));
const act = (user: SessionUser, id: number, action: string, comment?: string) =>
  as(user, () => call(transitionRoute.POST, { body: { action, comment }, params: { id: String(id) } }));

let n = 0;
/** A version in review, with its fit and dataset. */
async function inReview() {
  n += 1;
  const segment = `Findings segment ${Date.now().toString(36)}-${n}`;
  const fit = await makeFitRun(analyst.id, segment);
  const v = await createDraft(analyst, draftBody(fit.fitId, segment) as never);
  await transition(analyst, v.id, { action: 'submit' });
  await transition(validator, v.id, { action: 'start-review' });
  return { versionId: v.id, segment, ...fit };
}

function finding(targetType: string, targetId: number, over: Record<string, unknown> = {}) {
  return {
    targetType,
    targetId,
    title: 'Window leaves out the 2009 downturn',
    description: 'The fit window starts in 2011, so no downturn year is in the data; extend the window or justify a margin.',
    severity: 'high',
    ownerId: analyst.id,
    dueDate: addDays(todayIso(), 30),
    ...over,
  };
}

describe('validation findings: who records, who moves them', () => {
  it('a validator records a finding (201) with an owner and a due date; the owner is told by e-mail; the history starts', async () => {
    const { versionId, segment } = await inReview();
    const res = await record(validator, finding('version', versionId));
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ status: 'open', severity: 'high', target: { type: 'version', id: versionId, label: `${segment} v1` } });
    const id = res.body.id as number;
    const [mail] = await getDb().select().from(mailOutbox).where(and(eq(mailOutbox.kind, 'finding-recorded'), eq(mailOutbox.toAddress, analyst.email))).orderBy(sql`id desc`).limit(1);
    expect(mail.subject).toBe('Finding recorded (high): Window leaves out the 2009 downturn');
    expect(mail.body).toContain(`/findings/${id}`);
    const history = await getDb().select().from(findingEvents).where(eq(findingEvents.findingId, id));
    expect(history.map((e) => [e.kind, e.toStatus, e.actorEmail])).toEqual([['recorded', 'open', validator.email]]);
  });

  it('analysts and viewers cannot record (403); bad input names its field (422)', async () => {
    const { versionId } = await inReview();
    expect((await record(analyst, finding('version', versionId))).status).toBe(403);
    expect((await record(viewer, finding('version', versionId))).status).toBe(403);
    let res = await record(validator, finding('version', versionId, { dueDate: addDays(todayIso(), -1) }));
    expect(res.status).toBe(422);
    expect(res.body.field).toBe('dueDate');
    res = await record(validator, finding('version', versionId, { ownerId: viewer.id }));
    expect(res.status).toBe(422);
    expect(res.body.field).toBe('ownerId');
    res = await record(validator, finding('dataset', 987_654_321));
    expect(res.status).toBe(422);
    expect(res.body.message).toBe('There is no dataset 987654321.');
    res = await record(validator, finding('fit', 1, { severity: 'critical' }));
    expect(res.status).toBe(422);
    expect(res.body.field).toBe('severity');
  });

  it('the owner reports progress; only a validator closes or accepts, and accepting needs a rationale', async () => {
    const { fitId } = await inReview();
    const id = (await record(validator, finding('fit', fitId, { severity: 'medium' }))).body.id as number;
    let res = await change(analyst, id, { status: 'in_remediation', comment: 'Re-running with 2008-2024.' });
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('in_remediation');
    res = await change(analyst, id, { status: 'closed' });
    expect(res.status).toBe(403);
    expect(res.body.message).toMatch(/a validator decides whether it is closed/);
    res = await change(viewer, id, { comment: 'Interesting.' });
    expect(res.status).toBe(403);
    res = await change(validator2, id, { status: 'accepted' });
    expect(res.status).toBe(422);
    expect(res.body.field).toBe('comment');
    res = await change(validator2, id, { status: 'accepted', comment: 'The margin for data deficiencies covers it.' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'accepted', rationale: 'The margin for data deficiencies covers it.', unresolved: false });
    res = await change(validator2, id, { status: 'closed' });
    expect(res.status).toBe(409);
    expect(res.body.message).toBe('A finding that is accepted with rationale cannot become closed: reopen it first.');
    const events = (res = await as(viewer, () => call(findingRoute.GET, { params: { id: String(id) } }))).body.events as { kind: string; toStatus: string | null }[];
    expect(events.map((e) => `${e.kind}:${e.toStatus}`)).toEqual(['recorded:open', 'status:in_remediation', 'status:accepted']);
  });

  it('the history is append-only in the database itself', async () => {
    const { datasetId } = await inReview();
    const id = (await record(validator, finding('dataset', datasetId, { severity: 'low' }))).body.id as number;
    const reason = (p: Promise<unknown>) =>
      p.then(
        () => 'succeeded',
        (e: Error & { cause?: Error }) => `${e.message} ${e.cause?.message ?? ''}`,
      );
    expect(await reason(getDb().update(findingEvents).set({ comment: 'changed' }).where(eq(findingEvents.findingId, id)))).toMatch(/append-only/);
    expect(await reason(getDb().delete(findingEvents).where(eq(findingEvents.findingId, id)))).toMatch(/append-only/);
    expect(await getDb().select().from(findingEvents).where(eq(findingEvents.findingId, id))).toHaveLength(1);
  });
});

describe('an open high finding blocks approval', () => {
  it('on the version: 409 naming the finding; nothing written; closing it lets the approval through', async () => {
    const { versionId } = await inReview();
    const id = (await record(validator, finding('version', versionId))).body.id as number;
    const auditBefore = await getDb().select().from(assumptionAudit).where(eq(assumptionAudit.versionId, versionId));
    const res = await act(validator2, versionId, 'approve', 'Checked the interval.');
    expect(res.status).toBe(409);
    expect(res.body.code).toBe('conflict:approve:open-finding');
    expect(res.body.findingId).toBe(id);
    expect(res.body.message).toBe(
      `The high-severity finding ${id} “Window leaves out the 2009 downturn” on this version is open (due ${addDays(todayIso(), 30)}): a validator must close it, or accept it with a rationale, before this version can be approved.`,
    );
    const [row] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, versionId));
    expect(row.status).toBe('in_review');
    expect(await getDb().select().from(assumptionAudit).where(eq(assumptionAudit.versionId, versionId))).toHaveLength(auditBefore.length);
    // Remediated is not resolved: the validator must close it.
    await change(analyst, id, { status: 'remediated', comment: 'Window extended.' });
    expect((await act(validator2, versionId, 'approve', 'Checked.')).status).toBe(409);
    await change(validator, id, { status: 'closed', comment: 'Verified the extended window.' });
    expect((await act(validator2, versionId, 'approve', 'Checked.')).status).toBe(200);
  });

  it('on its fit or its dataset too; medium and low findings do not block', async () => {
    const a = await inReview();
    const onFit = (await record(validator, finding('fit', a.fitId))).body.id as number;
    const res = await act(validator2, a.versionId, 'approve', 'Checked.');
    expect(res.status).toBe(409);
    expect(res.body.message).toContain(`finding ${onFit}`);
    expect(res.body.message).toContain(`on fit ${a.fitId} of “`);

    const b = await inReview();
    await record(validator, finding('dataset', b.datasetId, { severity: 'medium' }));
    await record(validator, finding('version', b.versionId, { severity: 'low' }));
    expect((await act(validator2, b.versionId, 'approve', 'Checked; medium and low findings stay open.')).status).toBe(200);
  });
});

describe('reminders before and after the due date', () => {
  it('7 days before and once past due, each once, to the owner and the recording validator', async () => {
    const { versionId } = await inReview();
    const due = addDays(todayIso(), 10);
    const id = (await record(validator, finding('version', versionId, { severity: 'medium', dueDate: due }))).body.id as number;
    const mails = () => getDb().select().from(mailOutbox).where(sql`${mailOutbox.dedupeKey} like ${`finding-%:${id}:%`}`);
    await queueFindingReminders(getDb(), new Date());
    expect(await mails()).toHaveLength(0); // 10 days ahead: nothing yet
    const soon = new Date(`${addDays(due, -7)}T08:00:00Z`);
    await queueFindingReminders(getDb(), soon);
    await queueFindingReminders(getDb(), soon);
    let m = await mails();
    expect(m.map((x) => `${x.kind}:${x.toAddress}`).sort()).toEqual([`finding-due-soon:${analyst.email}`, `finding-due-soon:${validator.email}`]);
    expect(m[0].subject).toBe('Finding due in 7 days: Window leaves out the 2009 downturn');
    const late = new Date(`${addDays(due, 2)}T08:00:00Z`);
    await queueFindingReminders(getDb(), late);
    await queueFindingReminders(getDb(), late);
    m = await mails();
    const overdue = m.filter((x) => x.kind === 'finding-overdue');
    expect(overdue).toHaveLength(2);
    expect(overdue[0].body).toContain(`was due on ${due} (2 days ago)`);
    // Closed findings are not reminded.
    await change(validator, id, { status: 'closed', comment: 'Done.' });
    await queueFindingReminders(getDb(), new Date(`${addDays(due, 40)}T08:00:00Z`));
    expect(await mails()).toHaveLength(4);
  });
});
