import 'server-only';
import { and, eq } from 'drizzle-orm';
import { getDb } from '@/db/client';
import type { DbOrTx, Tx } from '@/db/connection';
import { transactionWithRetry } from '@/db/transaction';
import { assumptionAudit, assumptionReviews, assumptions, assumptionVersions, type AssumptionStatus, type AssumptionVersion } from '@/db/schema';
import {
  contentHash,
  draftInputSchema,
  editInputSchema,
  judgementProblems,
  type DraftInput,
  type EditInput,
  type VersionContent,
} from '@/lib/assumptions/content';
import { defaultReviewBy, todayIso } from '@/lib/assumptions/dates';
import { pickEvidence } from '@/lib/assumptions/evidence';
import { nextVersionNumber, planEdit, planTransition, type UserAction } from '@/lib/assumptions/lifecycle';
import { conservativeValue } from '@/lib/assumptions/margins';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { AppError, parseOrThrow } from '@/lib/errors';
import { definitionsOf } from '../default-definitions';
import { loadFitEvidence } from '../fit-evidence';
import { blockingRefusal } from '../findings';
import { notifyModels } from '../model-notify';
import { asActor, auditEventFields, makerIds, SYSTEM, type Actor } from './actors';
import { contentOf, versionDtos, type VersionDto } from './dto';
import { notifyTransition } from './notify';

/**
 * The writes of the assumption lifecycle: drafting, editing and every transition, each in one
 * transaction with its audit row, review record and outbox mail. Every write takes the time it
 * happens at (`now`, default the clock): the demo seed writes a history in the past through these
 * same rules with its own clock.
 */
function crossProblems(estimate: number, j: Parameters<typeof judgementProblems>[1]): void {
  const problems = judgementProblems(estimate, j);
  if (problems.length) {
    const fieldErrors: Record<string, string> = {};
    for (const p of problems) if (!(p.field in fieldErrors)) fieldErrors[p.field] = p.message;
    throw new AppError('invalid:assumption', problems[0].message, { field: problems[0].field, fieldErrors });
  }
}

async function appendAudit(
  tx: DbOrTx,
  v: { id: number; assumptionId: number; version: number },
  actor: Actor,
  e: { action: string; from: AssumptionStatus | null; to: AssumptionStatus; comment?: string | null; contentHash: string },
  at: Date,
): Promise<void> {
  await tx.insert(assumptionAudit).values({
    assumptionId: v.assumptionId,
    versionId: v.id,
    version: v.version,
    ...auditEventFields(actor, e, e.contentHash, at),
  });
}

/**
 * Drafts a new version of the segment's assumption from a fit run. Only analysts draft. The
 * evidence (dataset hash, fit run, engine version, seeds, the estimator's value, interval and PD)
 * is copied from the fit run and frozen. A segment has at most one version on its way to
 * publication at a time: of drafts of one segment sent at once, one is stored and the others are
 * refused with 409 naming it (the losers of the lock on the segment's row are run again and then
 * see the winner's draft).
 */
