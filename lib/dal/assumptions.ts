import 'server-only';
import { and, asc, desc, eq, inArray, isNotNull, lte, sql } from 'drizzle-orm';
import type { MySqlTransaction } from 'drizzle-orm/mysql-core';
import { getDb } from '@/db/client';
import type { Db } from '@/db/connection';
import {
  assumptionAudit,
  assumptionReviews,
  assumptions,
  assumptionVersions,
  users,
  type AssumptionStatus,
  type AssumptionVersion,
  type Role,
} from '@/db/schema';
import {
  contentHash,
  diffVersions,
  draftInputSchema,
  editInputSchema,
  judgementProblems,
  type DraftInput,
  type EditInput,
  type FieldChange,
  type VersionContent,
} from '@/lib/assumptions/content';
import { defaultReviewBy, EXPIRING_SOON_DAYS, daysBetween, todayIso } from '@/lib/assumptions/dates';
import { pickEvidence } from '@/lib/assumptions/evidence';
import {
  availableActions,
  openStatuses,
  planEdit,
  planTransition,
  type UserAction,
} from '@/lib/assumptions/lifecycle';
import { conservativeValue } from '@/lib/assumptions/margins';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { env } from '@/lib/env';
import { AppError } from '@/lib/errors';
import { queueMail } from '@/lib/mail/outbox';
import type { MailKind } from '@/lib/mail/templates';
import { loadFitEvidence } from './fit-evidence';
import type { ApiPrincipal, TokenScope } from './tokens';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type Tx = MySqlTransaction<any, any, any, any>;
type DbOrTx = Pick<Db, 'select' | 'selectDistinct' | 'insert' | 'update'>;

/** Who acted: a person, or the scheduler. */
type Actor = { id: number | null; email: string; role: Role | 'system'; name: string };
const SYSTEM: Actor = { id: null, email: 'system', role: 'system', name: 'Rhobook scheduler' };

function asActor(u: SessionUser): Actor {
  return { id: u.id, email: u.email, role: u.role, name: u.name };
}

// ---------------------------------------------------------------------------------------------
// DTOs
// ---------------------------------------------------------------------------------------------

export type PersonDto = { id: number; name: string; email: string };

export type VersionDto = VersionContent & {
  id: number;
  assumptionId: number;
  version: number;
  status: AssumptionStatus;
  contentHash: string;
  author: PersonDto | null;
  lastEditedBy: PersonDto | null;
  validator: PersonDto | null;
  decisionComment: string | null;
  decidedAt: string | null;
  publishedAt: string | null;
  endedAt: string | null;
  createdAt: string;
  updatedAt: string;
  lineage: { fitUrl: string | null; datasetUrl: string | null };
};

export type AuditDto = {
  id: number;
  versionId: number;
  version: number;
  action: string;
  actorEmail: string;
  actorRole: string;
  fromStatus: string | null;
  toStatus: string;
  comment: string | null;
  contentHash: string;
  at: string;
};

export type ReviewDto = { id: number; reviewer: PersonDto | null; action: string; comment: string | null; contentHash: string; voided: boolean; at: string };

function contentOf(v: AssumptionVersion, segment: string): VersionContent {
  return {
    segment,
    fitRunId: v.fitRunId,
    datasetId: v.datasetId,
    datasetSha256: v.datasetSha256,
    engineVersion: v.engineVersion,
    seeds: v.seeds,
    estimator: v.estimator,
    estimate: v.estimate,
    intervalMethod: v.intervalMethod,
    intervalLevel: v.intervalLevel,
    intervalLower: v.intervalLower,
    intervalUpper: v.intervalUpper,
    pd: v.pd,
    windowFrom: v.windowFrom,
    windowTo: v.windowTo,
    marginData: v.marginData,
    marginDataRationale: v.marginDataRationale,
    marginPractice: v.marginPractice,
    marginPracticeRationale: v.marginPracticeRationale,
    marginGeneral: v.marginGeneral,
    marginGeneralRationale: v.marginGeneralRationale,
    conservativeValue: v.conservativeValue,
    finalValue: v.finalValue,
    intendedUses: v.intendedUses,
    limitations: v.limitations,
    effectiveDate: v.effectiveDate,
    reviewBy: v.reviewBy,
  };
}

