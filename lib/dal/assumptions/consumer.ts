import 'server-only';
import { and, asc, desc, eq, inArray, isNotNull, lte } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { assumptions, assumptionVersions, type AssumptionStatus } from '@/db/schema';
import { inForceCutoff, judgeInForce } from '@/lib/assumptions/in-force';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { AppError } from '@/lib/errors';
import type { ApiPrincipal, TokenScope } from '../tokens';
import { versionDtos, type VersionDto } from './dto';

/**
 * Consumer reads (the /api/v1 routes with API tokens, and signed-in users): the version in force at
 * a date, an exact published version, the published library.
 */
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
 * The version of a segment in force on `asOf`, as seen at `now`: the rule of
 * lib/assumptions/in-force.ts (the supersession chain by publication time; the state at the end of
 * that day, or now), with the last publication found by one indexed query. A date with nothing in
 * force is a 404 whose sentence says why (nothing published yet, past review-by, retired).
 */
export async function versionInForce(consumer: Consumer, segment: string, asOf: string, now: Date = new Date()): Promise<VersionDto> {
  assertConsumer(consumer, 'assumptions:read');
  const db = getDb();
  const cutoff = inForceCutoff(asOf, now);
  const [last] = await db
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(and(eq(assumptions.segment, segment), isNotNull(assumptionVersions.publishedAt), lte(assumptionVersions.publishedAt, cutoff)))
    .orderBy(desc(assumptionVersions.publishedAt), desc(assumptionVersions.version))
    .limit(1);
  const answer = judgeInForce(last ? last.v : null, asOf, cutoff);
  switch (answer.kind) {
    case 'in-force':
      return (await versionDtos(db, [last!]))[0];
    case 'none':
      throw new AppError('not_found:assumption', `No published assumption for the segment “${segment}” was in force on ${asOf}.`);
    case 'expired':
      throw new AppError(
        'not_found:assumption-expired',
        `Version ${answer.version.version} of “${segment}” was due for review by ${answer.version.reviewBy} and is not in force on ${asOf}.`,
      );
    case 'retired':
      throw new AppError(
        'not_found:assumption-retired',
        `Version ${answer.version.version} of “${segment}” was retired on ${answer.on} and is not in force on ${asOf}.`,
      );
    case 'ended':
      throw new AppError(
        'not_found:assumption',
        `Version ${answer.version.version} of “${segment}” stopped being the published one on ${answer.on}; no version was in force on ${asOf}.`,
      );
  }
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
export async function listInForce(consumer: Consumer, asOf: string, now: Date = new Date()): Promise<{ versions: VersionDto[]; missing: { segment: string; reason: string }[] }> {
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
      versions.push(await versionInForce(consumer, segment, asOf, now));
    } catch (err) {
      if (err instanceof AppError && err.kind === 'not_found') missing.push({ segment, reason: err.message });
      else throw err;
    }
  }
  return { versions, missing };
}
