import 'server-only';
import { and, asc, desc, eq, inArray } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { assumptionAudit, assumptionReviews, assumptions, assumptionVersions, type AssumptionStatus, type AssumptionVersion } from '@/db/schema';
import { diffVersions } from '@/lib/assumptions/content';
import { daysBetween, EXPIRING_SOON_DAYS, todayIso } from '@/lib/assumptions/dates';
import { versionInForceAt } from '@/lib/assumptions/in-force';
import { libraryFiltersSchema, matchesLibraryFilters } from '@/lib/assumptions/library-filters';
import { availableActions, openStatuses, reviewActions } from '@/lib/assumptions/lifecycle';
import { publicationNote } from '@/lib/assumptions/publication';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { toCsv } from '@/lib/csv';
import { AppError, parseOrThrow } from '@/lib/errors';
import { roleChangesOf } from '../admin-audit';
import { getHealth } from '../health';
import { evidenceOf } from '../evidence-store';
import { overduePolicyIn } from '../overdue-policy';
import { makerIds } from './actors';
import { queueReason } from '@/lib/assumptions/queue';
import {
  peopleById,
  toAuditDto,
  versionDtos,
  type AuditDto,
  type LibraryEntryDto,
  type QueueItemDto,
  type RoleChangeDto,
  type VersionDto,
  type VersionPageDto,
} from './dto';
import { canSeeVersion, visibleToViewer } from './visibility';

/**
 * Reads for the library screens: a version's page, the audit trail, the library by segment, the
 * review queue and the open versions. Viewers see published versions only.
 */

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
  const roleChanges = await roleChangesDuringReview(row.v, now);
  const asked = compareTo !== undefined && compareTo !== id ? dtos.find((d) => d.id === compareTo) : undefined;
  const schedulerRunning = !(await getHealth()).worker.stale;
  const today = todayIso(now);
  const evidence = (await evidenceOf(db, [version])).get(version.id)!;
  const policy = await overduePolicyIn(db, now);
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
    actions: availableActions({
      actor,
      status: row.v.status,
      makerIds: makers,
      effectiveDate: row.v.effectiveDate,
      today,
      approvedOn: row.v.decidedAt ? todayIso(row.v.decidedAt) : null,
      schedulerRunning,
    }),
    publication: publicationNote(version, today, schedulerRunning),
    makerIds: makers,
    changesFromPrevious: prev ? diffVersions(prev, version) : null,
    comparedWith: prev ? { id: prev.id, version: prev.version } : null,
    roleChanges,
    evidence,
    review: { reviewBy: version.reviewBy, overdue: version.status === 'published' && version.reviewBy < today, policy },
  };
}

/**
 * The role changes of everyone who reviewed the version (and of its approver), logged between its
 * drafting and its decision (or now, while undecided): a reader of the audit trail sees when a
 * validator was made one during the review.
 */
async function roleChangesDuringReview(v: AssumptionVersion, now: Date): Promise<RoleChangeDto[]> {
  const db = getDb();
  const reviewers = await db
    .selectDistinct({ id: assumptionAudit.actorId })
    .from(assumptionAudit)
    .where(and(eq(assumptionAudit.versionId, v.id), inArray(assumptionAudit.action, [...reviewActions])));
  const ids = [...new Set([...reviewers.map((r) => r.id), v.validatorId].filter((x): x is number => x !== null))];
  const changes = await roleChangesOf(db, ids, v.createdAt, v.decidedAt ?? now);
  const people = await peopleById(db, changes.map((c) => c.userId));
  return changes.map((c) => ({
    at: c.at.toISOString(),
    person: people.get(c.userId) ?? null,
    from: c.from,
    to: c.to,
    by: c.byEmail,
    approver: v.validatorId === c.userId && v.status !== 'rejected',
  }));
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
  return rows.filter((r) => !visibleIds || visibleIds.has(r.versionId)).map(toAuditDto);
}

/** The audit trail of an assumption as CSV (the app's one CSV writer; with a byte order mark for spreadsheets). */
export async function auditCsv(actor: SessionUser, assumptionId: number): Promise<{ filename: string; csv: string }> {
  const rows = await listAudit(actor, assumptionId);
  const [a] = await getDb().select().from(assumptions).where(eq(assumptions.id, assumptionId));
  if (!a) throw new AppError('not_found:assumption', 'There is no such assumption.');
  return {
    filename: `audit-${a.segment.replace(/[^A-Za-z0-9_-]+/g, '_')}.csv`,
    csv: toCsv(
      ['id', 'at', 'segment', 'version', 'action', 'actor', 'role', 'from', 'to', 'comment', 'content_sha256'],
      rows.map((r) => [r.id, r.at, a.segment, r.version, r.action, r.actorEmail, r.actorRole, r.fromStatus, r.toStatus, r.comment, r.contentHash]),
      { bom: true },
    ),
  };
}

