import 'server-only';
import { and, asc, desc, eq, inArray, isNotNull, lte } from 'drizzle-orm';
import { getDb } from '@/db/client';
import type { DbOrTx } from '@/db/connection';
import { factorMatrices, factorMatrixVersions, type AssumptionStatus } from '@/db/schema';
import { todayIso } from '@/lib/assumptions/dates';
import { inForceCutoff, judgeInForce } from '@/lib/assumptions/in-force';
import { overduePolicyAt } from '@/lib/assumptions/overdue-policy';
import { segmentKeyHash } from '@/lib/factor-matrices/content';
import { toConsumerMatrix, type ConsumerMatrix, type ReviewState } from '@/lib/factor-matrices/consumer';
import { AppError } from '@/lib/errors';
import { assertConsumer, type Consumer } from '../assumptions/consumer';
import { policyChanges } from '../overdue-policy';
import type { TokenScope } from '../tokens';
import { matrixDtos } from './rows';

/**
 * What the consumer API reads of the matrix assumptions: the version of each matrix in force at a
 * date (the rule of lib/assumptions/in-force.ts: the supersession chain by publication time, the
 * state at the end of that day, the overdue policy of then), a matrix's published versions, and the
 * published matrices now (the CSV).
 */
const everPublished: AssumptionStatus[] = ['published', 'superseded', 'expired', 'retired'];

type Missing = { matrixId: number; segments: string[]; reason: string };

async function inForceOne(db: DbOrTx, m: { id: number; segments: string[] }, asOf: string, now: Date): Promise<ConsumerMatrix | Missing> {
  const cutoff = inForceCutoff(asOf, now);
  const [last] = await db
    .select()
    .from(factorMatrixVersions)
    .where(and(eq(factorMatrixVersions.matrixId, m.id), isNotNull(factorMatrixVersions.publishedAt), lte(factorMatrixVersions.publishedAt, cutoff)))
    .orderBy(desc(factorMatrixVersions.publishedAt), desc(factorMatrixVersions.version))
    .limit(1);
  const policy = overduePolicyAt(await policyChanges(db), cutoff);
  const answer = judgeInForce(last ?? null, asOf, cutoff, policy);
  const who = `the matrix of ${m.segments.join(', ')}`;
  switch (answer.kind) {
    case 'in-force':
      return toConsumerMatrix((await matrixDtos(db, [last]))[0], { reviewBy: last.reviewBy, overdue: answer.overdue, policy });
    case 'none':
      return { matrixId: m.id, segments: m.segments, reason: `No version of ${who} was published by ${asOf}.` };
    case 'expired':
      return { matrixId: m.id, segments: m.segments, reason: `Version ${answer.version.version} of ${who} was due for review by ${answer.version.reviewBy} and is withdrawn under the overdue policy: it is not in force on ${asOf}.` };
    case 'retired':
      return { matrixId: m.id, segments: m.segments, reason: `Version ${answer.version.version} of ${who} was retired on ${answer.on} and is not in force on ${asOf}.` };
    case 'ended':
      return { matrixId: m.id, segments: m.segments, reason: `Version ${answer.version.version} of ${who} stopped being the published one on ${answer.on}; no version was in force on ${asOf}.` };
  }
}

/**
 * Every matrix's version in force on `asOf`, and the matrices without one (with the reason). With
 * `segments`, only the matrix of exactly that set (in any order); a set without a matrix is a 404
 * whose sentence says so.
 */
export async function matricesInForce(
  consumer: Consumer,
  asOf: string,
  segments: readonly string[] | null,
  now: Date = new Date(),
): Promise<{ matrices: ConsumerMatrix[]; missing: Missing[] }> {
  assertConsumer(consumer, 'assumptions:read');
  const db = getDb();
  const sets = await db
    .selectDistinct({ id: factorMatrices.id, segments: factorMatrices.segments })
    .from(factorMatrices)
    .innerJoin(factorMatrixVersions, eq(factorMatrixVersions.matrixId, factorMatrices.id))
    .where(and(inArray(factorMatrixVersions.status, everPublished), ...(segments ? [eq(factorMatrices.keyHash, segmentKeyHash(segments))] : [])))
    .orderBy(asc(factorMatrices.id));
  if (segments && !sets.length) {
    throw new AppError('not_found:factor-matrix', `No factor-correlation matrix of exactly the segments ${segments.join(', ')} has been published.`);
  }
  const matrices: ConsumerMatrix[] = [];
  const missing: Missing[] = [];
  for (const m of sets) {
    const r = await inForceOne(db, m, asOf, now);
    if ('reason' in r) missing.push(r);
    else matrices.push(r);
  }
  return { matrices, missing };
}

async function reviewNow(db: DbOrTx, now: Date): Promise<(v: { status: AssumptionStatus; reviewBy: string }) => ReviewState> {
  const policy = overduePolicyAt(await policyChanges(db), now);
  const today = todayIso(now);
  return (v) => ({ reviewBy: v.reviewBy, overdue: v.status === 'published' && v.reviewBy < today, policy });
}

/** The published versions of one matrix (superseded, expired and retired ones too), newest first. */
export async function matrixVersions(consumer: Consumer, matrixId: number, now: Date = new Date()): Promise<ConsumerMatrix[]> {
  assertConsumer(consumer, 'assumptions:read');
  const db = getDb();
  const rows = await db
    .select()
    .from(factorMatrixVersions)
    .where(and(eq(factorMatrixVersions.matrixId, matrixId), inArray(factorMatrixVersions.status, everPublished)))
    .orderBy(desc(factorMatrixVersions.version));
  if (!rows.length) throw new AppError('not_found:factor-matrix', `Factor-correlation matrix ${matrixId} has no published version.`);
  const review = await reviewNow(db, now);
  return (await matrixDtos(db, rows)).map((v) => toConsumerMatrix(v, review(v)));
}

/** The versions published now, one per matrix (the CSV export). */
export async function publishedMatrices(consumer: Consumer, scope: TokenScope = 'assumptions:read', now: Date = new Date()): Promise<ConsumerMatrix[]> {
  assertConsumer(consumer, scope);
  const db = getDb();
  const rows = await db.select().from(factorMatrixVersions).where(eq(factorMatrixVersions.status, 'published')).orderBy(asc(factorMatrixVersions.matrixId));
  const review = await reviewNow(db, now);
  return (await matrixDtos(db, rows)).map((v) => toConsumerMatrix(v, review(v)));
}