export async function createDraft(actor: SessionUser, input: DraftInput, now: Date = new Date()): Promise<VersionDto> {
  assertCan(actor, 'assumptions:draft', `Only analysts draft assumptions; your role is ${actor.role}.`);
  const d = parseOrThrow(draftInputSchema, input, 'invalid:assumption', 'The assumption is not valid.');
  return transactionWithRetry(getDb(), async (tx) => {
    const fit = await loadFitEvidence(tx, d.fitId);
    const picked = pickEvidence(fit.results, d.segment, d.estimator, d.intervalMethod);
    const definitions = fit.datasetId
      ? ((await definitionsOf(tx, fit.datasetId, [d.segment], { from: picked.windowFrom, to: picked.windowTo })).get(d.segment) ?? [])
      : [];
    const margins = { data: d.margins.data.value, practice: d.margins.practice.value, general: d.margins.general.value };
    const cons = conservativeValue(picked.estimate, margins);
    const judgement = {
      marginData: margins.data,
      marginDataRationale: d.margins.data.rationale,
      marginPractice: margins.practice,
      marginPracticeRationale: d.margins.practice.rationale,
      marginGeneral: margins.general,
      marginGeneralRationale: d.margins.general.rationale,
      finalValue: d.finalValue ?? cons,
      intendedUses: d.intendedUses,
      limitations: d.limitations,
      effectiveDate: d.effectiveDate,
      reviewBy: d.reviewBy ?? defaultReviewBy(d.effectiveDate),
    };
    crossProblems(picked.estimate, judgement);

    await tx.insert(assumptions).ignore().values({ segment: d.segment, createdBy: actor.id, createdAt: now });
    const [a] = await tx.select().from(assumptions).where(eq(assumptions.segment, d.segment)).for('update');
    // A locking read: it sees what another draft committed while this one waited for the segment's
    // row, where a plain read would see the snapshot taken before (REPEATABLE READ) and pick the same number.
    const existing = await tx
      .select({ version: assumptionVersions.version, status: assumptionVersions.status })
      .from(assumptionVersions)
      .where(eq(assumptionVersions.assumptionId, a.id))
      .for('update');
    const version = nextVersionNumber(existing, d.segment, (s) => s.replace('_', ' '));
    const content: VersionContent = {
      segment: d.segment,
      fitRunId: fit.fitRunId,
      datasetId: fit.datasetId,
      datasetSha256: fit.datasetSha256,
      engineVersion: fit.engineVersion,
      seeds: fit.seeds,
      estimator: d.estimator,
      intervalMethod: d.intervalMethod,
      ...picked,
      defaultDefinitions: definitions,
      ...judgement,
      conservativeValue: cons,
    };
    const hash = contentHash(content);
    const { segment: _segment, ...columns } = content;
    const [res] = await tx.insert(assumptionVersions).values({
      ...columns,
      assumptionId: a.id,
      version,
      status: 'draft',
      contentHash: hash,
      authorId: actor.id,
      createdAt: now,
      updatedAt: now,
    });
    const id = res.insertId;
    await appendAudit(tx, { id, assumptionId: a.id, version }, asActor(actor), { action: 'draft', from: null, to: 'draft', contentHash: hash }, now);
    const [row] = await tx.select().from(assumptionVersions).where(eq(assumptionVersions.id, id));
    return (await versionDtos(tx, [{ v: row, segment: d.segment }]))[0];
  });
}

/** Reads a version with its segment and locks it for the rest of the transaction. */
export async function lockVersion(tx: Tx, id: number): Promise<{ v: AssumptionVersion; segment: string }> {
  const [row] = await tx
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(eq(assumptionVersions.id, id))
    .for('update');
  if (!row) throw new AppError('not_found:assumption', 'There is no such assumption version.');
  return row;
}

/**
 * Edits the analyst's judgement of a version. The evidence stays frozen. Editing a version after
 * submission sends it back to draft and voids earlier reviews; a published, superseded, expired,
 * retired or rejected version is immutable.
 */
export async function editDraft(actor: SessionUser, id: number, input: EditInput, now: Date = new Date()): Promise<VersionDto> {
  const e = parseOrThrow(editInputSchema, input, 'invalid:assumption', 'The assumption is not valid.');
  return transactionWithRetry(getDb(), async (tx) => {
    const { v, segment } = await lockVersion(tx, id);
    assertCan(actor, 'assumptions:read');
    const { from, to } = planEdit({ actor, status: v.status });
    const margins = {
      data: e.margins?.data.value ?? v.marginData,
      practice: e.margins?.practice.value ?? v.marginPractice,
      general: e.margins?.general.value ?? v.marginGeneral,
    };
    const cons = conservativeValue(v.estimate, margins);
    const effectiveDate = e.effectiveDate ?? v.effectiveDate;
    const judgement = {
      marginData: margins.data,
      marginDataRationale: e.margins?.data.rationale ?? v.marginDataRationale,
      marginPractice: margins.practice,
      marginPracticeRationale: e.margins?.practice.rationale ?? v.marginPracticeRationale,
      marginGeneral: margins.general,
      marginGeneralRationale: e.margins?.general.rationale ?? v.marginGeneralRationale,
      finalValue: e.finalValue ?? (e.margins ? Math.max(cons, v.finalValue) : v.finalValue),
      intendedUses: e.intendedUses ?? v.intendedUses,
      limitations: e.limitations ?? v.limitations,
      effectiveDate,
      reviewBy: e.reviewBy ?? (e.effectiveDate ? defaultReviewBy(effectiveDate) : v.reviewBy),
    };
    crossProblems(v.estimate, judgement);
    const content: VersionContent = { ...contentOf(v, segment), ...judgement, conservativeValue: cons };
    const hash = contentHash(content);
    await tx
      .update(assumptionVersions)
      .set({
        ...judgement,
        conservativeValue: cons,
        contentHash: hash,
        status: to,
        lastEditedBy: actor.id,
        validatorId: null,
        decisionComment: null,
        decidedAt: null,
        updatedAt: now,
      })
      .where(eq(assumptionVersions.id, id));
    if (from !== 'draft') {
      await tx.update(assumptionReviews).set({ voided: true }).where(eq(assumptionReviews.versionId, id));
    }
    await appendAudit(tx, v, asActor(actor), {
      action: 'edit',
      from,
      to,
      comment: from !== 'draft' ? `Edited while ${from.replace('_', ' ')}: returned to draft; earlier reviews voided.` : null,
      contentHash: hash,
    }, now);
    const [row] = await tx.select().from(assumptionVersions).where(eq(assumptionVersions.id, id));
    return (await versionDtos(tx, [{ v: row, segment }]))[0];
  });
}

