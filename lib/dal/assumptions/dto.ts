import 'server-only';
import { inArray, sql } from 'drizzle-orm';
import type { DbOrTx } from '@/db/connection';
import { users, type AssumptionAuditRow, type AssumptionStatus, type AssumptionVersion } from '@/db/schema';
import type { FieldChange, VersionContent } from '@/lib/assumptions/content';
import type { DefinitionSpan } from '@/lib/ingest/default-definition';
import type { EvidenceDto } from '../evidence-store';
import type { OverduePolicy } from '@/db/schema';
import type { UserAction } from '@/lib/assumptions/lifecycle';
import type { PublicationNote } from '@/lib/assumptions/publication';
import { prepared } from '../prepared';

/**
 * What the assumption screens, route handlers and the consumer API receive: small objects built
 * from the rows, never the rows themselves, with people as names and e-mails.
 */
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

export type VersionPageDto = {
  version: VersionDto;
  versions: VersionDto[];
  reviews: ReviewDto[];
  audit: AuditDto[];
  actions: UserAction[];
  /** When the version publishes or published, in a sentence (null for a rejected version). */
  publication: PublicationNote | null;
  makerIds: number[];
  /** The diff against the previous version (or, when asked, another version of the same assumption). */
  changesFromPrevious: FieldChange[] | null;
  /** The version the diff is taken against (before); null when there is none. */
  comparedWith: { id: number; version: number } | null;
  /** Role changes of the people who reviewed this version, between its drafting and its decision (or now). */
  roleChanges: RoleChangeDto[];
  /** Whether the evidence behind the version has aged, with the monitoring backtest. */
  evidence: EvidenceDto;
  /** Past its review-by date while published, and the overdue policy in force. */
  review: { reviewBy: string; overdue: boolean; policy: OverduePolicy };
};

/** A role change (from the administration log) of someone who reviewed a version, during its review. */
export type RoleChangeDto = { at: string; person: PersonDto | null; from: string | null; to: string | null; by: string; approver: boolean };

export type LibraryEntryDto = {
  assumptionId: number;
  segment: string;
  current: VersionDto | null;
  /**
   * 'ok' | 'expiring' (review-by within 30 days) | 'overdue' (past review-by, still served under the
   * flag policy) | 'expired' (withdrawn: the last published version expired).
   */
  health: 'ok' | 'expiring' | 'overdue' | 'expired' | 'none';
  /** Whether the evidence of the current version has aged (null without a current version). */
  evidence: EvidenceDto | null;
  daysToReview: number | null;
  pending: { id: number; version: number; status: AssumptionStatus } | null;
  /** With an as-of date: why nothing (or an expired version) was in force on that day; otherwise null. */
  note: string | null;
};

/** An item of a person's queue: a segment's version or a factor-correlation matrix's (`segment` names it, `href` opens it). */
export type QueueItemDto = { id: number; segment: string; version: number; status: AssumptionStatus; why: string; updatedAt: string; href: string; finalValue?: number };

/** The content of a version (evidence and judgement) with its segment, as hashed and diffed. */
export function contentOf(v: AssumptionVersion, segment: string): VersionContent {
  return {
    segment,
    fitRunId: v.fitRunId,
    datasetId: v.datasetId,
    datasetSha256: v.datasetSha256,
    engineVersion: v.engineVersion,
    seeds: v.seeds,
    estimator: v.estimator,
    factorModel: v.factorModel,
    prior: v.prior ?? null,
    mixingLaw: v.mixingLaw,
    nu: v.nu ?? null,
    nuInterval: v.nuInterval ?? null,
    estimate: v.estimate,
    intervalMethod: v.intervalMethod,
    intervalLevel: v.intervalLevel,
    intervalLower: v.intervalLower,
    intervalUpper: v.intervalUpper,
    pd: v.pd,
    windowFrom: v.windowFrom,
    windowTo: v.windowTo,
    defaultDefinitions: (v.defaultDefinitions as DefinitionSpan[] | null) ?? undefined,
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

export async function peopleById(db: DbOrTx, ids: (number | null)[]): Promise<Map<number, PersonDto>> {
  const wanted = [...new Set(ids.filter((x): x is number => typeof x === 'number'))];
  if (!wanted.length) return new Map();
  const columns = { id: users.id, name: users.name, email: users.email };
  // Up to three people (a version's author, editor and validator) through one prepared query, the
  // list padded with its first id; more through a query built for the list.
  const rows =
    wanted.length <= 3
      ? await prepared(db, 'people-up-to-three', () =>
          db
            .select(columns)
            .from(users)
            .where(inArray(users.id, [sql.placeholder('a'), sql.placeholder('b'), sql.placeholder('c')]))
            .prepare(),
        ).execute({ a: wanted[0], b: wanted[1] ?? wanted[0], c: wanted[2] ?? wanted[0] })
      : await db.select(columns).from(users).where(inArray(users.id, wanted));
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

/** Versions with their segment as DTOs (one query for the people of all of them). */
export async function versionDtos(db: DbOrTx, rows: { v: AssumptionVersion; segment: string }[]): Promise<VersionDto[]> {
  const people = await peopleById(
    db,
    rows.flatMap((r) => [r.v.authorId, r.v.lastEditedBy, r.v.validatorId]),
  );
  return rows.map((r) => toVersionDto(r.v, r.segment, people));
}

export function toAuditDto(r: AssumptionAuditRow): AuditDto {
  return {
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
  };
}
