import 'server-only';
import { and, asc, eq, inArray, lt, lte } from 'drizzle-orm';
import { getDb } from '@/db/client';
import type { Db, DbOrTx, Tx } from '@/db/connection';
import { transactionWithRetry } from '@/db/transaction';
import { factorMatrices, factorMatrixAudit, factorMatrixVersions, type AssumptionStatus, type FactorMatrixVersion } from '@/db/schema';
import { daysBetween, defaultReviewBy, todayIso } from '@/lib/assumptions/dates';
import { backDatingProblem, nextVersionNumber, planEdit, planTransition, statusLabels, type UserAction } from '@/lib/assumptions/lifecycle';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { appUrl } from '@/lib/env';
import { parseOrThrow } from '@/lib/errors';
import {
  matrixContentHash,
  matrixDraftSchema,
  matrixEditSchema,
  matrixJudgementProblem,
  matrixValue,
  pickMatrixEvidence,
  segmentKey,
  segmentKeyHash,
  type MatrixContent,
  type MatrixDraftInput,
  type MatrixEditInput,
  type MatrixVersionDto,
} from '@/lib/factor-matrices/content';
import { asActor, SYSTEM, type Actor } from '../assumptions/actors';
import { queueEscalation, queueReminder, queueTransitionMail, reviewReminderKind } from '../assumptions/notify';
import { loadFitEvidence } from '../fit-evidence';
import { overduePolicyIn } from '../overdue-policy';
import { appendMatrixAudit, lockMatrixVersion, matrixContentOf, matrixDtos } from './rows';

/**
 * The writes of a factor-correlation matrix's lifecycle: drafting from a fit, every transition (the
 * rules of lib/assumptions/lifecycle.ts: the same roles, maker-checker, required comments and
 * back-dating refusal as the segment assumptions), and the scheduler's publication, each in one
 * transaction with its audit row. Every write takes its time (`now`) so tests and the seed can
 * write a history through the same rules.
 */

/**
 * Drafts a new version of the matrix assumption of a fit's set of segments. Only analysts draft.
 * The evidence (fit run, dataset hash, engine version, seeds, every pair with its interval, the
 * estimated and nearest matrices) is copied and frozen; the value is checked to be a valid
 * correlation matrix. A set of segments has at most one version on its way to publication.
 */
export async function createMatrixDraft(actor: SessionUser, input: MatrixDraftInput, now: Date = new Date()): Promise<MatrixVersionDto> {
  assertCan(actor, 'assumptions:draft', `Only analysts draft assumptions; your role is ${actor.role}.`);
  const d = parseOrThrow(matrixDraftSchema, input, 'invalid:assumption', 'The matrix draft is not valid.');
  const reviewBy = d.reviewBy ?? defaultReviewBy(d.effectiveDate);
  matrixJudgementProblem({ effectiveDate: d.effectiveDate, reviewBy });
  return transactionWithRetry(getDb(), async (tx) => {
    const fit = await loadFitEvidence(tx, d.fitId);
    const evidence = pickMatrixEvidence(fit.results, fit);
    const { value, smallestEigenvalue } = matrixValue(evidence, d.margin.value);
    const hash = segmentKeyHash(evidence.segments);
    await tx.insert(factorMatrices).ignore().values({ segmentKey: segmentKey(evidence.segments), segments: evidence.segments, keyHash: hash, createdBy: actor.id, createdAt: now });
    const [m] = await tx.select().from(factorMatrices).where(eq(factorMatrices.keyHash, hash)).for('update');
    // A locking read sees a draft another request committed while this one waited for the row.
    const existing = await tx
      .select({ version: factorMatrixVersions.version, status: factorMatrixVersions.status })
      .from(factorMatrixVersions)
      .where(eq(factorMatrixVersions.matrixId, m.id))
      .for('update');
    const version = nextVersionNumber(existing, `the matrix of ${evidence.segments.join(', ')}`, (s) => statusLabels[s]);
    const content: MatrixContent = {
      ...evidence,
      margin: d.margin.value,
      marginRationale: d.margin.rationale,
      value,
      valueSmallestEigenvalue: smallestEigenvalue,
      intendedUses: d.intendedUses,
      limitations: d.limitations,
      effectiveDate: d.effectiveDate,
      reviewBy,
    };
    const contentHash = matrixContentHash(content);
    const [res] = await tx.insert(factorMatrixVersions).values({
      ...content,
      matrixId: m.id,
      version,
      status: 'draft',
      contentHash,
      authorId: actor.id,
      createdAt: now,
      updatedAt: now,
    });
    const id = res.insertId;
    await appendMatrixAudit(tx, { id, matrixId: m.id, version, contentHash }, asActor(actor), { action: 'draft', from: null, to: 'draft' }, now);
    const [row] = await tx.select().from(factorMatrixVersions).where(eq(factorMatrixVersions.id, id));
    return (await matrixDtos(tx, [row]))[0];
  });
}

