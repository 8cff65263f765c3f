import { z } from 'zod';
import { assumptionStatuses, overduePolicyKinds } from '@/db/schema';
import { toCsv, type CsvValue } from '@/lib/csv';
import { lineageSchema } from '@/lib/assumptions/consumer';
import type { MatrixVersionDto } from './content';
import { matrixCautions } from './cautions';

/**
 * What the consumer API (/api/v1/factor-matrices) answers about a published matrix version, and
 * its CSV. The zod schemas are the contract: the OpenAPI document is generated from them and the
 * tests check real answers against them.
 */
const pair = z.object({
  segmentA: z.string(),
  segmentB: z.string(),
  r: z.number().describe('The maximum-likelihood factor correlation of the pair.'),
  interval: z.object({ method: z.literal('profile'), level: z.number(), lower: z.number(), upper: z.number() }).describe('The profile-likelihood interval of r.'),
  moment: z.number().nullable().describe('The moment version: the Pearson correlation of the implied factor series; null where undefined.'),
  window: z.object({ from: z.string(), to: z.string(), years: z.number().int() }).describe('The pair’s common window.'),
  value: z.number().describe('The entry of the matrix to use for this pair.'),
});

export const consumerMatrixSchema = z.object({
  matrixId: z.number().int(),
  version: z.number().int(),
  status: z.enum(assumptionStatuses),
  segments: z.array(z.string()).describe('The segments, in the order of the rows and columns of the matrices.'),
  value: z.array(z.array(z.number())).describe('The matrix to use: a valid correlation matrix (unit diagonal, entries in [-1, 1], positive semi-definite, checked by its eigenvalues).'),
  valueSmallestEigenvalue: z.number(),
  estimated: z.array(z.array(z.number())).describe('The pairwise maximum-likelihood estimates as a matrix.'),
  estimatedSmallestEigenvalue: z.number(),
  nearest: z
    .object({
      matrix: z.array(z.array(z.number())),
      largestChange: z.object({ segmentA: z.string(), segmentB: z.string(), from: z.number(), to: z.number() }).nullable(),
    })
    .nullable()
    .describe('Higham’s nearest correlation matrix when the estimates are not positive semi-definite (the value starts from it); null otherwise.'),
  margin: z.object({ value: z.number().describe('Added to every off-diagonal entry.'), rationale: z.string() }),
  pairs: z.array(pair),
  window: z.object({ from: z.string(), to: z.string() }),
  intendedUses: z.string(),
  limitations: z.string(),
  effectiveDate: z.string(),
  reviewBy: z.string(),
  publishedAt: z.string().nullable(),
  endedAt: z.string().nullable(),
  review: z.object({ reviewBy: z.string(), overdue: z.boolean(), policy: z.enum(overduePolicyKinds) }),
  lineage: lineageSchema,
  validator: z.string().nullable(),
  decisionComment: z.string().nullable(),
});
export type ConsumerMatrix = z.infer<typeof consumerMatrixSchema>;

export const consumerMatrixListSchema = z.object({
  asOf: z.string(),
  matrices: z.array(consumerMatrixSchema),
  /** Matrices with no version in force on that date, and why. */
  missing: z.array(z.object({ matrixId: z.number().int(), segments: z.array(z.string()), reason: z.string() })),
  cautions: z.array(z.string()),
});
export const consumerMatrixVersionsSchema = z.object({ matrixId: z.number().int(), versions: z.array(consumerMatrixSchema), cautions: z.array(z.string()) });

export type ReviewState = { reviewBy: string; overdue: boolean; policy: (typeof overduePolicyKinds)[number] };

export function toConsumerMatrix(v: MatrixVersionDto, review: ReviewState): ConsumerMatrix {
  const idx = new Map(v.segments.map((s, i) => [s, i]));
  return {
    matrixId: v.matrixId,
    version: v.version,
    status: v.status,
    segments: v.segments,
    value: v.value,
    valueSmallestEigenvalue: v.valueSmallestEigenvalue,
    estimated: v.estimated,
    estimatedSmallestEigenvalue: v.smallestEigenvalue,
    nearest: v.nearest
      ? { matrix: v.nearest, largestChange: v.largestChange ? { segmentA: v.largestChange.a, segmentB: v.largestChange.b, from: v.largestChange.from, to: v.largestChange.to } : null }
      : null,
    margin: { value: v.margin, rationale: v.marginRationale },
    pairs: v.pairs.map((p) => ({
      segmentA: p.a,
      segmentB: p.b,
      r: p.r,
      interval: { method: 'profile' as const, level: p.level, lower: p.lower, upper: p.upper },
      moment: p.moment,
      window: { from: p.periods[0] ?? '', to: p.periods[p.periods.length - 1] ?? '', years: p.periods.length },
      value: v.value[idx.get(p.a)!][idx.get(p.b)!],
    })),
    window: { from: v.windowFrom, to: v.windowTo },
    intendedUses: v.intendedUses,
    limitations: v.limitations,
    effectiveDate: v.effectiveDate,
    reviewBy: v.reviewBy,
    publishedAt: v.publishedAt,
    endedAt: v.endedAt,
    review,
    lineage: { fitRunId: v.fitRunId, datasetId: v.datasetId, datasetSha256: v.datasetSha256, engineVersion: v.engineVersion, seeds: v.seeds, contentHash: v.contentHash },
    validator: v.validator?.name ?? null,
    decisionComment: v.decisionComment,
  };
}

/** The columns of the long CSV: one row per pair of each matrix version (code names, as the API). */
export const matrixExportColumns = [
  'matrix_id',
  'version',
  'status',
  'segment_a',
  'segment_b',
  'r',
  'lower',
  'upper',
  'level',
  'moment',
  'nearest',
  'margin',
  'value_used',
  'pair_window_from',
  'pair_window_to',
  'effective_date',
  'review_by',
  'overdue',
  'fit_run_id',
  'dataset_sha256',
  'engine_version',
  'content_hash',
] as const;

function exportRows(m: ConsumerMatrix): CsvValue[][] {
  const idx = new Map(m.segments.map((s, i) => [s, i]));
  return m.pairs.map((p) => [
    m.matrixId,
    m.version,
    m.status,
    p.segmentA,
    p.segmentB,
    p.r,
    p.interval.lower,
    p.interval.upper,
    p.interval.level,
    p.moment,
    m.nearest ? m.nearest.matrix[idx.get(p.segmentA)!][idx.get(p.segmentB)!] : null,
    m.margin.value,
    p.value,
    p.window.from,
    p.window.to,
    m.effectiveDate,
    m.reviewBy,
    m.review.overdue,
    m.lineage.fitRunId,
    m.lineage.datasetSha256,
    m.lineage.engineVersion,
    m.lineage.contentHash,
  ]);
}

/** The published matrices as one long CSV through the app's one CSV writer, the cautions as `# ` lines above the header. */
export function matricesCsv(matrices: readonly ConsumerMatrix[], withCautions: boolean): string {
  const comments = withCautions
    ? [
        'Rhobook factor-correlation matrices: one row per pair of each published matrix; value_used is the entry to use (the estimate, or its nearest correlation matrix when the estimates are not positive semi-definite, plus the margin).',
        ...matrixCautions,
      ]
    : [];
  return toCsv(matrixExportColumns, matrices.flatMap(exportRows), { bom: true, comments });
}