async function peopleById(db: DbOrTx, ids: (number | null)[]): Promise<Map<number, PersonDto>> {
  const wanted = [...new Set(ids.filter((x): x is number => typeof x === 'number'))];
  if (!wanted.length) return new Map();
  const rows = await db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(inArray(users.id, wanted));
  return new Map(rows.map((r) => [r.id, r]));
}

function iso(d: Date | null): string | null {
  return d ? d.toISOString() : null;
}

function toVersionDto(v: AssumptionVersion, segment: string, people: Map<number, PersonDto>): VersionDto {
  return {
    ...contentOf(v, segment),
    id: v.id,
    assumptionId: v.assumptionId,
    version: v.version,
    status: v.status,
    contentHash: v.contentHash,
    author: people.get(v.authorId) ?? null,
    lastEditedBy: v.lastEditedBy ? (people.get(v.lastEditedBy) ?? null) : null,
    validator: v.validatorId ? (people.get(v.validatorId) ?? null) : null,
    decisionComment: v.decisionComment,
    decidedAt: iso(v.decidedAt),
    publishedAt: iso(v.publishedAt),
    endedAt: iso(v.endedAt),
    createdAt: v.createdAt.toISOString(),
    updatedAt: v.updatedAt.toISOString(),
    lineage: {
      fitUrl: v.fitRunId ? `/fits/${v.fitRunId}` : null,
      datasetUrl: v.datasetId ? `/data/${v.datasetId}` : null,
    },
  };
}

async function versionDtos(db: DbOrTx, rows: { v: AssumptionVersion; segment: string }[]): Promise<VersionDto[]> {
  const people = await peopleById(
    db,
    rows.flatMap((r) => [r.v.authorId, r.v.lastEditedBy, r.v.validatorId]),
  );
  return rows.map((r) => toVersionDto(r.v, r.segment, people));
}

// ---------------------------------------------------------------------------------------------
// Writes
// ---------------------------------------------------------------------------------------------

function invalid(issues: { path: PropertyKey[]; message: string }[], code = 'invalid:assumption'): AppError {
  const first = issues[0];
  return new AppError(code as `invalid:${string}`, first?.message ?? 'The assumption is not valid.', {
    field: first ? first.path.map(String).join('.') : null,
    problems: issues.map((i) => ({ field: i.path.map(String).join('.'), message: i.message })),
  });
}

function crossProblems(estimate: number, j: Parameters<typeof judgementProblems>[1]): void {
  const problems = judgementProblems(estimate, j);
  if (problems.length) {
    throw new AppError('invalid:assumption', problems[0].message, { field: problems[0].field, problems });
  }
}

async function appendAudit(
  tx: DbOrTx,
  v: { id: number; assumptionId: number; version: number },
  actor: Actor,
  e: { action: string; from: AssumptionStatus | null; to: AssumptionStatus; comment?: string | null; contentHash: string },
): Promise<void> {
  await tx.insert(assumptionAudit).values({
    assumptionId: v.assumptionId,
    versionId: v.id,
    version: v.version,
    action: e.action,
    actorId: actor.id,
    actorEmail: actor.email,
    actorRole: actor.role,
    fromStatus: e.from,
    toStatus: e.to,
    comment: e.comment?.trim() || null,
    contentHash: e.contentHash,
  });
}

/**
 * Drafts a new version of the segment's assumption from a fit run. Only analysts draft. The
 * evidence (dataset hash, fit run, engine version, seeds, the estimator's value, interval and PD)
 * is copied from the fit run and frozen. A segment has at most one version on its way to
 * publication at a time.
 */
