import { z } from 'zod';
import { FIT_MODELS } from '@/lib/stats/fit-models';
import { MIXING_LAW_MODELS } from '@/lib/stats/mixing-laws-block';

/**
 * The body of POST /api/fits (and the New fit form): which dataset, which segments (all when
 * omitted), which window of periods, the interval level, the factor models, the rolling window's
 * length, the optional bootstraps (binomialMle's and the moment estimators', the break test's)
 * and audit, and the optional challenge of the Gaussian copula (the other mixing laws with the
 * bootstrap of their LR test and its power). Requests stored before the models existed parse with
 * the defaults.
 * Stored as fit_runs.request after validation, so that a run can be repeated exactly.
 */
const seed = z
  .number({ message: 'The seed must be a whole number.' })
  .int('The seed must be a whole number.')
  .min(0, 'The seed must be 0 or more.')
  .max(4294967295, 'The seed must be below 2^32.');

const period = z.coerce
  .number({ message: 'A period must be a year such as 2012.' })
  .int('A period must be a whole number such as 2012.')
  .min(1900, 'A period must be a year from 1900 to 2200.')
  .max(2200, 'A period must be a year from 1900 to 2200.');

const replications = (what: string, min: number, max: number) =>
  z
    .number({ message: `${what} replications must be a whole number.` })
    .int(`${what} replications must be a whole number.`)
    .min(min, `${what} needs at least ${min} replications.`)
    .max(max, `At most ${max.toLocaleString('en')} ${what.toLowerCase()} replications.`);

export const fitRequestSchema = z
  .object({
    datasetId: z.number({ message: 'Choose a dataset.' }).int().positive('Choose a dataset.'),
    segments: z.array(z.string().trim().min(1).max(120)).min(1, 'Choose at least one segment.').max(50).optional(),
    from: period.optional(),
    to: period.optional(),
    level: z.number().min(0.5, 'The interval level must be between 0.5 and 0.999.').max(0.999, 'The interval level must be between 0.5 and 0.999.').default(0.95),
    /** The factor models to run (lib/stats/fit-models.ts); default every one. */
    models: z
      .array(z.enum(FIT_MODELS, { message: `A model is one of ${FIT_MODELS.join(', ')}.` }))
      .min(1, 'Choose at least one model.')
      .refine((m) => new Set(m).size === m.length, 'Name each model once.')
      .default([...FIT_MODELS]),
    /** Length of the rolling window of the stability block, in years. */
    rollingWindow: z
      .number({ message: 'The rolling window must be a whole number of years.' })
      .int('The rolling window must be a whole number of years.')
      .min(3, 'The rolling window needs at least 3 years.')
      .max(50, 'The rolling window can be at most 50 years.')
      .default(10),
    /** Bootstrap of the break test's p-value; null: the statistic without a p-value. */
    breakTest: z.object({ replications: replications('The break test', 20, 2000), seed }).nullish(),
    bootstrap: z
      .object({
        replications: z.number().int().min(20, 'A bootstrap needs at least 20 replications.').max(2000, 'At most 2,000 bootstrap replications.'),
        seed,
      })
      .nullish(),
    audit: z
      .object({
        replications: z.number().int().min(10, 'A small-sample simulation study needs at least 10 simulated panels.').max(500, 'At most 500 simulated panels in a small-sample simulation study.'),
        seed,
      })
      .nullish(),
    /**
     * Challenge the Gaussian copula (lib/stats/mixing-laws-block.ts): the other mixing laws (default
     * all three), the bootstrap replications B of the LR test of the Gaussian against the t copula,
     * the replications R of its power study, and their seed; null or absent: not run.
     */
    mixingLaws: z
      .object({
        laws: z
          .array(z.enum(MIXING_LAW_MODELS, { message: `A mixing law is one of ${MIXING_LAW_MODELS.join(', ')}.` }))
          .min(1, 'Choose at least one mixing law.')
          .refine((m) => new Set(m).size === m.length, 'Name each mixing law once.')
          .default([...MIXING_LAW_MODELS]),
        replications: replications('The copula test', 20, 2000).default(200),
        powerReplications: replications('The power study', 20, 2000).default(200),
        seed,
      })
      .strict()
      .nullish(),
    /** Grades under one factor: the segments, best grade first (lib/stats/grade-fit.ts). */
    group: z
      .object({
        segments: z.array(z.string().trim().min(1).max(120)).min(2, 'A grade group needs at least two segments.').max(20, 'At most 20 grades in a group.'),
        commonWindow: z.boolean().default(false),
      })
      .nullish(),
    /** The factor correlation of every pair of the fitted segments (lib/stats/factor-correlation-matrix.ts). */
    pairs: z.boolean().optional(),
    /** Prior of each segment's grid posterior of rho (lib/stats/rho-posterior.ts). */
    prior: z
      .discriminatedUnion('kind', [
        z.object({ kind: z.literal('flat') }),
        z.object({ kind: z.literal('supervisory'), strength: z.number().positive('The prior strength must be positive.').max(10_000, 'The prior strength must be at most 10,000.') }),
        z.object({
          kind: z.literal('beta'),
          a: z.number().positive('A Beta prior needs a > 0 (with a = 0 it has no mass inside (0, 1)).').max(10_000),
          b: z.number().positive('A Beta prior needs b > 0 (with b = 0 it has no mass inside (0, 1)).').max(10_000),
        }),
      ])
      .nullish(),
    /** Most prudent PD: rho (null: the segment's binomialMle) and confidence (lib/stats/prudent-pd.ts). */
    prudent: z
      .object({
        rho: z.number().min(0, 'rho must be in [0, 1).').lt(1, 'rho must be in [0, 1).').nullable(),
        confidence: z.number().gt(0, 'The confidence must be strictly between 0 and 1.').lt(1, 'The confidence must be strictly between 0 and 1.'),
      })
      .nullish(),
  })
  .strict()
  .superRefine((v, ctx) => {
    if (v.group && v.segments) {
      const missing = v.group.segments.filter((s) => !v.segments!.includes(s));
      if (missing.length > 0) ctx.addIssue({ code: 'custom', path: ['group', 'segments'], message: `The grade group names ${missing.join(', ')}, which the fit does not include; choose them among its segments.` });
    }
    if (v.pairs && v.segments && v.segments.length < 2) {
      ctx.addIssue({ code: 'custom', path: ['pairs'], message: 'Factor correlations need at least two segments.' });
    }
    if (v.from !== undefined && v.to !== undefined && v.from > v.to) {
      ctx.addIssue({ code: 'custom', path: ['to'], message: `The window ends (${v.to}) before it starts (${v.from}).` });
    }
  });

export type FitRequestInput = z.input<typeof fitRequestSchema>;
export type FitRequest = z.output<typeof fitRequestSchema>;

/** Fewest periods a segment must have inside the window to be fitted. */
export const MIN_PERIODS = 3;

/**
 * Whether a run asks for blocks that need every segment together (grades under one factor, pairs,
 * posteriors, the most prudent PD): such a run is computed whole by one job; any other is split
 * into one job per segment (lib/dal/fits.ts createFit).
 */
export function needsWholeRun(request: FitRequest): boolean {
  return Boolean(request.group || request.pairs || request.prior || request.prudent);
}