/**
 * The library by segment: the published version (or the last one that lapsed) and what is pending.
 * `filters` (the library screen's address, parsed here): a piece of the segment's name, the state
 * of the entry, and an as-of date at which the version in force is read by the consumer API's rule
 * (lib/assumptions/in-force.ts) instead of today's published one.
 */
export async function listLibrary(actor: SessionUser, now: Date = new Date(), filters: unknown = {}): Promise<LibraryEntryDto[]> {
  assertCan(actor, 'assumptions:read');
  const f = parseOrThrow(libraryFiltersSchema, filters, 'invalid:library-filters', 'The library filters are not valid.');
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
  const currents = [...bySegment.values()]
    .map((vs) => vs.find((v) => v.status === 'published') ?? vs.find((v) => v.status === 'expired'))
    .filter((v): v is VersionDto => !!v);
  const evidence = await evidenceOf(db, currents);
  const out: LibraryEntryDto[] = [];
  for (const [assumptionId, vs] of bySegment) {
    const pending = vs.find((v) => openStatuses.includes(v.status));
    const pendingDto = pending && actor.role !== 'viewer' ? { id: pending.id, version: pending.version, status: pending.status } : null;
    if (f.asOf) {
      const everPublished = vs.filter((v) => visibleToViewer(v.status));
      if (actor.role === 'viewer' && everPublished.length === 0) continue;
      const records = everPublished.map((v) => ({ ...v, publishedAt: v.publishedAt ? new Date(v.publishedAt) : null, endedAt: v.endedAt ? new Date(v.endedAt) : null, dto: v }));
      const answer = versionInForceAt(records, f.asOf, now);
      const current = answer.kind === 'in-force' || answer.kind === 'expired' ? answer.version.dto : null;
      const days = current ? daysBetween(f.asOf, current.reviewBy) : null;
      out.push({
        assumptionId,
        segment: vs[0].segment,
        current,
        health: answer.kind === 'in-force' ? (days !== null && days <= EXPIRING_SOON_DAYS ? 'expiring' : 'ok') : answer.kind === 'expired' ? 'expired' : 'none',
        daysToReview: days,
        evidence: current ? (evidence.get(current.id) ?? null) : null,
        pending: pendingDto,
        note:
          answer.kind === 'none'
            ? `Nothing was published by ${f.asOf}.`
            : answer.kind === 'expired'
              ? `Version ${answer.version.version} was past its review-by date (${answer.version.reviewBy}) on ${f.asOf}.`
              : answer.kind === 'retired'
                ? `Version ${answer.version.version} was retired on ${answer.on}.`
                : answer.kind === 'ended'
                  ? `Version ${answer.version.version} stopped being the published one on ${answer.on}.`
                  : null,
      });
      continue;
    }
    const published = vs.find((v) => v.status === 'published');
    const lapsed = !published ? vs.find((v) => v.status === 'expired') : undefined;
    if (actor.role === 'viewer' && !published && !lapsed) continue;
    const current = published ?? lapsed ?? null;
    const days = current ? daysBetween(today, current.reviewBy) : null;
    out.push({
      assumptionId,
      segment: vs[0].segment,
      current,
      health: !current
        ? 'none'
        : lapsed
          ? 'expired'
          : days !== null && days < 0
            ? 'overdue'
            : days !== null && days <= EXPIRING_SOON_DAYS
              ? 'expiring'
              : 'ok',
      daysToReview: days,
      evidence: current ? (evidence.get(current.id) ?? null) : null,
      pending: pendingDto,
      note: null,
    });
  }
  return out.filter((e) => matchesLibraryFilters(e, f));
}

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
    const why = await queueReason(
      v,
      actor.role,
      (await makerIds(db, v)).includes(actor.id),
      async () => {
        const [mine] = await db
          .select({ id: assumptionReviews.id })
          .from(assumptionReviews)
          .where(and(eq(assumptionReviews.versionId, v.id), eq(assumptionReviews.reviewerId, actor.id), eq(assumptionReviews.voided, false)))
          .limit(1);
        return Boolean(mine);
      },
      async () => {
        const [last] = await db.select({ action: assumptionAudit.action }).from(assumptionAudit).where(eq(assumptionAudit.versionId, v.id)).orderBy(desc(assumptionAudit.id)).limit(1);
        return last?.action ?? null;
      },
    );
    if (why) out.push({ id: v.id, segment, version: v.version, status: v.status, why, updatedAt: v.updatedAt.toISOString(), href: `/library/versions/${v.id}`, finalValue: v.finalValue });
  }
  return out;
}

/** Versions still on their way to publication, for the analyst's view of drafts (not viewers). */
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