/** The makers of a matrix version: its author and everyone who edited it (from the append-only audit trail). */
export async function matrixMakerIds(db: DbOrTx, v: FactorMatrixVersion): Promise<number[]> {
  const rows = await db
    .selectDistinct({ id: factorMatrixAudit.actorId })
    .from(factorMatrixAudit)
    .where(and(eq(factorMatrixAudit.versionId, v.id), inArray(factorMatrixAudit.action, ['draft', 'edit'])));
  return [...new Set([v.authorId, ...rows.map((r) => r.id).filter((x): x is number => x !== null)])];
}

/**
 * Edits the analyst's judgement of a matrix version (margin and rationale, uses, limitations,
 * dates) by the rules of lib/assumptions/lifecycle.ts planEdit: only analysts; a version after
 * submission returns to draft and its earlier decision is cleared; a published, superseded,
 * expired, retired or rejected version is immutable. The evidence stays frozen; the value is
 * recomputed and checked again.
 */
export async function editMatrixDraft(actor: SessionUser, id: number, input: MatrixEditInput, now: Date = new Date()): Promise<MatrixVersionDto> {
  const e = parseOrThrow(matrixEditSchema, input, 'invalid:assumption', 'The matrix draft is not valid.');
  return transactionWithRetry(getDb(), async (tx) => {
    const v = await lockMatrixVersion(tx, id);
    assertCan(actor, 'assumptions:read');
    const { from, to } = planEdit({ actor, status: v.status });
    const reviewBy = e.reviewBy ?? defaultReviewBy(e.effectiveDate);
    matrixJudgementProblem({ effectiveDate: e.effectiveDate, reviewBy });
    const base = matrixContentOf(v);
    const { value, smallestEigenvalue } = matrixValue(base, e.margin.value);
    const content: MatrixContent = {
      ...base,
      margin: e.margin.value,
      marginRationale: e.margin.rationale,
      value,
      valueSmallestEigenvalue: smallestEigenvalue,
      intendedUses: e.intendedUses,
      limitations: e.limitations,
      effectiveDate: e.effectiveDate,
      reviewBy,
    };
    const contentHash = matrixContentHash(content);
    await tx
      .update(factorMatrixVersions)
      .set({
        margin: content.margin,
        marginRationale: content.marginRationale,
        value,
        valueSmallestEigenvalue: smallestEigenvalue,
        intendedUses: content.intendedUses,
        limitations: content.limitations,
        effectiveDate: content.effectiveDate,
        reviewBy,
        contentHash,
        status: to,
        validatorId: null,
        decisionComment: null,
        decidedAt: null,
        updatedAt: now,
      })
      .where(eq(factorMatrixVersions.id, id));
    await appendMatrixAudit(
      tx,
      { ...v, contentHash },
      asActor(actor),
      { action: 'edit', from, to, comment: from !== 'draft' ? `Edited while ${statusLabels[from]}: returned to draft.` : null },
      now,
    );
    const [row] = await tx.select().from(factorMatrixVersions).where(eq(factorMatrixVersions.id, id));
    return (await matrixDtos(tx, [row]))[0];
  });
}

