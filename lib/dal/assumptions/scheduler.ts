import 'server-only';
import { and, asc, eq, lte, sql } from 'drizzle-orm';
import { getDb } from '@/db/client';
import type { Db } from '@/db/connection';
import { assumptions, assumptionVersions } from '@/db/schema';
import { daysBetween, todayIso } from '@/lib/assumptions/dates';
import { backDatingProblem } from '@/lib/assumptions/lifecycle';
import type { MailKind } from '@/lib/mail/templates';
import { queueFindingReminders } from '../findings';
import { SYSTEM } from './actors';
import { queueReviewReminder } from './notify';
import { applyTransition, lockVersion } from './writes';

/**
 * The scheduler's transitions (workers/scheduler.ts runs this once a minute): publish approved
 * versions on their effective date (never one whose effective date is before its approval date), expire published versions after their review-by date,
 * remind 30 and 7 days before it (once each), and remind the owners of findings due within 7 days
 * or overdue (once each). Each step re-checks the state under a row lock, so
 * several workers may run it at once.
 */
export type ScheduleReport = {
  published: number[];
  expired: number[];
  reminders: number;
  /** Reminders of findings due within 7 days or overdue (messages written). */
  findingReminders: number;
  /** Approved versions not published because their effective date is before their approval date. */
  refused: { id: number; reason: string }[];
};

export async function runScheduledTransitions(now: Date = new Date(), db: Db = getDb()): Promise<ScheduleReport> {
  const today = todayIso(now);
  const report: ScheduleReport = { published: [], expired: [], reminders: 0, findingReminders: 0, refused: [] };

  const due = await db
    .select({ id: assumptionVersions.id })
    .from(assumptionVersions)
    .where(and(eq(assumptionVersions.status, 'approved'), lte(assumptionVersions.effectiveDate, today)))
    .orderBy(asc(assumptionVersions.effectiveDate), asc(assumptionVersions.id));
  for (const { id } of due) {
    await db.transaction(async (tx) => {
      const row = await lockVersion(tx, id);
      if (row.v.status !== 'approved' || row.v.effectiveDate > today) return;
      const problem = row.v.decidedAt ? backDatingProblem(row.v.effectiveDate, todayIso(row.v.decidedAt), 'publish') : null;
      if (problem) {
        report.refused.push({ id, reason: problem });
        return;
      }
      await applyTransition(tx, row, SYSTEM, 'publish', 'approved', 'published', `Effective date ${row.v.effectiveDate} reached.`, now);
      report.published.push(id);
    });
  }

  const stale = await db
    .select({ id: assumptionVersions.id })
    .from(assumptionVersions)
    .where(and(eq(assumptionVersions.status, 'published'), sql`${assumptionVersions.reviewBy} < ${today}`));
  for (const { id } of stale) {
    await db.transaction(async (tx) => {
      const row = await lockVersion(tx, id);
      if (row.v.status !== 'published' || row.v.reviewBy >= today) return;
      await applyTransition(tx, row, SYSTEM, 'expire', 'published', 'expired', `Review-by date ${row.v.reviewBy} passed without a new version.`, now);
      report.expired.push(id);
    });
  }

  const live = await db
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(eq(assumptionVersions.status, 'published'));
  for (const { v, segment } of live) {
    const left = daysBetween(today, v.reviewBy);
    const kind: MailKind | null = left <= 7 && left >= 0 ? 'review-by-7' : left <= 30 && left > 7 ? 'review-by-30' : null;
    if (!kind) continue;
    report.reminders += await queueReviewReminder(db, v, segment, kind, left);
  }
  report.findingReminders = await queueFindingReminders(db, now);
  return report;
}
