import 'server-only';
import { and, asc, desc, eq, inArray, isNotNull, lte, sql } from 'drizzle-orm';
import { getDb } from '@/db/client';
import type { DbOrTx } from '@/db/connection';
import { assumptions, assumptionVersions, type AssumptionStatus, type AssumptionVersion, type OverduePolicy } from '@/db/schema';
import { todayIso } from '@/lib/assumptions/dates';
import { inForceCutoff, judgeInForce } from '@/lib/assumptions/in-force';
import { overduePolicyAt } from '@/lib/assumptions/overdue-policy';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { AppError } from '@/lib/errors';
import { evidenceOf, type EvidenceDto } from '../evidence-store';
import { policyChanges } from '../overdue-policy';
import { prepared } from '../prepared';
import type { ApiPrincipal, TokenScope } from '../tokens';
import { versionDtos, type VersionDto } from './dto';

/**
 * Consumer reads (the /api/v1 routes with API tokens, and signed-in users): the version in force at
 * a date, an exact published version, the published library.
 */
const everPublished: AssumptionStatus[] = ['published', 'superseded', 'expired', 'retired'];

/** A consumer is a signed-in user (any role reads published versions) or an API token with the scope. */
export type Consumer = SessionUser | ApiPrincipal;

/** Whether a version is past its review-by date on the asked day, and the policy that decided what that means. */
export type ReviewState = { reviewBy: string; overdue: boolean; policy: OverduePolicy };

/** What the consumer API answers about a version: the version, the state of its evidence and of its review. */
export type ConsumerVersionDto = VersionDto & { evidence: EvidenceDto; review: ReviewState };

async function withEvidence(db: DbOrTx, dtos: VersionDto[], review: (v: VersionDto) => ReviewState): Promise<ConsumerVersionDto[]> {
  const evidence = await evidenceOf(db, dtos);
  return dtos.map((v) => ({ ...v, evidence: evidence.get(v.id)!, review: review(v) }));
}

export function assertConsumer(p: Consumer, scope: TokenScope): void {
  if ('kind' in p && p.kind === 'token') {
    if (!p.scopes.includes(scope)) throw new AppError('forbidden:token-scope', `This API token does not carry the scope ${scope}.`);
    return;
  }
  assertCan(p as SessionUser, 'assumptions:read');
}

/**
 * The version of a segment in force on `asOf`, as seen at `now`: the rule of
 * lib/assumptions/in-force.ts (the supersession chain by publication time; the state at the end of
 * that day, or now), with the last publication found by one indexed query. A date with nothing in
 * force is a 404 whose sentence says why (nothing published yet, past review-by, retired).
 */
export async function versionInForce(consumer: Consumer, segment: string, asOf: string, now: Date = new Date()): Promise<ConsumerVersionDto> {
  assertConsumer(consumer, 'assumptions:read');
  const db = getDb();
  const cutoff = inForceCutoff(asOf, now);
  const [last] = await prepared(db, 'last-publication-of-segment', () =>
    db
      .select({ v: assumptionVersions, segment: assumptions.segment })
      .from(assumptionVersions)
      .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
      .where(and(eq(assumptions.segment, sql.placeholder('segment')), isNotNull(assumptionVersions.publishedAt), lte(assumptionVersions.publishedAt, sql.placeholder('cutoff'))))
      .orderBy(desc(assumptionVersions.publishedAt), desc(assumptionVersions.version))
      .limit(1)
      .prepare(),
  ).execute({ segment, cutoff });
  const policy = overduePolicyAt(await policyChanges(db), cutoff);
  const judged = judgeSegment(segment, last ? last.v : null, asOf, cutoff, policy);
  if (judged instanceof AppError) throw judged;
  return (await withEvidence(db, await versionDtos(db, [last!]), (v) => ({ reviewBy: v.reviewBy, overdue: judged.overdue, policy })))[0];
}

/**
 * The in-force rule's answer for one segment given its last publication up to the cutoff: the
 * version is in force (overdue or not), or the AppError (404) whose sentence says why not.
 */
function judgeSegment(segment: string, last: AssumptionVersion | null, asOf: string, cutoff: Date, policy: OverduePolicy): { overdue: boolean } | AppError {
  const answer = judgeInForce(last, asOf, cutoff, policy);
  switch (answer.kind) {
    case 'in-force':
      return { overdue: answer.overdue };
    case 'none':
      return new AppError('not_found:assumption', `No published assumption for the segment “${segment}” was in force on ${asOf}.`);
    case 'expired':
      return new AppError(
        'not_found:assumption-expired',
        `Version ${answer.version.version} of “${segment}” was due for review by ${answer.version.reviewBy} and is withdrawn under the institution's overdue policy: it is not in force on ${asOf}.`,
        { policy: 'withdraw', reviewBy: answer.version.reviewBy },
      );
    case 'retired':
      return new AppError('not_found:assumption-retired', `Version ${answer.version.version} of “${segment}” was retired on ${answer.on} and is not in force on ${asOf}.`);
    case 'ended':
      return new AppError(
        'not_found:assumption',
        `Version ${answer.version.version} of “${segment}” stopped being the published one on ${answer.on}; no version was in force on ${asOf}.`,
      );
  }
}

