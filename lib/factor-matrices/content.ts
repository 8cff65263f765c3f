import { createHash } from 'node:crypto';
import { z } from 'zod';
import type { AssumptionStatus, FactorMatrixPair } from '@/db/schema';
import { canonical } from '@/lib/assumptions/content';
import { isIsoDate, reviewByProblem } from '@/lib/assumptions/dates';
import { AppError } from '@/lib/errors';
import { NEGATIVE_MARGIN } from './cautions';
import { addUniformMargin, checkCorrelationMatrix, largestValidMargin } from '@/lib/stats/correlation-matrix-check';

/**
 * A factor-correlation matrix as an assumption of its own kind: what a version freezes from a fit's
 * `pairs` block (lib/stats/factor-correlation-matrix.ts), the analyst's margin and judgement, the
 * value to use and its check, and the content hash. Pure: the data access layer
 * (lib/dal/factor-matrices/) calls these inside its transactions.
 */

/** What a version copies from its fit run and freezes. */
export type MatrixEvidence = {
  fitRunId: number;
  datasetId: number | null;
  datasetSha256: string;
  engineVersion: string;
  seeds: unknown;
  windowFrom: string;
  windowTo: string;
  segments: string[];
  pairs: FactorMatrixPair[];
  estimated: number[][];
  smallestEigenvalue: number;
  nearest: number[][] | null;
  largestChange: { a: string; b: string; from: number; to: number } | null;
};

export type MatrixJudgement = {
  margin: number;
  marginRationale: string;
  intendedUses: string;
  limitations: string;
  effectiveDate: string;
  reviewBy: string;
};

export type MatrixContent = MatrixEvidence & MatrixJudgement & { value: number[][]; valueSmallestEigenvalue: number };

/** What the screens and the consumer API read of a version (the DAL adds the people and dates). */
export type MatrixVersionDto = MatrixContent & {
  id: number;
  matrixId: number;
  version: number;
  status: AssumptionStatus;
  contentHash: string;
  author: { id: number; name: string } | null;
  validator: { id: number; name: string } | null;
  decisionComment: string | null;
  decidedAt: string | null;
  publishedAt: string | null;
  endedAt: string | null;
  createdAt: string;
  updatedAt: string;
};

/** The largest margin a person may type; a larger add-on is a different matrix, not a margin. */
export const MATRIX_MARGIN_MAX = 0.5;

const isoDate = (what: string) => z.string().refine(isIsoDate, `The ${what} must be a calendar date written YYYY-MM-DD.`);

export const matrixDraftSchema = z.object({
  fitId: z.number({ message: 'Give the fit run (fitId) the matrix is drawn from.' }).int().positive(),
  margin: z.object({
    value: z
      .number({ message: 'The margin must be a number (0 for none).' })
      .min(0, NEGATIVE_MARGIN)
      .max(MATRIX_MARGIN_MAX, `The margin may be at most ${MATRIX_MARGIN_MAX}: a larger add-on replaces the estimate instead of adding prudence to it.`),
    rationale: z.string().trim().min(1, 'Give the rationale of the margin (say why none is needed when it is 0).').max(4000),
  }),
  intendedUses: z.string().trim().min(1, 'Say what the matrix is intended for (intended uses).').max(4000),
  limitations: z.string().trim().min(1, 'State the limitations of the matrix.').max(4000),
  effectiveDate: isoDate('effective date'),
  /** Omitted: twelve months after the effective date. */
  reviewBy: isoDate('review-by date').optional(),
});
export type MatrixDraftInput = z.input<typeof matrixDraftSchema>;

/** An edit changes the judgement only (every field of it); the evidence stays frozen (draft a new version for another fit). */
export const matrixEditSchema = matrixDraftSchema.omit({ fitId: true }).strict();
export type MatrixEditInput = z.input<typeof matrixEditSchema>;

/** The key of a set of segments: the names sorted, one per line (the order of the rows is the version's own). */
export function segmentKey(segments: readonly string[]): string {
  return [...segments].sort().join('\n');
}

export function segmentKeyHash(segments: readonly string[]): string {
  return createHash('sha256').update(segmentKey(segments)).digest('hex');
}

type PairsBlock = {
  segments: string[];
  matrix: (number | null)[][];
  nearest: number[][] | null;
  largestChange: { a: string; b: string; from: number; to: number } | null;
  smallestEigenvalue: number | null;
  entries: { a: string; b: string; r: number | null; lower: number | null; upper: number | null; level: number; moment: number | null; periods: string[]; reason?: string }[];
};

/**
 * Picks a fit's factor-correlation matrix (results.pairs) with every pair's r, profile interval,
 * moment version and common window. A fit without pairs, or a pair without an estimate, is
 * refused with a sentence: a matrix with a missing entry cannot be used.
 */
