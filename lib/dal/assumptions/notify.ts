import 'server-only';
import { and, eq, inArray } from 'drizzle-orm';
import type { DbOrTx, Tx } from '@/db/connection';
import { users, type AssumptionVersion, type Role } from '@/db/schema';
import { appUrl } from '@/lib/env';
import { queueMail } from '@/lib/mail/outbox';
import { renderOverdueMail, type MailFacts, type MailKind } from '@/lib/mail/templates';
import { makerIds, type Actor } from './actors';

/**
 * The e-mail an assumption's transitions and review-by dates cause, written to the outbox in the
 * transaction of the change (the worker's mail loop sends it).
 */
/** What every message about a version says of it. */
function versionFacts(v: AssumptionVersion, segment: string) {
  return {
    segment,
    version: v.version,
    finalValue: v.finalValue,
    effectiveDate: v.effectiveDate,
    reviewBy: v.reviewBy,
    url: appUrl(`/library/versions/${v.id}`),
  };
}

async function activeEmails(db: DbOrTx, where: { role?: Role; ids?: number[] }): Promise<{ id: number; email: string }[]> {
  const conds = [eq(users.active, true)];
  if (where.role) conds.push(eq(users.role, where.role));
  if (where.ids) {
    if (!where.ids.length) return [];
    conds.push(inArray(users.id, where.ids));
  }
  return db.select({ id: users.id, email: users.email }).from(users).where(and(...conds));
}

/** Queues the mail of a transition: awaiting review, changes requested, decided, published. */
export async function notifyTransition(tx: Tx, v: AssumptionVersion, segment: string, action: string, actor: Actor, comment: string | null): Promise<void> {
  await queueTransitionMail(tx, { action, makers: await makerIds(tx, v), validatorId: v.validatorId, versionId: v.id, facts: versionFacts(v, segment), actor, comment });
}

/**
 * The mail of a transition of any kind of assumption (a segment's version, a factor-correlation
 * matrix's): awaiting review to the validators who are not its makers, changes requested and the
 * decision to its makers, publication to its makers and validator.
 */
export async function queueTransitionMail(
  tx: Tx,
  t: { action: string; makers: number[]; validatorId: number | null; versionId?: number; facts: Omit<MailFacts, 'actorName' | 'comment'>; actor: Actor; comment: string | null },
): Promise<void> {
  let kind: MailKind | null = null;
  let to: string[] = [];
  const makers = t.makers;
  switch (t.action) {
    case 'submit':
      kind = 'awaiting-review';
      to = (await activeEmails(tx, { role: 'validator' })).filter((u) => !makers.includes(u.id)).map((u) => u.email);
      break;
    case 'request-changes':
      kind = 'changes-requested';
      to = (await activeEmails(tx, { ids: makers })).map((u) => u.email);
      break;
    case 'approve':
    case 'reject':
      kind = t.action === 'approve' ? 'approved' : 'rejected';
      to = (await activeEmails(tx, { ids: makers })).map((u) => u.email);
      break;
    case 'publish':
      kind = 'published';
      to = (await activeEmails(tx, { ids: [...makers, ...(t.validatorId ? [t.validatorId] : [])] })).map((u) => u.email);
      break;
  }
  if (!kind) return;
  await queueMail(tx, {
    kind,
    to,
    ...(t.versionId !== undefined ? { versionId: t.versionId } : {}),
    facts: { ...t.facts, actorName: t.actor.name, comment: t.comment },
  });
}

/** The reminder due with `daysLeft` whole days to the review-by date: 7 days or fewer, 30 days or fewer, or none. */
export function reviewReminderKind(daysLeft: number): 'review-by-7' | 'review-by-30' | null {
  return daysLeft <= 7 && daysLeft >= 0 ? 'review-by-7' : daysLeft <= 30 && daysLeft > 7 ? 'review-by-30' : null;
}

/** Queues the 30- or 7-day review-by reminder of a published version once (deduplicated). Returns the rows written. */
export async function queueReviewReminder(db: DbOrTx, v: AssumptionVersion, segment: string, kind: MailKind, daysLeft: number): Promise<number> {
  return queueReminder(db, { kind, daysLeft, makers: await makerIds(db, v), validatorId: v.validatorId, versionId: v.id, dedupe: `${kind}:${v.id}:${v.reviewBy}`, facts: versionFacts(v, segment) });
}

/**
 * The review-by reminder of any kind of assumption (a segment's version, a factor-correlation
 * matrix's) to its makers and validator, once per `dedupe` key and address. Returns the rows written.
 */
export async function queueReminder(
  db: DbOrTx,
  r: { kind: MailKind; daysLeft: number; makers: number[]; validatorId: number | null; versionId?: number; dedupe: string; facts: Omit<MailFacts, 'actorName' | 'comment' | 'daysLeft'> },
): Promise<number> {
  const to = (await activeEmails(db, { ids: [...r.makers, ...(r.validatorId ? [r.validatorId] : [])] })).map((u) => u.email);
  return queueMail(db, {
    kind: r.kind,
    to,
    ...(r.versionId !== undefined ? { versionId: r.versionId } : {}),
    dedupeKey: (addr) => `${r.dedupe}:${addr}`,
    facts: { ...r.facts, daysLeft: r.daysLeft },
  });
}

/**
 * The escalation of a published value past its review-by date, to the active validators and
 * administrators, once per version and review-by date: flagged overdue and still served, or
 * withdrawn, by the overdue policy. Returns the rows written.
 */
export async function queueOverdueEscalation(db: DbOrTx, v: AssumptionVersion, segment: string, kind: 'review-overdue' | 'review-withdrawn'): Promise<number> {
  return queueEscalation(db, kind, { what: segment, version: v.version, reviewBy: v.reviewBy, url: appUrl(`/library/versions/${v.id}`), versionId: v.id, dedupe: `${kind}:${v.id}:${v.reviewBy}` });
}

/** The escalation of any kind of assumption past its review-by date (see queueOverdueEscalation), once per `dedupe` key and address. */
export async function queueEscalation(
  db: DbOrTx,
  kind: 'review-overdue' | 'review-withdrawn',
  e: { what: string; version: number; reviewBy: string; url: string; versionId?: number; dedupe: string },
): Promise<number> {
  const to = [...(await activeEmails(db, { role: 'validator' })), ...(await activeEmails(db, { role: 'admin' }))].map((u) => u.email);
  return queueMail(db, {
    kind,
    to,
    ...(e.versionId !== undefined ? { versionId: e.versionId } : {}),
    dedupeKey: (addr) => `${e.dedupe}:${addr}`,
    message: renderOverdueMail(kind, { segment: e.what, version: e.version, reviewBy: e.reviewBy, url: e.url }),
  });
}