/** Applies a person's transition under the lifecycle's rules, in the transaction that writes it. */
export async function matrixTransition(
  actor: SessionUser,
  id: number,
  input: { action: UserAction; comment?: string | null },
  now: Date = new Date(),
): Promise<{ id: number; status: AssumptionStatus; previous: AssumptionStatus }> {
  assertCan(actor, 'assumptions:read');
  return transactionWithRetry(getDb(), async (tx) => {
    const v = await lockMatrixVersion(tx, id);
    const { from, to } = planTransition(input.action, {
      actor,
      status: v.status,
      makerIds: await matrixMakerIds(tx, v),
      comment: input.comment,
      effectiveDate: v.effectiveDate,
      today: todayIso(now),
      approvedOn: v.decidedAt ? todayIso(v.decidedAt) : null,
    });
    await applyMatrixTransition(tx, v, asActor(actor), input.action, from, to, input.comment ?? null, now);
    return { id, status: to, previous: from };
  });
}

/** Writes a planned transition: the state and its dates, the audit row, the supersession of the set's previous published version. */
async function applyMatrixTransition(
  tx: Tx,
  v: FactorMatrixVersion,
  actor: Actor,
  action: string,
  from: AssumptionStatus,
  to: AssumptionStatus,
  comment: string | null,
  now: Date,
): Promise<void> {
  const set: Partial<typeof factorMatrixVersions.$inferInsert> = { status: to, updatedAt: now };
  if (action === 'approve' || action === 'reject') {
    set.validatorId = actor.id;
    set.decisionComment = comment?.trim() || null;
    set.decidedAt = now;
  }
  if (action === 'request-changes') set.decisionComment = comment?.trim() || null;
  if (action === 'publish') set.publishedAt = now;
  if (action === 'retire' || action === 'expire' || action === 'supersede') set.endedAt = now;
  await tx.update(factorMatrixVersions).set(set).where(eq(factorMatrixVersions.id, v.id));
  await appendMatrixAudit(tx, v, actor, { action, from, to, comment }, now);
  // The same e-mail as a segment's version (the outbox's version_id is left empty: it names segment versions).
  await queueTransitionMail(tx, {
    action,
    makers: await matrixMakerIds(tx, v),
    validatorId: action === 'approve' || action === 'reject' ? actor.id : v.validatorId,
    facts: matrixMailFacts(v),
    actor,
    comment,
  });
  if (action !== 'publish') return;
  const previous = await tx
    .select()
    .from(factorMatrixVersions)
    .where(and(eq(factorMatrixVersions.matrixId, v.matrixId), eq(factorMatrixVersions.status, 'published')))
    .for('update');
  for (const p of previous) {
    if (p.id === v.id) continue;
    await tx.update(factorMatrixVersions).set({ status: 'superseded', endedAt: now, updatedAt: now }).where(eq(factorMatrixVersions.id, p.id));
    await appendMatrixAudit(tx, p, SYSTEM, { action: 'supersede', from: 'published', to: 'superseded', comment: `Superseded by version ${v.version}.` }, now);
  }
}

/** What the scheduler did to matrix versions (lib/dal/assumptions/scheduler.ts reports it). */
export type MatrixScheduleReport = {
  published: number[];
  expired: number[];
  refused: { id: number; reason: string }[];
  /** 30- and 7-day review-by reminders written (messages). */
  reminders: number;
  /** Escalations past review-by written (messages): flagged overdue, or withdrawn. */
  escalations: number;
};

/** What a message about a matrix version says of it. */
function matrixMailFacts(v: FactorMatrixVersion) {
  return {
    segment: `the factor-correlation matrix of ${v.segments.join(', ')}`,
    version: v.version,
    finalValue: null,
    effectiveDate: v.effectiveDate,
    reviewBy: v.reviewBy,
    url: appUrl(`/library/matrices/${v.id}`),
  };
}

