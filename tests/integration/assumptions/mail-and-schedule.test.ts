import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq, inArray } from 'drizzle-orm';
import nodemailer from 'nodemailer';
import { closeDb, getDb } from '@/db/connection';
import { assumptionAudit, assumptionVersions, mailCaptured, mailOutbox } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import { addDays, todayIso } from '@/lib/assumptions/dates';
import { createDraft, runScheduledTransitions, transition } from '@/lib/dal/assumptions';
import { startCaptureServer, type CaptureServer } from '@/lib/mail/capture-server';
import { backoffMs, MAX_ATTEMPTS, sendDueMail } from '@/lib/mail/sender';
import { makeUser } from '../../support/users';
import { draftBody, makeFitRun } from '../../support/assumptions';

let analyst: SessionUser;
let validator: SessionUser;
let capture: CaptureServer;

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  capture = await startCaptureServer(getDb());
});
afterAll(async () => {
  await capture.close();
  await closeDb();
});

let n = 0;
async function draftFor(effectiveDate: string, reviewBy?: string) {
  n += 1;
  const segment = `Mail segment ${Date.now().toString(36)}-${n}`;
  const { fitId } = await makeFitRun(analyst.id, segment);
  const v = await createDraft(analyst, draftBody(fitId, segment, { effectiveDate, ...(reviewBy ? { reviewBy } : {}) }) as never);
  return { id: v.id, segment };
}
/** Submits, reviews and approves, at the clock `at` (default now). */
async function approve(id: number, at: Date = new Date()) {
  await transition(analyst, id, { action: 'submit' }, at);
  await transition(validator, id, { action: 'start-review' }, at);
  await transition(validator, id, { action: 'approve', comment: 'Checked.' }, at);
}
/** Sends every due message of the shared test database (other files queue mail too), batch by batch. */
async function sendAll() {
  const t = nodemailer.createTransport({ host: '127.0.0.1', port: capture.port, secure: false, ignoreTLS: true });
  const total = { sent: 0, failed: 0, retrying: 0 };
  try {
    for (let round = 0; round < 50; round++) {
      const r = await sendDueMail(getDb(), t, new Date(Date.now() + 1000), 200);
      total.sent += r.sent;
      total.failed += r.failed;
      total.retrying += r.retrying;
      if (r.sent + r.failed + r.retrying === 0) break;
    }
    return total;
  } finally {
    t.close();
  }
}

describe('e-mail through the fake SMTP server', () => {
  it('submission and approval reach the right people through SMTP; the captured envelope names them', async () => {
    const { id, segment } = await draftFor(todayIso());
    await approve(id);
    const r = await sendAll();
    expect(r.sent).toBeGreaterThanOrEqual(2);
    const out = await getDb().select().from(mailOutbox).where(eq(mailOutbox.versionId, id));
    expect(out.every((m) => m.status === 'sent')).toBe(true);
    const captured = await getDb().select().from(mailCaptured).where(inArray(mailCaptured.outboxId, out.map((m) => m.id)));
    const byKind = (k: string) =>
      captured.filter((c) => out.find((m) => m.id === c.outboxId)?.kind === k).flatMap((c) => c.envelopeTo as string[]);
    expect(byKind('awaiting-review')).toContain(validator.email);
    expect(byKind('awaiting-review')).not.toContain(analyst.email);
    expect(byKind('approved')).toEqual([analyst.email]);
    const approvedRaw = captured.find((c) => out.find((m) => m.id === c.outboxId)?.kind === 'approved')!.raw;
    expect(approvedRaw).toMatch(new RegExp(`Subject: Approved: ${segment} v1`));
  });

  it('a send failure never blocks a transition: the message is kept with its error and retried with backoff', async () => {
    const { id } = await draftFor(todayIso());
    await transition(analyst, id, { action: 'submit' }); // writes the outbox; no SMTP involved
    const dead = nodemailer.createTransport({ host: '127.0.0.1', port: 1, secure: false, ignoreTLS: true, connectionTimeout: 2000 });
    const before = Date.now();
    const r = await sendDueMail(getDb(), dead, new Date(Date.now() + 1000), 200);
    expect(r.retrying).toBeGreaterThanOrEqual(1);
    const [m] = await getDb().select().from(mailOutbox).where(and(eq(mailOutbox.versionId, id), eq(mailOutbox.kind, 'awaiting-review')));
    expect(m.status).toBe('pending');
    expect(m.attempts).toBe(1);
    expect(m.lastError).toMatch(/ECONNREFUSED|connect/i);
    expect(m.nextAttemptAt.getTime()).toBeGreaterThanOrEqual(before + backoffMs(1) - 1000);
    // The transition stood.
    const [v] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, id));
    expect(v.status).toBe('submitted');
    // Backoff doubles and is capped at one hour; after MAX_ATTEMPTS the message fails for good.
    expect([1, 2, 3].map(backoffMs)).toEqual([30_000, 60_000, 120_000]);
    expect(backoffMs(20)).toBe(3_600_000);
    await getDb().update(mailOutbox).set({ attempts: MAX_ATTEMPTS - 1, nextAttemptAt: new Date(0) }).where(eq(mailOutbox.id, m.id));
    await sendDueMail(getDb(), dead, new Date(), 200);
    const [after] = await getDb().select().from(mailOutbox).where(eq(mailOutbox.id, m.id));
    expect(after.status).toBe('failed');
    dead.close();
  });
});

