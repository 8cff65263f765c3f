import { z } from 'zod';

/**
 * The body of POST /api/fits (and the New fit form): which dataset, which segments (all when
 * omitted), which window of periods, the interval level and the optional bootstrap and audit.
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

export const fitRequestSchema = z
  .object({
    datasetId: z.number({ message: 'Choose a dataset.' }).int().positive('Choose a dataset.'),
    segments: z.array(z.string().trim().min(1).max(120)).min(1, 'Choose at least one segment.').max(50).optional(),
    from: period.optional(),
    to: period.optional(),
    level: z.number().min(0.5, 'The interval level must be between 0.5 and 0.999.').max(0.999, 'The interval level must be between 0.5 and 0.999.').default(0.95),
    bootstrap: z
      .object({
        replications: z.number().int().min(20, 'A bootstrap needs at least 20 replications.').max(2000, 'At most 2,000 bootstrap replications.'),
        seed,
      })
      .nullish(),
    audit: z
      .object({
        replications: z.number().int().min(10, 'An estimator audit needs at least 10 replications.').max(500, 'At most 500 audit replications.'),
        seed,
      })
      .nullish(),
  })
  .strict()
  .superRefine((v, ctx) => {
    if (v.from !== undefined && v.to !== undefined && v.from > v.to) {
      ctx.addIssue({ code: 'custom', path: ['to'], message: `The window ends (${v.to}) before it starts (${v.from}).` });
    }
  });

export type FitRequestInput = z.input<typeof fitRequestSchema>;
export type FitRequest = z.output<typeof fitRequestSchema>;

/** Fewest periods a segment must have inside the window to be fitted. */
export const MIN_PERIODS = 3;