/** The escalation of a matrix version past its review-by date, once per version and date (dedupe keys apart from the segment versions'). */
function escalateMatrix(db: DbOrTx, v: FactorMatrixVersion, kind: 'review-overdue' | 'review-withdrawn'): Promise<number> {
  const f = matrixMailFacts(v);
  return queueEscalation(db, kind, { what: f.segment, version: v.version, reviewBy: v.reviewBy, url: f.url, dedupe: `matrix:${kind}:${v.id}:${v.reviewBy}` });
}

/**
 * The scheduler's step for matrices (lib/dal/assumptions/scheduler.ts calls it), the rules of a
 * segment's version: publishes approved versions on their effective date, never one whose
 * effective date is before its approval date; reminds the makers and the validator 30 and 7 days
 * before a published version's review-by date (once each); past it, escalates once to the
 * validators and administrators and, under the withdraw policy, expires the version (under the
 * flag policy it stays in force, flagged overdue in the API's `review`). Re-checks each under its
 * row lock, so several workers may run it at once.
 */
export async function publishDueMatrices(now: Date, db: Db): Promise<MatrixScheduleReport> {
  const today = todayIso(now);
  const out: MatrixScheduleReport = { published: [], expired: [], refused: [], reminders: 0, escalations: 0 };
  const due = await db
    .select({ id: factorMatrixVersions.id })
    .from(factorMatrixVersions)
    .where(and(eq(factorMatrixVersions.status, 'approved'), lte(factorMatrixVersions.effectiveDate, today)))
    .orderBy(asc(factorMatrixVersions.effectiveDate), asc(factorMatrixVersions.id));
  for (const { id } of due) {
    await db.transaction(async (tx) => {
      const v = await lockMatrixVersion(tx, id);
      if (v.status !== 'approved' || v.effectiveDate > today) return;
      const problem = v.decidedAt ? backDatingProblem(v.effectiveDate, todayIso(v.decidedAt), 'publish') : null;
      if (problem) {
        out.refused.push({ id, reason: problem });
        return;
      }
      await applyMatrixTransition(tx, v, SYSTEM, 'publish', 'approved', 'published', `Effective date ${v.effectiveDate} reached.`, now);
      out.published.push(id);
    });
  }
  const policy = await overduePolicyIn(db, now);
  const stale = await db
    .select({ id: factorMatrixVersions.id })
    .from(factorMatrixVersions)
    .where(and(eq(factorMatrixVersions.status, 'published'), lt(factorMatrixVersions.reviewBy, today)));
  for (const { id } of stale) {
    await db.transaction(async (tx) => {
      const v = await lockMatrixVersion(tx, id);
      if (v.status !== 'published' || v.reviewBy >= today) return;
      if (policy === 'withdraw') {
        await applyMatrixTransition(tx, v, SYSTEM, 'expire', 'published', 'expired', `Review-by date ${v.reviewBy} passed without a new version: withdrawn under the overdue policy.`, now);
        out.expired.push(id);
        out.escalations += await escalateMatrix(tx, v, 'review-withdrawn');
      } else {
        out.escalations += await escalateMatrix(tx, v, 'review-overdue');
      }
    });
  }
  const live = await db.select().from(factorMatrixVersions).where(eq(factorMatrixVersions.status, 'published'));
  for (const v of live) {
    const left = daysBetween(today, v.reviewBy);
    const kind = reviewReminderKind(left);
    if (!kind) continue;
    out.reminders += await queueReminder(db, {
      kind,
      daysLeft: left,
      makers: await matrixMakerIds(db, v),
      validatorId: v.validatorId,
      dedupe: `matrix:${kind}:${v.id}:${v.reviewBy}`,
      facts: matrixMailFacts(v),
    });
  }
  return out;
}