/** The review state of a version read as it is now (an exact version, the published library). */
async function reviewNow(db: DbOrTx, now: Date): Promise<(v: VersionDto) => ReviewState> {
  const policy = overduePolicyAt(await policyChanges(db), now);
  const today = todayIso(now);
  return (v) => ({ reviewBy: v.reviewBy, overdue: v.status === 'published' && v.reviewBy < today, policy });
}

export async function publishedVersion(consumer: Consumer, assumptionId: number, version: number, now: Date = new Date()): Promise<ConsumerVersionDto> {
  assertConsumer(consumer, 'assumptions:read');
  const db = getDb();
  const [row] = await db
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(and(eq(assumptionVersions.assumptionId, assumptionId), eq(assumptionVersions.version, version), inArray(assumptionVersions.status, everPublished)));
  if (!row) throw new AppError('not_found:assumption', `There is no published version ${version} of assumption ${assumptionId}.`);
  return (await withEvidence(db, await versionDtos(db, [row]), await reviewNow(db, now)))[0];
}

/** The versions published now, one per segment. */
export async function listPublished(consumer: Consumer, scope: TokenScope = 'assumptions:read', now: Date = new Date()): Promise<ConsumerVersionDto[]> {
  assertConsumer(consumer, scope);
  const db = getDb();
  const rows = await db
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(eq(assumptionVersions.status, 'published'))
    .orderBy(asc(assumptions.segment));
  return withEvidence(db, await versionDtos(db, rows), await reviewNow(db, now));
}

/**
 * Every segment's version in force on `asOf`, and the segments without one (with the reason): the
 * rule of versionInForce for each segment ever published, read with a fixed number of queries (every
 * publication up to the cutoff, the policy, the DTOs and the evidence once for all segments).
 */
export async function listInForce(consumer: Consumer, asOf: string, now: Date = new Date()): Promise<{ versions: ConsumerVersionDto[]; missing: { segment: string; reason: string }[] }> {
  assertConsumer(consumer, 'assumptions:read');
  const db = getDb();
  const cutoff = inForceCutoff(asOf, now);
  const segs = await prepared(db, 'segments-ever-published', () =>
    db
      .selectDistinct({ segment: assumptions.segment })
      .from(assumptions)
      .innerJoin(assumptionVersions, eq(assumptionVersions.assumptionId, assumptions.id))
      .where(inArray(assumptionVersions.status, everPublished))
      .orderBy(asc(assumptions.segment))
      .prepare(),
  ).execute();
  const published = await prepared(db, 'publications-up-to', () =>
    db
      .select({ v: assumptionVersions, segment: assumptions.segment })
      .from(assumptionVersions)
      .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
      .where(and(isNotNull(assumptionVersions.publishedAt), lte(assumptionVersions.publishedAt, sql.placeholder('cutoff'))))
      .orderBy(desc(assumptionVersions.publishedAt), desc(assumptionVersions.version))
      .prepare(),
  ).execute({ cutoff });
  // The first row of a segment in that order is its last publication up to the cutoff.
  const lastOf = new Map<string, (typeof published)[number]>();
  for (const row of published) if (!lastOf.has(row.segment)) lastOf.set(row.segment, row);
  const policy = overduePolicyAt(await policyChanges(db), cutoff);
  const inForce: { row: (typeof published)[number]; overdue: boolean }[] = [];
  const missing: { segment: string; reason: string }[] = [];
  for (const { segment } of segs) {
    const last = lastOf.get(segment) ?? null;
    const judged = judgeSegment(segment, last ? last.v : null, asOf, cutoff, policy);
    if (judged instanceof AppError) missing.push({ segment, reason: judged.message });
    else inForce.push({ row: last!, overdue: judged.overdue });
  }
  const overdueOf = new Map(inForce.map((x) => [x.row.v.id, x.overdue]));
  const versions = await withEvidence(db, await versionDtos(db, inForce.map((x) => x.row)), (v) => ({ reviewBy: v.reviewBy, overdue: overdueOf.get(v.id)!, policy }));
  return { versions, missing };
}
