import 'server-only';
import { and, asc, desc, eq, inArray } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { factorMatrices, factorMatrixAudit, factorMatrixVersions, type AssumptionStatus } from '@/db/schema';
import { todayIso } from '@/lib/assumptions/dates';
import { availableActions, type UserAction } from '@/lib/assumptions/lifecycle';
import { publicationNote, type PublicationNote } from '@/lib/assumptions/publication';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import type { MatrixVersionDto } from '@/lib/factor-matrices/content';
import { AppError } from '@/lib/errors';
import type { AuditDto, QueueItemDto } from '../assumptions/dto';
import { canSeeVersion } from '../assumptions/visibility';
import { getHealth } from '../health';
import { matrixDtos } from './rows';
import { matrixMakerIds } from './writes';
import { queueReason } from '@/lib/assumptions/queue';

/** What the library and the version page read of the matrix assumptions; viewers see only what has been published. */
export type MatrixLibraryEntryDto = {
  matrixId: number;
  segments: string[];
  /** The newest version this person may see. */
  latest: { id: number; version: number; status: AssumptionStatus; effectiveDate: string; reviewBy: string };
  /** The published version now, if any. */
  published: { id: number; version: number; effectiveDate: string } | null;
};

export type MatrixVersionPageDto = {
  version: MatrixVersionDto;
  versions: MatrixVersionDto[];
  audit: AuditDto[];
  actions: UserAction[];
  publication: PublicationNote | null;
  makerIds: number[];
};

export async function listMatrixLibrary(actor: SessionUser): Promise<MatrixLibraryEntryDto[]> {
  assertCan(actor, 'assumptions:read');
  const rows = await getDb()
    .select({ v: factorMatrixVersions, segments: factorMatrices.segments })
    .from(factorMatrixVersions)
    .innerJoin(factorMatrices, eq(factorMatrices.id, factorMatrixVersions.matrixId))
    .orderBy(asc(factorMatrixVersions.matrixId), desc(factorMatrixVersions.version));
  const out = new Map<number, MatrixLibraryEntryDto>();
  for (const { v, segments } of rows) {
    if (!canSeeVersion(actor, v.status)) continue;
    let e = out.get(v.matrixId);
    if (!e) {
      e = { matrixId: v.matrixId, segments: v.segments ?? segments, latest: { id: v.id, version: v.version, status: v.status, effectiveDate: v.effectiveDate, reviewBy: v.reviewBy }, published: null };
      out.set(v.matrixId, e);
    }
    if (v.status === 'published' && !e.published) e.published = { id: v.id, version: v.version, effectiveDate: v.effectiveDate };
  }
  return [...out.values()];
}

export async function getMatrixVersionPage(actor: SessionUser, id: number, now: Date = new Date()): Promise<MatrixVersionPageDto> {
  assertCan(actor, 'assumptions:read');
  const db = getDb();
  const [row] = await db.select().from(factorMatrixVersions).where(eq(factorMatrixVersions.id, id));
  if (!row || !canSeeVersion(actor, row.status)) throw new AppError('not_found:factor-matrix', 'There is no such factor-correlation matrix version.');
  const all = (await db.select().from(factorMatrixVersions).where(eq(factorMatrixVersions.matrixId, row.matrixId)).orderBy(desc(factorMatrixVersions.version))).filter((v) =>
    canSeeVersion(actor, v.status),
  );
  const dtos = await matrixDtos(db, all);
  const version = dtos.find((d) => d.id === id)!;
  const audit = await db
    .select()
    .from(factorMatrixAudit)
    .where(inArray(factorMatrixAudit.versionId, all.map((v) => v.id)))
    .orderBy(asc(factorMatrixAudit.id));
  const schedulerRunning = !(await getHealth()).worker.stale;
  const today = todayIso(now);
  const makers = await matrixMakerIds(db, row);
  return {
    version,
    versions: dtos,
    audit: audit.map((a) => ({
      id: a.id,
      versionId: a.versionId,
      version: a.version,
      action: a.action,
      actorEmail: a.actorEmail,
      actorRole: a.actorRole,
      fromStatus: a.fromStatus,
      toStatus: a.toStatus,
      comment: a.comment,
      contentHash: a.contentHash,
      at: a.at.toISOString(),
    })),
    actions: availableActions({
      actor,
      status: row.status,
      makerIds: makers,
      effectiveDate: row.effectiveDate,
      today,
      approvedOn: row.decidedAt ? todayIso(row.decidedAt) : null,
      schedulerRunning,
    }),
    publication: publicationNote(version, today, schedulerRunning),
    makerIds: makers,
  };
}

/**
 * The matrix versions awaiting this person, by the rules of the segment assumptions' queue: for a
 * validator, versions submitted for review that they did not draft and reviews they started; for
 * an analyst, their drafts sent back with a request for changes.
 */
export async function listMatrixQueue(actor: SessionUser): Promise<QueueItemDto[]> {
  assertCan(actor, 'assumptions:read');
  if (actor.role !== 'validator' && actor.role !== 'analyst') return [];
  const db = getDb();
  const statuses: AssumptionStatus[] = actor.role === 'validator' ? ['submitted', 'in_review'] : ['draft'];
  const rows = await db.select().from(factorMatrixVersions).where(inArray(factorMatrixVersions.status, statuses)).orderBy(asc(factorMatrixVersions.updatedAt));
  const out: QueueItemDto[] = [];
  for (const v of rows) {
    const why = await queueReason(
      v,
      actor.role,
      (await matrixMakerIds(db, v)).includes(actor.id),
      async () => {
        const [mine] = await db
          .select({ id: factorMatrixAudit.id })
          .from(factorMatrixAudit)
          .where(and(eq(factorMatrixAudit.versionId, v.id), eq(factorMatrixAudit.action, 'start-review'), eq(factorMatrixAudit.actorId, actor.id)))
          .limit(1);
        return Boolean(mine);
      },
      async () => {
        const [last] = await db.select({ action: factorMatrixAudit.action }).from(factorMatrixAudit).where(eq(factorMatrixAudit.versionId, v.id)).orderBy(desc(factorMatrixAudit.id)).limit(1);
        return last?.action ?? null;
      },
    );
    if (why) {
      out.push({ id: v.id, segment: `Matrix of ${v.segments.join(', ')}`, version: v.version, status: v.status, why, updatedAt: v.updatedAt.toISOString(), href: `/library/matrices/${v.id}` });
    }
  }
  return out;
}