export async function createDraft(actor: SessionUser, input: DraftInput): Promise<VersionDto> {
  assertCan(actor, 'assumptions:draft', `Only analysts draft assumptions; your role is ${actor.role}.`);
  const parsed = draftInputSchema.safeParse(input);
  if (!parsed.success) throw invalid(parsed.error.issues);
  const d = parsed.data;
  return getDb().transaction(async (tx) => {
    const fit = await loadFitEvidence(tx, d.fitId);
    const picked = pickEvidence(fit.results, d.segment, d.estimator, d.intervalMethod);
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

    await tx.insert(assumptions).ignore().values({ segment: d.segment, createdBy: actor.id });
    const [a] = await tx.select().from(assumptions).where(eq(assumptions.segment, d.segment)).for('update');
    const existing = await tx
      .select({ version: assumptionVersions.version, status: assumptionVersions.status })
      .from(assumptionVersions)
      .where(eq(assumptionVersions.assumptionId, a.id));
    const open = existing.find((e) => openStatuses.includes(e.status));
    if (open) {
      throw new AppError(
        'conflict:open-version',
        `Version ${open.version} of ${d.segment} is still ${open.status.replace('_', ' ')}: finish or withdraw it before drafting another.`,
      );
    }
    const version = existing.reduce((m, e) => Math.max(m, e.version), 0) + 1;
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
    });
    const id = res.insertId;
    await appendAudit(tx, { id, assumptionId: a.id, version }, asActor(actor), { action: 'draft', from: null, to: 'draft', contentHash: hash });
    const [row] = await tx.select().from(assumptionVersions).where(eq(assumptionVersions.id, id));
    return (await versionDtos(tx, [{ v: row, segment: d.segment }]))[0];
  });
}

async function lockVersion(tx: Tx, id: number): Promise<{ v: AssumptionVersion; segment: string }> {
  const [row] = await tx
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(eq(assumptionVersions.id, id))
    .for('update');
  if (!row) throw new AppError('not_found:assumption', 'There is no such assumption version.');
  return row;
}

/** The drafter and everyone who edited the version (from the audit trail, which cannot be altered). */
async function makerIds(tx: DbOrTx, v: AssumptionVersion): Promise<number[]> {
  const rows = await tx
    .selectDistinct({ id: assumptionAudit.actorId })
    .from(assumptionAudit)
    .where(and(eq(assumptionAudit.versionId, v.id), inArray(assumptionAudit.action, ['draft', 'edit'])));
  return [...new Set([v.authorId, ...(v.lastEditedBy ? [v.lastEditedBy] : []), ...rows.map((r) => r.id).filter((x): x is number => x !== null)])];
}

/**
 * Edits the analyst's judgement of a version. The evidence stays frozen. Editing a version after
 * submission sends it back to draft and voids earlier reviews; a published, superseded, expired,
 * retired or rejected version is immutable.
 */
export async function editDraft(actor: SessionUser, id: number, input: EditInput): Promise<VersionDto> {
  const parsedInput = editInputSchema.safeParse(input);
  if (!parsedInput.success) throw invalid(parsedInput.error.issues);
  const e = parsedInput.data;
  return getDb().transaction(async (tx) => {
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
        updatedAt: sql`CURRENT_TIMESTAMP(3)`,
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
    });
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
  return getDb().transaction(async (tx) => {
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
    });
    await applyTransition(tx, { v, segment }, asActor(actor), input.action, from, to, input.comment ?? null, now);
    return { id, status: to, previous: from };
  });
}

async function applyTransition(
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
  await appendAudit(tx, v, actor, { action, from, to, comment, contentHash: v.contentHash });

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
      });
    }
  }
  await notify(tx, { ...v, status: to }, segment, action, actor, comment);
}

// ---------------------------------------------------------------------------------------------
// E-mail on transitions (written to the outbox in the same transaction)
// ---------------------------------------------------------------------------------------------

function appUrl(path: string): string {
  const base = (env().NEXTAUTH_URL ?? 'http://127.0.0.1:3000').replace(/\/$/, '');
  return `${base}${path}`;
}

async function activeEmails(tx: DbOrTx, where: { role?: Role; ids?: number[] }): Promise<{ id: number; email: string }[]> {
  const conds = [eq(users.active, true)];
  if (where.role) conds.push(eq(users.role, where.role));
  if (where.ids) {
    if (!where.ids.length) return [];
    conds.push(inArray(users.id, where.ids));
  }
  return tx.select({ id: users.id, email: users.email }).from(users).where(and(...conds));
}

async function notify(tx: Tx, v: AssumptionVersion, segment: string, action: string, actor: Actor, comment: string | null): Promise<void> {
  let kind: MailKind | null = null;
  let to: string[] = [];
  const makers = await makerIds(tx, v);
  switch (action) {
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
      kind = action === 'approve' ? 'approved' : 'rejected';
      to = (await activeEmails(tx, { ids: makers })).map((u) => u.email);
      break;
    case 'publish':
      kind = 'published';
      to = (await activeEmails(tx, { ids: [...makers, ...(v.validatorId ? [v.validatorId] : [])] })).map((u) => u.email);
      break;
  }
  if (!kind) return;
  await queueMail(tx, {
    kind,
    to,
    versionId: v.id,
    facts: {
      segment,
      version: v.version,
      finalValue: v.finalValue,
      effectiveDate: v.effectiveDate,
      reviewBy: v.reviewBy,
      actorName: actor.name,
      comment,
      url: appUrl(`/library/versions/${v.id}`),
    },
  });
}