/**
 * Applies a user's transition. Role, state and person are checked here, in the transaction that
 * writes the new state, the audit row and the outbox e-mails.
 */
export async function transition(
  actor: SessionUser,
  id: number,
  input: { action: UserAction; comment?: string | null },
  now: Date = new Date(),
): Promise<{ id: number; status: AssumptionStatus; previous: AssumptionStatus }> {
  assertCan(actor, 'assumptions:read');
  return transactionWithRetry(getDb(), async (tx) => {
    const { v, segment } = await lockVersion(tx, id);
    const today = todayIso(now);
    const makers = await makerIds(tx, v);
    const { from, to } = planTransition(input.action, {
      actor,
      status: v.status,
      makerIds: makers,
      comment: input.comment,
      effectiveDate: v.effectiveDate,
      today,
      approvedOn: v.decidedAt ? todayIso(v.decidedAt) : null,
    });
    if (input.action === 'approve') {
      // An unresolved high finding on the version, its fit or its dataset blocks approval.
      const refusal = await blockingRefusal(tx, v);
      if (refusal) throw refusal;
    }
    await applyTransition(tx, { v, segment }, asActor(actor), input.action, from, to, input.comment ?? null, now);
    return { id, status: to, previous: from };
  });
}

/**
 * Writes a planned transition: the new state and its dates, the review record, the audit row, the
 * supersession of the segment's previous published version, and the mail.
 */
export async function applyTransition(
  tx: Tx,
  { v, segment }: { v: AssumptionVersion; segment: string },
  actor: Actor,
  action: string,
  from: AssumptionStatus,
  to: AssumptionStatus,
  comment: string | null,
  now: Date,
): Promise<void> {
  const set: Partial<typeof assumptionVersions.$inferInsert> = { status: to, updatedAt: now };
  const isReview = action === 'start-review' || action === 'request-changes' || action === 'reject' || action === 'approve';
  if (action === 'approve' || action === 'reject') {
    set.validatorId = actor.id;
    set.decisionComment = comment?.trim() || null;
    set.decidedAt = now;
  }
  if (action === 'request-changes') {
    set.decisionComment = comment?.trim() || null;
  }
  if (action === 'publish') set.publishedAt = now;
  if (action === 'retire' || action === 'expire' || action === 'supersede') set.endedAt = now;
  await tx.update(assumptionVersions).set(set).where(eq(assumptionVersions.id, v.id));
  if (isReview && actor.id !== null) {
    await tx.insert(assumptionReviews).values({ versionId: v.id, reviewerId: actor.id, action, comment: comment?.trim() || null, contentHash: v.contentHash, at: now });
  }
  await appendAudit(tx, v, actor, { action, from, to, comment, contentHash: v.contentHash }, now);

  if (action === 'publish') {
    // The previous published version of the segment is superseded.
    const previous = await tx
      .select()
      .from(assumptionVersions)
      .where(and(eq(assumptionVersions.assumptionId, v.assumptionId), eq(assumptionVersions.status, 'published')))
      .for('update');
    for (const p of previous) {
      if (p.id === v.id) continue;
      await tx.update(assumptionVersions).set({ status: 'superseded', endedAt: now, updatedAt: now }).where(eq(assumptionVersions.id, p.id));
      await appendAudit(tx, p, SYSTEM, {
        action: 'supersede',
        from: 'published',
        to: 'superseded',
        comment: `Superseded by version ${v.version}.`,
        contentHash: p.contentHash,
      }, now);
      await notifyModels(tx, { ...p, status: 'superseded' }, segment, 'assumption.superseded', now, { supersededBy: v.version });
    }
  }
  await notifyTransition(tx, { ...v, status: to }, segment, action, actor, comment);
  // The models that use the assumption hear of what changes their input.
  const modelEvent = action === 'publish' ? 'assumption.published' : action === 'retire' ? 'assumption.retired' : action === 'expire' ? 'assumption.withdrawn' : null;
  if (modelEvent) await notifyModels(tx, { ...v, status: to }, segment, modelEvent, now);
}