export function pickMatrixEvidence(
  results: unknown,
  fit: { fitRunId: number; datasetId: number | null; datasetSha256: string; engineVersion: string; seeds: unknown },
): MatrixEvidence {
  const pairs = (results as { pairs?: PairsBlock } | null)?.pairs;
  if (!pairs) {
    throw new AppError('conflict:no-matrix', `Fit run ${fit.fitRunId} has no factor-correlation matrix: run a fit with “Correlations between segments” (pairs) first.`, { field: 'fitId' });
  }
  const missing = pairs.entries.filter((e) => e.r === null || e.lower === null || e.upper === null);
  if (missing.length) {
    const m = missing[0];
    throw new AppError(
      'conflict:matrix-incomplete',
      `The pair ${m.a}–${m.b} of fit run ${fit.fitRunId} has no estimate with an interval${m.reason ? ` (${m.reason})` : ''}: a matrix with a missing entry cannot be drafted.`,
      { field: 'fitId' },
    );
  }
  const periods = pairs.entries.flatMap((e) => e.periods).sort();
  if (!periods.length || pairs.smallestEigenvalue === null) {
    throw new AppError('conflict:matrix-incomplete', `The factor-correlation matrix of fit run ${fit.fitRunId} has no common years: it cannot be drafted.`, { field: 'fitId' });
  }
  return {
    ...fit,
    windowFrom: periods[0],
    windowTo: periods[periods.length - 1],
    segments: pairs.segments.slice(),
    pairs: pairs.entries.map((e) => ({ a: e.a, b: e.b, r: e.r!, lower: e.lower!, upper: e.upper!, level: e.level, moment: e.moment, periods: e.periods.slice() })),
    estimated: pairs.matrix.map((row) => row.map((v) => v as number)),
    smallestEigenvalue: pairs.smallestEigenvalue,
    nearest: pairs.nearest,
    largestChange: pairs.largestChange,
  };
}

/** The matrix the margin is added to: Higham's nearest when the estimate is not positive semi-definite, else the estimate. */
export function baseMatrix(e: Pick<MatrixEvidence, 'estimated' | 'nearest'>): number[][] {
  return e.nearest ?? e.estimated;
}

/**
 * The value to use: the base matrix plus the margin off the diagonal, checked to be a valid
 * correlation matrix (unit diagonal, entries in [-1, 1], positive semi-definite by its eigenvalues).
 * Refused with a sentence (422, at the margin's field when the margin broke it) otherwise.
 */
export function matrixValue(e: Pick<MatrixEvidence, 'estimated' | 'nearest' | 'segments'>, margin: number): { value: number[][]; smallestEigenvalue: number } {
  const base = baseMatrix(e);
  const baseCheck = checkCorrelationMatrix(base, e.segments);
  if (!baseCheck.valid) {
    throw new AppError('invalid:matrix', `The matrix to draft is not a valid correlation matrix: ${baseCheck.problem}`, { field: 'fitId' });
  }
  const value = addUniformMargin(base, margin);
  const check = checkCorrelationMatrix(value, e.segments);
  if (!check.valid) {
    const largest = largestValidMargin(base);
    const message = `With the margin ${margin} the matrix is no longer a valid correlation matrix. ${check.problem} The largest margin that keeps it valid is ${Math.floor(largest * 1e4) / 1e4}.`;
    throw new AppError('invalid:matrix-margin', message, { field: 'margin.value', fieldErrors: { 'margin.value': message } });
  }
  return { value, smallestEigenvalue: check.smallestEigenvalue };
}

/** The review-by rule of every assumption (at most 12 months after the effective date), at its field. */
export function matrixJudgementProblem(j: Pick<MatrixJudgement, 'effectiveDate' | 'reviewBy'>): void {
  const problem = reviewByProblem(j.effectiveDate, j.reviewBy);
  if (problem) throw new AppError('invalid:assumption', problem, { field: 'reviewBy', fieldErrors: { reviewBy: problem } });
}

const hashedFields = [
  'segments',
  'fitRunId',
  'datasetId',
  'datasetSha256',
  'engineVersion',
  'seeds',
  'windowFrom',
  'windowTo',
  'pairs',
  'estimated',
  'smallestEigenvalue',
  'nearest',
  'largestChange',
  'margin',
  'marginRationale',
  'value',
  'intendedUses',
  'limitations',
  'effectiveDate',
  'reviewBy',
] as const satisfies readonly (keyof MatrixContent)[];

/** SHA-256 of the content as canonical JSON: what a validator reviewed, in the audit trail. */
export function matrixContentHash(c: MatrixContent): string {
  const picked: Record<string, unknown> = {};
  for (const f of hashedFields) picked[f] = c[f];
  return createHash('sha256').update(canonical(picked)).digest('hex');
}
