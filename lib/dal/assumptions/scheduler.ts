import 'server-only';
import { and, asc, eq, lte, sql } from 'drizzle-orm';
import { getDb } from '@/db/client';
import type { Db } from '@/db/connection';
import { assumptions, assumptionVersions } from '@/db/schema';
import { daysBetween, todayIso } from '@/lib/assumptions/dates';
import { backDatingProblem } from '@/lib/assumptions/lifecycle';
import { sweepEvidence } from '../evidence-store';
import { publishDueMatrices, type MatrixScheduleReport } from '../factor-matrices/writes';
import { queueFindingReminders } from '../findings';
import { notifyModels } from '../model-notify';
import { overduePolicyIn } from '../overdue-policy';
import { SYSTEM } from './actors';
import { queueOverdueEscalation, queueReviewReminder, reviewReminderKind } from './notify';
import { applyTransition, lockVersion } from './writes';

/**
 * The scheduler's transitions (workers/scheduler.ts runs this once a minute): publish approved
 * versions on their effective date (never one whose effective date is before its approval date); past a
 * published version's review-by date, withdraw it or keep it flagged overdue as the overdue policy
 * says, escalating once to validators and administrators;
 * remind 30 and 7 days before it (once each), and remind the owners of findings due within 7 days
 * or overdue (once each); and sweep the evidence of published versions (a superseded dataset or
 * later years in a newer one: one e-mail and one backtest per newer dataset). Each step re-checks the state under a row lock, so
 * several workers may run it at once.
 */
export type ScheduleReport = {
  published: number[];
  /** Withdrawn past review-by (the withdraw policy). */
  expired: number[];
  /** Past review-by and kept readable, flagged overdue (the flag policy); escalated once. */
  overdue: number[];
  /** Escalation e-mails written (overdue or withdrawn). */
  escalations: number;
  /** Published versions whose evidence has aged, the e-mails and backtests queued for them. */
  evidence: { flagged: number; mails: number; backtestsQueued: number };
  reminders: number;
  /** Reminders of findings due within 7 days or overdue (messages written). */
  findingReminders: number;
  /** Approved versions not published because their effective date is before their approval date. */
  refused: { id: number; reason: string }[];
  /** Factor-correlation matrix versions published, expired and refused as back-dated, their reminders and escalations (lib/dal/factor-matrices). */
  matrices: MatrixScheduleReport;
};

export async function runScheduledTransitions(now: Date = new Date(), db: Db = getDb()): Promise<ScheduleReport> {
  const today = todayIso(now);
  const report: ScheduleReport = {
    published: [],
    expired: [],
    overdue: [],
    escalations: 0,
    evidence: { flagged: 0, mails: 0, backtestsQueued: 0 },
    reminders: 0,
    findingReminders: 0,
    refused: [],
    matrices: { published: [], expired: [], refused: [], reminders: 0, escalations: 0 },
  };

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

  report.matrices = await publishDueMatrices(now, db);

  const stale = await db
    .select({ id: assumptionVersions.id })
    .from(assumptionVersions)
    .where(and(eq(assumptionVersions.status, 'published'), sql`${assumptionVersions.reviewBy} < ${today}`));
  // Past review-by: the overdue policy in force now decides (lib/assumptions/overdue-policy.ts).
  const policy = await overduePolicyIn(db, now);
  for (const { id } of stale) {
    await db.transaction(async (tx) => {
      const row = await lockVersion(tx, id);
      if (row.v.status !== 'published' || row.v.reviewBy >= today) return;
      if (policy === 'withdraw') {
        await applyTransition(
          tx,
          row,
          SYSTEM,
          'expire',
          'published',
          'expired',
          `Review-by date ${row.v.reviewBy} passed without a new version: withdrawn under the overdue policy.`,
          now,
        );
        report.expired.push(id);
        report.escalations += await queueOverdueEscalation(tx, row.v, row.segment, 'review-withdrawn');
      } else {
        report.overdue.push(id);
        report.escalations += await queueOverdueEscalation(tx, row.v, row.segment, 'review-overdue');
        await notifyModels(tx, row.v, row.segment, 'assumption.overdue', now);
      }
    });
  }

  const live = await db
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(eq(assumptionVersions.status, 'published'));
  for (const { v, segment } of live) {
    const left = daysBetween(today, v.reviewBy);
    const kind = reviewReminderKind(left);
    if (!kind) continue;
    report.reminders += await queueReviewReminder(db, v, segment, kind, left);
  }
  report.findingReminders = await queueFindingReminders(db, now);
  report.evidence = await sweepEvidence(db, now);
  return report;
}