// ---------------------------------------------------------------------------------------------
// The scheduler's transitions (workers/scheduler.ts): publish on the effective date, expire after
// the review-by date, remind 30 and 7 days before it (once each)
// ---------------------------------------------------------------------------------------------

export type ScheduleReport = { published: number[]; expired: number[]; reminders: number };

export async function runScheduledTransitions(now: Date = new Date(), db: Db = getDb()): Promise<ScheduleReport> {
  const today = todayIso(now);
  const report: ScheduleReport = { published: [], expired: [], reminders: 0 };

  const due = await db
    .select({ id: assumptionVersions.id })
    .from(assumptionVersions)
    .where(and(eq(assumptionVersions.status, 'approved'), lte(assumptionVersions.effectiveDate, today)))
    .orderBy(asc(assumptionVersions.effectiveDate), asc(assumptionVersions.id));
  for (const { id } of due) {
    await db.transaction(async (tx) => {
      const row = await lockVersion(tx, id);
      if (row.v.status !== 'approved' || row.v.effectiveDate > today) return;
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
    const makers = await makerIds(db, v);
    const to = (await activeEmails(db, { ids: [...makers, ...(v.validatorId ? [v.validatorId] : [])] })).map((u) => u.email);
    report.reminders += await queueMail(db, {
      kind,
      to,
      versionId: v.id,
      dedupeKey: (addr) => `${kind}:${v.id}:${v.reviewBy}:${addr}`,
      facts: {
        segment,
        version: v.version,
        finalValue: v.finalValue,
        effectiveDate: v.effectiveDate,
        reviewBy: v.reviewBy,
        daysLeft: left,
        url: appUrl(`/library/versions/${v.id}`),
      },
    });
  }
  return report;
}

// ---------------------------------------------------------------------------------------------
// Reads
// ---------------------------------------------------------------------------------------------

/** What may a person see? Everyone with assumptions:read sees every version (drafts included):
 * maker-checker needs the validators and the audit to see drafts; viewers see only what has been
 * published. */
function visibleToViewer(status: AssumptionStatus): boolean {
  return status === 'published' || status === 'superseded' || status === 'expired' || status === 'retired';
}

function canSeeVersion(actor: SessionUser, status: AssumptionStatus): boolean {
  return actor.role !== 'viewer' || visibleToViewer(status);
}

export type VersionPageDto = {
  version: VersionDto;
  versions: VersionDto[];
  reviews: ReviewDto[];
  audit: AuditDto[];
  actions: UserAction[];
  makerIds: number[];
  /** The diff against the previous version (or, when asked, another version of the same assumption). */
  changesFromPrevious: FieldChange[] | null;
  /** The version the diff is taken against (before); null when there is none. */
  comparedWith: { id: number; version: number } | null;
};

/**
 * Everything the assumption page shows. `compareTo` (a version id of the same assumption that the
 * person may see) chooses the version the diff is taken against; by default the previous one.
 */
export async function getVersionPage(actor: SessionUser, id: number, now: Date = new Date(), compareTo?: number): Promise<VersionPageDto> {
  assertCan(actor, 'assumptions:read');
  const db = getDb();
  const [row] = await db
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(eq(assumptionVersions.id, id));
  if (!row || !canSeeVersion(actor, row.v.status)) throw new AppError('not_found:assumption', 'There is no such assumption version.');
  const all = await db
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(eq(assumptionVersions.assumptionId, row.v.assumptionId))
    .orderBy(desc(assumptionVersions.version));
  const visible = all.filter((r) => canSeeVersion(actor, r.v.status));
  const dtos = await versionDtos(db, visible);
  const version = dtos.find((d) => d.id === id)!;
  const reviewRows = await db.select().from(assumptionReviews).where(eq(assumptionReviews.versionId, id)).orderBy(asc(assumptionReviews.id));
  const reviewers = await peopleById(db, reviewRows.map((r) => r.reviewerId));
  const makers = await makerIds(db, row.v);
  const asked = compareTo !== undefined && compareTo !== id ? dtos.find((d) => d.id === compareTo) : undefined;
  const prev = asked ?? dtos.filter((d) => d.version < version.version).sort((a, b) => b.version - a.version)[0];
  return {
    version,
    versions: dtos,
    reviews: actor.role === 'viewer' ? [] : reviewRows.map((r) => ({
      id: r.id,
      reviewer: reviewers.get(r.reviewerId) ?? null,
      action: r.action,
      comment: r.comment,
      contentHash: r.contentHash,
      voided: r.voided,
      at: r.at.toISOString(),
    })),
    audit: await listAudit(actor, row.v.assumptionId),
    actions: availableActions({ actor, status: row.v.status, makerIds: makers, effectiveDate: row.v.effectiveDate, today: todayIso(now) }),
    makerIds: makers,
    changesFromPrevious: prev ? diffVersions(prev, version) : null,
    comparedWith: prev ? { id: prev.id, version: prev.version } : null,
  };
}

export async function getVersion(actor: SessionUser, id: number): Promise<VersionDto> {
  return (await getVersionPage(actor, id)).version;
}

/** The audit trail of an assumption (all versions), oldest first. Viewers see the rows of versions
 * they may see. */
export async function listAudit(actor: SessionUser, assumptionId: number): Promise<AuditDto[]> {
  assertCan(actor, 'assumptions:read');
  const db = getDb();
  const rows = await db.select().from(assumptionAudit).where(eq(assumptionAudit.assumptionId, assumptionId)).orderBy(asc(assumptionAudit.id));
  let visibleIds: Set<number> | null = null;
  if (actor.role === 'viewer') {
    const vs = await db
      .select({ id: assumptionVersions.id, status: assumptionVersions.status })
      .from(assumptionVersions)
      .where(eq(assumptionVersions.assumptionId, assumptionId));
    visibleIds = new Set(vs.filter((v) => visibleToViewer(v.status)).map((v) => v.id));
    if (!visibleIds.size) throw new AppError('not_found:assumption', 'There is no such assumption.');
  }
  return rows
    .filter((r) => !visibleIds || visibleIds.has(r.versionId))
    .map((r) => ({
      id: r.id,
      versionId: r.versionId,
      version: r.version,
      action: r.action,
      actorEmail: r.actorEmail,
      actorRole: r.actorRole,
      fromStatus: r.fromStatus,
      toStatus: r.toStatus,
      comment: r.comment,
      contentHash: r.contentHash,
      at: r.at.toISOString(),
    }));
}

/** Neutralises a CSV cell: quotes it and prefixes formula starters (= + - @) with an apostrophe. */
export function csvCell(v: unknown): string {
  let s = v === null || v === undefined ? '' : typeof v === 'object' ? JSON.stringify(v) : String(v);
  if (/^[=+\-@\t\r]/.test(s)) s = `'${s}`;
  return /[",\n\r;]/.test(s) || s !== s.trim() ? `"${s.replace(/"/g, '""')}"` : s;
}

export function toCsv(header: string[], rows: unknown[][]): string {
  return [header, ...rows].map((r) => r.map(csvCell).join(',')).join('\r\n') + '\r\n';
}

export async function auditCsv(actor: SessionUser, assumptionId: number): Promise<{ filename: string; csv: string }> {
  const rows = await listAudit(actor, assumptionId);
  const [a] = await getDb().select().from(assumptions).where(eq(assumptions.id, assumptionId));
  if (!a) throw new AppError('not_found:assumption', 'There is no such assumption.');
  return {
    filename: `audit-${a.segment.replace(/[^A-Za-z0-9_-]+/g, '_')}.csv`,
    csv: toCsv(
      ['id', 'at', 'segment', 'version', 'action', 'actor', 'role', 'from', 'to', 'comment', 'content_sha256'],
      rows.map((r) => [r.id, r.at, a.segment, r.version, r.action, r.actorEmail, r.actorRole, r.fromStatus, r.toStatus, r.comment, r.contentHash]),
    ),
  };
}

export type LibraryEntryDto = {
  assumptionId: number;
  segment: string;
  current: VersionDto | null;
  /** 'ok' | 'expiring' (review-by within 30 days) | 'expired' (the last published version expired). */
  health: 'ok' | 'expiring' | 'expired' | 'none';
  daysToReview: number | null;
  pending: { id: number; version: number; status: AssumptionStatus } | null;
};

/** The library by segment: the published version (or the last one that lapsed) and what is pending. */
export async function listLibrary(actor: SessionUser, now: Date = new Date()): Promise<LibraryEntryDto[]> {
  assertCan(actor, 'assumptions:read');
  const db = getDb();
  const today = todayIso(now);
  const rows = await db
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .orderBy(asc(assumptions.segment), desc(assumptionVersions.version));
  const dtos = await versionDtos(db, rows);
  const bySegment = new Map<number, VersionDto[]>();
  for (const d of dtos) bySegment.set(d.assumptionId, [...(bySegment.get(d.assumptionId) ?? []), d]);
  const out: LibraryEntryDto[] = [];
  for (const [assumptionId, vs] of bySegment) {
    const published = vs.find((v) => v.status === 'published');
    const lapsed = !published ? vs.find((v) => v.status === 'expired') : undefined;
    const pending = vs.find((v) => openStatuses.includes(v.status));
    if (actor.role === 'viewer' && !published && !lapsed) continue;
    const current = published ?? lapsed ?? null;
    const days = current ? daysBetween(today, current.reviewBy) : null;
    out.push({
      assumptionId,
      segment: vs[0].segment,
      current,
      health: !current ? 'none' : lapsed || (days !== null && days < 0) ? 'expired' : days !== null && days <= EXPIRING_SOON_DAYS ? 'expiring' : 'ok',
      daysToReview: days,
      pending: pending && actor.role !== 'viewer' ? { id: pending.id, version: pending.version, status: pending.status } : null,
    });
  }
  return out;
}

export type QueueItemDto = { id: number; segment: string; version: number; status: AssumptionStatus; why: string; updatedAt: string; finalValue: number };

/**
 * What awaits this person: validators see submitted versions they may review (not their own) and
 * reviews they started; analysts see their drafts sent back with changes requested. (Approved
 * versions need no one: the scheduler publishes them on their effective date.)
 */
export async function listQueue(actor: SessionUser): Promise<QueueItemDto[]> {
  assertCan(actor, 'assumptions:read');
  if (actor.role !== 'validator' && actor.role !== 'analyst') return [];
  const db = getDb();
  const statuses: AssumptionStatus[] = actor.role === 'validator' ? ['submitted', 'in_review'] : ['draft'];
  const rows = await db
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(inArray(assumptionVersions.status, statuses))
    .orderBy(asc(assumptionVersions.updatedAt));
  const out: QueueItemDto[] = [];
  for (const { v, segment } of rows) {
    const makers = await makerIds(db, v);
    let why: string | null = null;
    if (actor.role === 'validator') {
      if (makers.includes(actor.id)) continue;
      if (v.status === 'submitted') why = 'Submitted: awaiting review';
      else {
        const [mine] = await db
          .select({ id: assumptionReviews.id })
          .from(assumptionReviews)
          .where(and(eq(assumptionReviews.versionId, v.id), eq(assumptionReviews.reviewerId, actor.id), eq(assumptionReviews.voided, false)))
          .limit(1);
        if (mine) why = 'In review by you: decide';
      }
    } else if (makers.includes(actor.id)) {
      const [last] = await db
        .select({ action: assumptionAudit.action })
        .from(assumptionAudit)
        .where(eq(assumptionAudit.versionId, v.id))
        .orderBy(desc(assumptionAudit.id))
        .limit(1);
      if (last?.action === 'request-changes') why = `Changes requested: ${v.decisionComment ?? 'see the comment'}`;
    }
    if (why) out.push({ id: v.id, segment, version: v.version, status: v.status, why, updatedAt: v.updatedAt.toISOString(), finalValue: v.finalValue });
  }
  return out;
}

/** For the Overview: how many items await this person (see listQueue). */
export async function countAwaitingMe(actor: SessionUser): Promise<number> {
  return (await listQueue(actor)).length;
}

/** Versions of every status for the analyst's own view of drafts (not viewers). */
export async function listOpenVersions(actor: SessionUser): Promise<VersionDto[]> {
  assertCan(actor, 'assumptions:read');
  if (actor.role === 'viewer') return [];
  const db = getDb();
  const rows = await db
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(inArray(assumptionVersions.status, [...openStatuses]))
    .orderBy(asc(assumptions.segment));
  return versionDtos(db, rows);
}

// ---------------------------------------------------------------------------------------------
// Consumer reads (API tokens): the version in force at a date, an exact version, the export
// ---------------------------------------------------------------------------------------------

const everPublished: AssumptionStatus[] = ['published', 'superseded', 'expired', 'retired'];

/** A consumer is a signed-in user (any role reads published versions) or an API token with the scope. */
export type Consumer = SessionUser | ApiPrincipal;

function assertConsumer(p: Consumer, scope: TokenScope): void {
  if ('kind' in p && p.kind === 'token') {
    if (!p.scopes.includes(scope)) throw new AppError('forbidden:token-scope', `This API token does not carry the scope ${scope}.`);
    return;
  }
  assertCan(p as SessionUser, 'assumptions:read');
}

/**
 * The version of a segment in force on `asOf`: among versions that were published, the one with
 * the latest effective date on or before `asOf`, provided its review-by date had not passed and it
 * had not been retired by then.
 */
export async function versionInForce(consumer: Consumer, segment: string, asOf: string): Promise<VersionDto> {
  assertConsumer(consumer, 'assumptions:read');
  const db = getDb();
  const rows = await db
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(
      and(
        eq(assumptions.segment, segment),
        inArray(assumptionVersions.status, everPublished),
        isNotNull(assumptionVersions.publishedAt),
        lte(assumptionVersions.effectiveDate, asOf),
      ),
    )
    .orderBy(desc(assumptionVersions.effectiveDate), desc(assumptionVersions.version))
    .limit(1);
  const hit = rows[0];
  if (!hit) throw new AppError('not_found:assumption', `No published assumption for the segment “${segment}” was in force on ${asOf}.`);
  if (hit.v.reviewBy < asOf) {
    throw new AppError(
      'not_found:assumption-expired',
      `Version ${hit.v.version} of “${segment}” was due for review by ${hit.v.reviewBy} and is not in force on ${asOf}.`,
    );
  }
  if (hit.v.status === 'retired' && hit.v.endedAt && todayIso(hit.v.endedAt) <= asOf) {
    throw new AppError('not_found:assumption-retired', `Version ${hit.v.version} of “${segment}” was retired on ${todayIso(hit.v.endedAt)}.`);
  }
  return (await versionDtos(db, [hit]))[0];
}

export async function publishedVersion(consumer: Consumer, assumptionId: number, version: number): Promise<VersionDto> {
  assertConsumer(consumer, 'assumptions:read');
  const db = getDb();
  const [row] = await db
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(and(eq(assumptionVersions.assumptionId, assumptionId), eq(assumptionVersions.version, version), inArray(assumptionVersions.status, everPublished)));
  if (!row) throw new AppError('not_found:assumption', `There is no published version ${version} of assumption ${assumptionId}.`);
  return (await versionDtos(db, [row]))[0];
}

/** The versions published now, one per segment. */
export async function listPublished(consumer: Consumer, scope: TokenScope = 'assumptions:read'): Promise<VersionDto[]> {
  assertConsumer(consumer, scope);
  const db = getDb();
  const rows = await db
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(eq(assumptionVersions.status, 'published'))
    .orderBy(asc(assumptions.segment));
  return versionDtos(db, rows);
}

/** Every segment's version in force on `asOf`, and the segments without one (with the reason). */
export async function listInForce(consumer: Consumer, asOf: string): Promise<{ versions: VersionDto[]; missing: { segment: string; reason: string }[] }> {
  assertConsumer(consumer, 'assumptions:read');
  const segs = await getDb()
    .selectDistinct({ segment: assumptions.segment })
    .from(assumptions)
    .innerJoin(assumptionVersions, eq(assumptionVersions.assumptionId, assumptions.id))
    .where(inArray(assumptionVersions.status, everPublished))
    .orderBy(asc(assumptions.segment));
  const versions: VersionDto[] = [];
  const missing: { segment: string; reason: string }[] = [];
  for (const { segment } of segs) {
    try {
      versions.push(await versionInForce(consumer, segment, asOf));
    } catch (err) {
      if (err instanceof AppError && err.kind === 'not_found') missing.push({ segment, reason: err.message });
      else throw err;
    }
  }
  return { versions, missing };
}