describe('the scheduler', () => {
  it('publishes an approved version on its effective date (superseding the previous one) and not before', async () => {
    const { id: early } = await draftFor(todayIso());
    await approve(early);
    const tomorrow = addDays(todayIso(), 1);
    const later = await draftFor(tomorrow);
    await approve(later.id);

    const r1 = await runScheduledTransitions(new Date());
    expect(r1.published).toContain(early);
    expect(r1.published).not.toContain(later.id);
    const [v] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, later.id));
    expect(v.status).toBe('approved');

    const r2 = await runScheduledTransitions(new Date(`${tomorrow}T06:00:00Z`));
    expect(r2.published).toContain(later.id);
    const audit = await getDb().select().from(assumptionAudit).where(eq(assumptionAudit.versionId, later.id));
    expect(audit.at(-1)).toMatchObject({ action: 'publish', actorRole: 'system', actorEmail: 'system', toStatus: 'published' });
    const mail = await getDb().select().from(mailOutbox).where(and(eq(mailOutbox.versionId, later.id), eq(mailOutbox.kind, 'published')));
    expect(mail.map((m) => m.toAddress).sort()).toEqual([analyst.email, validator.email].sort());
  });

  it('queues the 30- and 7-day reminders once each; after the review-by date, under the default policy, keeps it flagged overdue and escalates once', async () => {
    const today = todayIso();
    const reviewBy = addDays(today, 25);
    const effective = addDays(today, -300);
    const { id } = await draftFor(effective, reviewBy);
    // Approved a week before its effective date (an effective date never precedes the approval).
    await approve(id, new Date(`${addDays(effective, -7)}T10:00:00Z`));
    await runScheduledTransitions(new Date());
    const remindersOf = async (kind: string) =>
      getDb().select().from(mailOutbox).where(and(eq(mailOutbox.versionId, id), eq(mailOutbox.kind, kind)));

    expect((await remindersOf('review-by-30')).map((m) => m.toAddress).sort()).toEqual([analyst.email, validator.email].sort());
    // The subject says how close the date really is (25 days), not the 30 of the reminder's kind.
    expect((await remindersOf('review-by-30'))[0].subject).toMatch(/^Review due in 25 days: /);
    expect((await remindersOf('review-by-30'))[0].body).toContain(`must be reviewed by ${reviewBy} (in 25 days)`);
    await runScheduledTransitions(new Date());
    expect(await remindersOf('review-by-30')).toHaveLength(2);
    expect(await remindersOf('review-by-7')).toHaveLength(0);

    const weekBefore = new Date(`${addDays(reviewBy, -6)}T08:00:00Z`);
    await runScheduledTransitions(weekBefore);
    await runScheduledTransitions(weekBefore);
    expect(await remindersOf('review-by-7')).toHaveLength(2);
    expect((await remindersOf('review-by-7'))[0].subject).toMatch(/^Review due in 6 days: /);

    const onTheDay = await runScheduledTransitions(new Date(`${reviewBy}T08:00:00Z`));
    expect(onTheDay.overdue).not.toContain(id);
    expect(onTheDay.expired).not.toContain(id);
    const dayAfter = new Date(`${addDays(reviewBy, 1)}T08:00:00Z`);
    const after = await runScheduledTransitions(dayAfter);
    await runScheduledTransitions(dayAfter);
    // The default overdue policy (flag): still published, flagged, escalated once to the validators.
    expect(after.overdue).toContain(id);
    expect(after.expired).not.toContain(id);
    const [v] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, id));
    expect(v.status).toBe('published');
    const escalations = await remindersOf('review-overdue');
    expect(escalations.map((m) => m.toAddress)).toContain(validator.email);
    expect(escalations.map((m) => m.toAddress)).not.toContain(analyst.email);
    expect(new Set(escalations.map((m) => m.toAddress)).size).toBe(escalations.length);
    expect(escalations[0].subject).toMatch(/^Past review-by, still served: /);
  });
});
