import { z } from 'zod';
import { mixingLawKinds, assumptionStatuses, overduePolicyKinds } from '@/db/schema';
import { FIT_MODELS } from '@/lib/stats/fit-models';
import { toCsv, type CsvValue } from '@/lib/csv';
import { describeSpans, isMixed, mixedDefinitionCaution } from '@/lib/ingest/default-definition';
import { valueSourceLabel } from './posterior-evidence';
import { assumptionCautions } from './cautions';
import { intervalMethodLabel } from './content';
import { overdueCaution } from './overdue-policy';
import { tCopulaCaution } from './t-copula-caution';
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
const definitionSpan = z.object({ definition: z.string().nullable(), from: z.string(), to: z.string(), periods: z.array(z.string()) });

/** What ties a published value to the evidence it was drawn from, for every kind of value. */
export const lineageSchema = z.object({
  fitRunId: z.number().int().nullable(),
  datasetId: z.number().int().nullable(),
  datasetSha256: z.string(),
  engineVersion: z.string(),
  seeds: z.unknown(),
  contentHash: z.string(),
});

export const consumerVersionSchema = z.object({
  assumptionId: z.number().int(),
  segment: z.string(),
  version: z.number().int(),
  status: z.enum(assumptionStatuses),
  value: z.number().describe('The final value to use: the estimate plus the margins of conservatism, or above.'),
  pd: z.number().describe('The PD the correlation was fitted with; the value is valid only with it.'),
  estimator: z.string().describe('The estimator key (binomialMle, vasicekMle, ...).'),
  estimatorName: z.string().describe('The readable name of the estimator, as the screens show it.'),
  mixingLaw: z
    .enum(mixingLawKinds)
    .describe(
      'The mixing law (copula) the value was estimated under and must be used with: "gaussian", the one-factor Gaussian copula (Vasicek), for every value drafted before the law was recorded; "t", the one-factor Student-t copula with nu degrees of freedom (nu below).',
    ),
  nu: z
    .object({
      value: z.number().describe('The degrees of freedom of the t copula; the smaller, the fatter the joint tail.'),
      interval: z
        .object({
          level: z.number(),
          lower: z.number().nullable().describe('Null when unbounded.'),
          upper: z.number().nullable().describe('Null when unbounded: the data cannot exclude nu = infinity (the Gaussian copula).'),
        })
        .describe('The profile-likelihood interval of nu (p and rho re-maximised).'),
    })
    .nullable()
    .describe('For a t-copula value its nu with the interval; null for a Gaussian value. A t-copula value must be used with the t copula and this nu, not in the Gaussian (Vasicek) formula.'),
  model: z
    .object({
      copula: z.enum(mixingLawKinds).describe('The dependence model, the same as mixingLaw: "gaussian" (the Vasicek one-factor model) or "t" (the one-factor Student-t copula).'),
      factor: z
        .enum(FIT_MODELS)
        .describe('The systematic factor over time: "independent" (drawn afresh each year) or "ar1" (a persistent factor, Z_t = phi Z_(t-1) + sqrt(1 - phi^2) e_t).'),
    })
    .describe('The model the value was estimated under; versions drafted before the model was recorded are gaussian/independent.'),
  prior: z
    .object({
      rho: z.string().describe('The prior on rho: "flat", "supervisory:STRENGTH" (a Beta centred on the supervisory correlation) or "beta:A,B".'),
      pd: z.string().describe('The prior on the PD, "beta:A,B" (Beta(1, 1), uniform, unless the fit set another).'),
    })
    .nullable()
    .describe(
      'The priors of a posterior-median value (estimator posteriorMedian, interval "credible": the equal-tailed credible interval; pd the posterior median of p), null for every other estimator. A posterior depends on its prior as well as on the data: with few defaults the prior may decide much of it.',
    ),
  estimate: z.number(),
  interval,
  margins: z.object({ data: margin, practice: margin, general: margin }),
  conservativeValue: z.number(),
  window: z.object({ from: z.string(), to: z.string() }),
  defaultDefinition: z
    .object({
      text: z.string().nullable().describe('The definition of default of the fitted years, or each with its years when they differ; null when the data named none.'),
      mixed: z.boolean().describe('True when the fitted years use more than one definition of default.'),
      spans: z.array(definitionSpan),
    })
    .nullable()
    .describe('The definition of default the value was fitted on (null for versions drafted before it was carried). The value is valid only with it.'),
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
  evidence: z
    .object({
      superseded: z.boolean().describe('The dataset the value was drawn from has been superseded.'),
      newerDatasetId: z.number().int().nullable().describe('The newer dataset: the one that superseded it, or the newest with later years of the segment.'),
      newPeriods: z.array(z.string()).describe('Years of the segment in the newer dataset after the value\'s window.'),
      backtest: z
        .object({
          verdict: z.enum(['consistent', 'watch', 'breach']),
          summary: z.string(),
          periods: z.array(z.string()),
          exceedances: z.object({ above95: z.number().int(), above99: z.number().int(), expected95: z.number(), expected99: z.number() }),
          logLik: z.number(),
        })
        .nullable()
        .describe('The worker\'s backtest of the published value and PD on the new years, once it has run.'),
    })
    .describe('Whether the evidence behind the value has aged.'),
  review: z
    .object({
      reviewBy: z.string(),
      overdue: z.boolean().describe('Past its review-by date on the asked day.'),
      policy: z.enum(overduePolicyKinds).describe('The overdue policy in force: flag keeps an overdue value readable, flagged; withdraw stops serving it.'),
    })
    .describe('The review state of the value.'),
  cautions: z.array(z.string()).describe('Cautions of this version in particular (a mix of definitions of default, evidence that has aged); the general cautions are in the answer beside it.'),
  lineage: lineageSchema.extend({
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

type EvidenceLike = {
  superseded: boolean;
  newerDatasetId: number | null;
  newerDatasetName?: string | null;
  newPeriods: string[];
  flagged?: boolean;
  backtest: {
    verdict: 'consistent' | 'watch' | 'breach' | null;
    summary: string | null;
    periods: string[];
    result: { exceedances: { above95: number; above99: number; expected95: number; expected99: number }; logLik: number } | null;
  } | null;
};
type ReviewLike = { reviewBy: string; overdue: boolean; policy: (typeof overduePolicyKinds)[number] };

type VersionLike = VersionContent & {
  evidence: EvidenceLike;
  review: ReviewLike;
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
    estimatorName: valueSourceLabel(v.estimator),
    mixingLaw: v.mixingLaw,
    nu: v.mixingLaw === 't' && v.nu !== null && v.nuInterval ? { value: v.nu, interval: { level: v.nuInterval.level, lower: v.nuInterval.lower, upper: v.nuInterval.upper } } : null,
    model: { copula: v.mixingLaw, factor: v.factorModel },
    prior: v.prior,
    estimate: v.estimate,
    interval: { method: v.intervalMethod, methodName: intervalMethodLabel(v.intervalMethod), level: v.intervalLevel, lower: v.intervalLower, upper: v.intervalUpper },
    margins: {
      data: { value: v.marginData, rationale: v.marginDataRationale },
      practice: { value: v.marginPractice, rationale: v.marginPracticeRationale },
      general: { value: v.marginGeneral, rationale: v.marginGeneralRationale },
    },
    conservativeValue: v.conservativeValue,
    window: { from: v.windowFrom, to: v.windowTo },
    defaultDefinition: v.defaultDefinitions
      ? { text: describeSpans(v.defaultDefinitions), mixed: isMixed(v.defaultDefinitions), spans: v.defaultDefinitions }
      : null,
    effectiveDate: v.effectiveDate,
    reviewBy: v.reviewBy,
    publishedAt: v.publishedAt,
    endedAt: v.endedAt,
    intendedUses: v.intendedUses,
    limitations: v.limitations,
    approvedBy: v.validator?.name ?? null,
    evidence: {
      superseded: v.evidence.superseded,
      newerDatasetId: v.evidence.newerDatasetId,
      newPeriods: v.evidence.newPeriods,
      backtest:
        v.evidence.backtest?.result && v.evidence.backtest.verdict
          ? {
              verdict: v.evidence.backtest.verdict,
              summary: v.evidence.backtest.summary ?? '',
              periods: v.evidence.backtest.periods,
              exceedances: {
                above95: v.evidence.backtest.result.exceedances.above95,
                above99: v.evidence.backtest.result.exceedances.above99,
                expected95: v.evidence.backtest.result.exceedances.expected95,
                expected99: v.evidence.backtest.result.exceedances.expected99,
              },
              logLik: v.evidence.backtest.result.logLik,
            }
          : null,
    },
    review: v.review,
    cautions: versionCautions(v),
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

/** The flag of aged evidence in a sentence, or null. */
export function evidenceCautionOf(e: EvidenceLike): string | null {
  if (!e.superseded && !e.newPeriods.length) return null;
  const where = e.newerDatasetId ? `dataset ${e.newerDatasetId}${e.newerDatasetName ? ` “${e.newerDatasetName}”` : ''}` : 'a newer dataset';
  const years = e.newPeriods.length ? ` and holds later years (${e.newPeriods.join(', ')})` : '';
  return e.superseded
    ? `The dataset this value was drawn from has been superseded by ${where}${years}: the evidence behind the value has aged; a new fit and version should follow.`
    : `A newer dataset, ${where}, covers later years of this segment (${e.newPeriods.join(', ')}) that the value was not fitted on; a new fit and version should follow.`;
}

/**
 * The cautions of one version in particular: a t-copula value's law (what nu means for the tail and
 * that it must be used with the t copula), a fit over mixed definitions of default, evidence that
 * has aged, a review-by date that has passed.
 */
export function versionCautions(
  v: Pick<VersionContent, 'defaultDefinitions'> & Partial<Pick<VersionContent, 'mixingLaw' | 'nu' | 'finalValue'>> & { evidence?: EvidenceLike; review?: ReviewLike },
): string[] {
  const out: string[] = [];
  if (v.mixingLaw === 't' && typeof v.nu === 'number' && typeof v.finalValue === 'number') out.push(tCopulaCaution(v.finalValue, v.nu));
  const mixed = v.defaultDefinitions ? mixedDefinitionCaution(v.defaultDefinitions) : null;
  if (mixed) out.push(mixed);
  const aged = v.evidence ? evidenceCautionOf(v.evidence) : null;
  if (aged) out.push(aged);
  if (v.review?.overdue) out.push(overdueCaution(v.review.reviewBy));
  return out;
}

/** The cautions of an answer about one version: the general ones and the version's own. */
export function cautionsFor(v: ConsumerVersion): string[] {
  return [...assumptionCautions, ...v.cautions];
}

export const exportColumns = [
  'segment',
  'version',
  'value',
  'pd',
  'estimator',
  'copula',
  'mixing_law',
  'nu',
  'nu_level',
  'nu_lower',
  'nu_upper',
  'factor_model',
  'prior_rho',
  'prior_pd',
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
  'default_definition',
  'effective_date',
  'review_by',
  'fit_run_id',
  'dataset_id',
  'dataset_sha256',
  'engine_version',
  'content_sha256',
  'approved_by',
  'evidence_aged',
  'newer_dataset_id',
  'overdue',
] as const;

export function exportRow(c: ConsumerVersion): CsvValue[] {
  return [
    c.segment,
    c.version,
    c.value,
    c.pd,
    c.estimator,
    c.model.copula,
    c.mixingLaw,
    c.nu?.value ?? null,
    c.nu?.interval.level ?? null,
    c.nu?.interval.lower ?? null,
    c.nu?.interval.upper ?? null,
    c.model.factor,
    c.prior?.rho ?? null,
    c.prior?.pd ?? null,
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
    c.defaultDefinition?.text ?? null,
    c.effectiveDate,
    c.reviewBy,
    c.lineage.fitRunId,
    c.lineage.datasetId,
    c.lineage.datasetSha256,
    c.lineage.engineVersion,
    c.lineage.contentHash,
    c.approvedBy,
    c.evidence.superseded || c.evidence.newPeriods.length > 0,
    c.evidence.newerDatasetId,
    c.review.overdue,
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
