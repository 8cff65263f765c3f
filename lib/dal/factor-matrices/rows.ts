import 'server-only';
import { eq } from 'drizzle-orm';
import type { DbOrTx, Tx } from '@/db/connection';
import { factorMatrixAudit, factorMatrixVersions, type AssumptionStatus, type FactorMatrixVersion } from '@/db/schema';
import type { MatrixContent, MatrixVersionDto } from '@/lib/factor-matrices/content';
import { AppError } from '@/lib/errors';
import { auditEventFields, type Actor } from '../assumptions/actors';
import { peopleById } from '../assumptions/dto';

/** A matrix version's rows as the DTO the screens and the consumer API read, and the audit row every write appends. */
function iso(d: Date | null): string | null {
  return d ? d.toISOString() : null;
}

export function matrixContentOf(v: FactorMatrixVersion): MatrixContent {
  return {
    fitRunId: v.fitRunId ?? 0,
    datasetId: v.datasetId,
    datasetSha256: v.datasetSha256,
    engineVersion: v.engineVersion,
    seeds: v.seeds,
    windowFrom: v.windowFrom,
    windowTo: v.windowTo,
    segments: v.segments,
    pairs: v.pairs,
    estimated: v.estimated,
    smallestEigenvalue: v.smallestEigenvalue,
    nearest: v.nearest ?? null,
    largestChange: v.largestChange ?? null,
    margin: v.margin,
    marginRationale: v.marginRationale,
    value: v.value,
    valueSmallestEigenvalue: v.valueSmallestEigenvalue,
    intendedUses: v.intendedUses,
    limitations: v.limitations,
    effectiveDate: v.effectiveDate,
    reviewBy: v.reviewBy,
  };
}

export async function matrixDtos(db: DbOrTx, rows: readonly FactorMatrixVersion[]): Promise<MatrixVersionDto[]> {
  const people = await peopleById(db, rows.flatMap((v) => [v.authorId, v.validatorId]));
  const person = (id: number | null) => {
    const p = id === null ? undefined : people.get(id);
    return p ? { id: p.id, name: p.name } : null;
  };
  return rows.map((v) => ({
    ...matrixContentOf(v),
    id: v.id,
    matrixId: v.matrixId,
    version: v.version,
    status: v.status,
    contentHash: v.contentHash,
    author: person(v.authorId),
    validator: person(v.validatorId),
    decisionComment: v.decisionComment,
    decidedAt: iso(v.decidedAt),
    publishedAt: iso(v.publishedAt),
    endedAt: iso(v.endedAt),
    createdAt: v.createdAt.toISOString(),
    updatedAt: v.updatedAt.toISOString(),
  }));
}

export async function appendMatrixAudit(
  tx: DbOrTx,
  v: { id: number; matrixId: number; version: number; contentHash: string },
  actor: Actor,
  e: { action: string; from: AssumptionStatus | null; to: AssumptionStatus; comment?: string | null },
  at: Date,
): Promise<void> {
  await tx.insert(factorMatrixAudit).values({
    matrixId: v.matrixId,
    versionId: v.id,
    version: v.version,
    ...auditEventFields(actor, e, v.contentHash, at),
  });
}

/** Reads a matrix version and locks it for the rest of the transaction. */
export async function lockMatrixVersion(tx: Tx, id: number): Promise<FactorMatrixVersion> {
  const [row] = await tx.select().from(factorMatrixVersions).where(eq(factorMatrixVersions.id, id)).for('update');
  if (!row) throw new AppError('not_found:factor-matrix', 'There is no such factor-correlation matrix version.');
  return row;
}
