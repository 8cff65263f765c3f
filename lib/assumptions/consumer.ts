import { z } from 'zod';
import { assumptionStatuses } from '@/db/schema';
import { toCsv, type CsvValue } from '@/lib/csv';
import { estimatorLabel } from '@/lib/stats/estimators/types';
import { assumptionCautions } from './cautions';
import { intervalMethodLabel } from './content';
import type { VersionContent } from './content';

/**
 * What the consumer API (/api/v1) answers about a published version: the value and everything
 * that ties it to its evidence (lineage), and the cautions. The zod schemas are the contract: the
 * OpenAPI document is generated from them and the tests check real answers against them.
 */
const interval = z.object({
  method: z.string(),
  methodName: z.string().describe('The readable name of the interval method.'),
  level: z.number(),
  lower: z.number(),
  upper: z.number(),
});
const margin = z.object({ value: z.number(), rationale: z.string() });

export const consumerVersionSchema = z.object({
  assumptionId: z.number().int(),
  segment: z.string(),
  version: z.number().int(),
  status: z.enum(assumptionStatuses),
  value: z.number().describe('The final value to use: the estimate plus the margins of conservatism, or above.'),
  pd: z.number().describe('The PD the correlation was fitted with; the value is valid only with it.'),
  estimator: z.string().describe('The estimator key (binomialMle, vasicekMle, ...).'),
  estimatorName: z.string().describe('The readable name of the estimator, as the screens show it.'),
  estimate: z.number(),
  interval,
  margins: z.object({ data: margin, practice: margin, general: margin }),
  conservativeValue: z.number(),
  window: z.object({ from: z.string(), to: z.string() }),
  effectiveDate: z.string().describe('YYYY-MM-DD'),
  reviewBy: z.string().describe('YYYY-MM-DD'),
  publishedAt: z.string().nullable(),
  endedAt: z
    .string()
    .nullable()
    .describe('When the version stopped being the published one (superseded, expired or retired); null while it is published.'),
  intendedUses: z.string(),
  limitations: z.string(),
  approvedBy: z.string().nullable(),
  lineage: z.object({
    fitRunId: z.number().int().nullable(),
    datasetId: z.number().int().nullable(),
    datasetSha256: z.string(),
    engineVersion: z.string(),
    seeds: z.unknown(),
    contentHash: z.string(),
    fitUrl: z.string().nullable(),
    datasetUrl: z.string().nullable(),
  }),
});
export type ConsumerVersion = z.infer<typeof consumerVersionSchema>;

export const consumerAnswerSchema = z.object({
  asOf: z.string().optional(),
  assumption: consumerVersionSchema,
  cautions: z.array(z.string()),
});
export const consumerListSchema = z.object({
  asOf: z.string(),
  assumptions: z.array(consumerVersionSchema),
  /** Segments with no version in force on that date, and why. */
  missing: z.array(z.object({ segment: z.string(), reason: z.string() })),
  cautions: z.array(z.string()),
});
export const errorSchema = z.object({ code: z.string(), message: z.string() });

type VersionLike = VersionContent & {
  assumptionId: number;
  version: number;
  status: (typeof assumptionStatuses)[number];
  contentHash: string;
  publishedAt: string | null;
  endedAt: string | null;
  validator: { name: string } | null;
  lineage: { fitUrl: string | null; datasetUrl: string | null };
};

export function toConsumerVersion(v: VersionLike): ConsumerVersion {
  return {
    assumptionId: v.assumptionId,
    segment: v.segment,
    version: v.version,
    status: v.status,
    value: v.finalValue,
    pd: v.pd,
    estimator: v.estimator,
    estimatorName: estimatorLabel(v.estimator),
    estimate: v.estimate,
    interval: { method: v.intervalMethod, methodName: intervalMethodLabel(v.intervalMethod), level: v.intervalLevel, lower: v.intervalLower, upper: v.intervalUpper },
    margins: {
      data: { value: v.marginData, rationale: v.marginDataRationale },
      practice: { value: v.marginPractice, rationale: v.marginPracticeRationale },
      general: { value: v.marginGeneral, rationale: v.marginGeneralRationale },
    },
    conservativeValue: v.conservativeValue,
    window: { from: v.windowFrom, to: v.windowTo },
    effectiveDate: v.effectiveDate,
    reviewBy: v.reviewBy,
    publishedAt: v.publishedAt,
    endedAt: v.endedAt,
    intendedUses: v.intendedUses,
    limitations: v.limitations,
    approvedBy: v.validator?.name ?? null,
    lineage: {
      fitRunId: v.fitRunId,
      datasetId: v.datasetId,
      datasetSha256: v.datasetSha256,
      engineVersion: v.engineVersion,
      seeds: v.seeds,
      contentHash: v.contentHash,
      fitUrl: v.lineage.fitUrl,
      datasetUrl: v.lineage.datasetUrl,
    },
  };
}

export const cautions = [...assumptionCautions];

export const exportColumns = [
  'segment',
  'version',
  'value',
  'pd',
  'estimator',
  'estimate',
  'interval_method',
  'interval_level',
  'interval_lower',
  'interval_upper',
  'margin_data',
  'margin_practice',
  'margin_general',
  'window_from',
  'window_to',
  'effective_date',
  'review_by',
  'fit_run_id',
  'dataset_id',
  'dataset_sha256',
  'engine_version',
  'content_sha256',
  'approved_by',
] as const;

export function exportRow(c: ConsumerVersion): CsvValue[] {
  return [
    c.segment,
    c.version,
    c.value,
    c.pd,
    c.estimator,
    c.estimate,
    c.interval.method,
    c.interval.level,
    c.interval.lower,
    c.interval.upper,
    c.margins.data.value,
    c.margins.practice.value,
    c.margins.general.value,
    c.window.from,
    c.window.to,
    c.effectiveDate,
    c.reviewBy,
    c.lineage.fitRunId,
    c.lineage.datasetId,
    c.lineage.datasetSha256,
    c.lineage.engineVersion,
    c.lineage.contentHash,
    c.approvedBy,
  ];
}

/**
 * The published library as CSV (both exports: the signed-in one and the consumer API's): the
 * cautions as `# ` lines above the header unless `withCautions` is false (`?comments=0`), then one
 * row per version under `exportColumns` (code names, as the API).
 */
export function libraryCsv(versions: readonly ConsumerVersion[], withCautions: boolean): string {
  const comments = withCautions ? ['Rhobook correlation library. Read these values with care:', ...assumptionCautions.map((c, i) => `${i + 1}. ${c}`)] : [];
  return toCsv(exportColumns, versions.map(exportRow), { bom: true, comments });
}
