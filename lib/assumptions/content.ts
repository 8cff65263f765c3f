import { createHash } from 'node:crypto';
import { z } from 'zod';
import type { AssumptionMixingLaw, FactorModel } from '@/db/schema';
import { ESTIMATOR_KEYS } from '@/lib/stats/estimators/types';
import { isIsoDate, reviewByProblem } from './dates';
import type { DefinitionSpan } from '@/lib/ingest/default-definition';
import { marginProblems } from './margins';
import { CREDIBLE_INTERVAL, POSTERIOR_ESTIMATOR, type PriorRecord } from './posterior-evidence';
import { T_COPULA_ESTIMATOR, type NuInterval } from './t-copula-evidence';

/**
 * The content of an assumption version: the frozen evidence copied from the fit run and the
 * analyst's judgement. The content hash is the SHA-256 of this object as canonical JSON (keys
 * sorted), so that a review can be tied to exactly what was reviewed, and an edit voids it.
 */
export type Evidence = {
  fitRunId: number | null;
  datasetId: number | null;
  datasetSha256: string;
  engineVersion: string;
  seeds: unknown;
  estimator: string;
  /**
   * The factor model the estimator assumes (ESTIMATOR_MODEL of lib/stats/fit-models.ts). Not in the
   * content hash: it follows from the estimator, which is, so hashes taken before it was kept stay valid.
   */
  factorModel: FactorModel;
  estimate: number;
  intervalMethod: string;
  intervalLevel: number;
  intervalLower: number;
  intervalUpper: number;
  pd: number;
  windowFrom: string;
  windowTo: string;
  /**
   * The definitions of default over the fitted years, frozen at drafting; undefined for versions
   * drafted before they were carried (left out of the hash, so their hashes stay as stored).
   */
  defaultDefinitions?: DefinitionSpan[];
  /**
   * The priors of a posterior median ({ rho: "flat", pd: "beta:1,1" }), null for every other
   * estimator. Not in the content hash: it follows from the fit run, segment and estimator, which are.
   */
  prior: PriorRecord | null;
  /**
   * The mixing law of the value ('gaussian' for every version drafted before it was kept), and for
   * the t copula its degrees of freedom nu with their profile interval (null for a Gaussian value).
   * In the content hash only when the law is not Gaussian, so the hashes of Gaussian versions stay as stored.
   */
  mixingLaw: AssumptionMixingLaw;
  nu: number | null;
  nuInterval: NuInterval | null;
};

export type Judgement = {
  marginData: number;
  marginDataRationale: string;
  marginPractice: number;
  marginPracticeRationale: string;
  marginGeneral: number;
  marginGeneralRationale: string;
  finalValue: number;
  intendedUses: string;
  limitations: string;
  effectiveDate: string;
  reviewBy: string;
};

export type VersionContent = Evidence & Judgement & { segment: string; conservativeValue: number };

export const contentFields = [
  'segment',
  'fitRunId',
  'datasetId',
  'datasetSha256',
  'engineVersion',
  'seeds',
  'estimator',
  'estimate',
  'intervalMethod',
  'intervalLevel',
  'intervalLower',
  'intervalUpper',
  'pd',
  'windowFrom',
  'windowTo',
  'defaultDefinitions',
  'mixingLaw',
  'nu',
  'nuInterval',
  'marginData',
  'marginDataRationale',
  'marginPractice',
  'marginPracticeRationale',
  'marginGeneral',
  'marginGeneralRationale',
  'conservativeValue',
  'finalValue',
  'intendedUses',
  'limitations',
  'effectiveDate',
  'reviewBy',
] as const satisfies readonly (keyof VersionContent)[];

/** Canonical JSON (keys sorted, undefined left out): what every content hash of the library is taken of. */
export function canonical(v: unknown): string {
  if (v === null || typeof v !== 'object') return JSON.stringify(v ?? null);
  if (Array.isArray(v)) return `[${v.map(canonical).join(',')}]`;
  const o = v as Record<string, unknown>;
  return `{${Object.keys(o)
    .filter((k) => o[k] !== undefined)
    .sort()
    .map((k) => `${JSON.stringify(k)}:${canonical(o[k])}`)
    .join(',')}}`;
}

/** The fields of the mixing law: hashed only for a law other than the Gaussian. */
const lawFields: ReadonlySet<string> = new Set(['mixingLaw', 'nu', 'nuInterval']);

export function contentHash(c: VersionContent): string {
  const picked: Record<string, unknown> = {};
  // Left out (undefined) for a Gaussian value: its hash is the one taken before the law was kept.
  const gaussian = (c.mixingLaw ?? 'gaussian') === 'gaussian';
  for (const f of contentFields) picked[f] = gaussian && lawFields.has(f) ? undefined : c[f];
  return createHash('sha256').update(canonical(picked)).digest('hex');
}

export const fieldLabels: Record<(typeof contentFields)[number], string> = {
  segment: 'Segment',
  fitRunId: 'Fit run',
  datasetId: 'Dataset',
  datasetSha256: 'Dataset SHA-256',
  engineVersion: 'Engine version',
  seeds: 'Seeds',
  estimator: 'Estimator',
  estimate: 'Estimate',
  intervalMethod: 'Interval method',
  intervalLevel: 'Interval level',
  intervalLower: 'Interval lower',
  intervalUpper: 'Interval upper',
  pd: 'PD',
  windowFrom: 'Window from',
  windowTo: 'Window to',
  defaultDefinitions: 'Definition of default',
  mixingLaw: 'Mixing law',
  nu: 'Degrees of freedom (nu)',
  nuInterval: 'Interval of nu',
  marginData: 'Margin: data and method',
  marginDataRationale: 'Rationale: data and method',
  marginPractice: 'Margin: lending practice',
  marginPracticeRationale: 'Rationale: lending practice',
  marginGeneral: 'Margin: general estimation error',
  marginGeneralRationale: 'Rationale: general estimation error',
  conservativeValue: 'Estimate plus margins',
  finalValue: 'Final value',
  intendedUses: 'Intended uses',
  limitations: 'Limitations',
  effectiveDate: 'Effective date',
  reviewBy: 'Review by',
};

export type FieldChange = { field: (typeof contentFields)[number]; label: string; before: unknown; after: unknown };

/** The content fields that differ between two versions (before = a, after = b). */
export function diffVersions(a: VersionContent, b: VersionContent): FieldChange[] {
  return contentFields
    .filter((f) => canonical(a[f]) !== canonical(b[f]))
    .map((f) => ({ field: f, label: fieldLabels[f], before: a[f], after: b[f] }));
}

// ---------------------------------------------------------------------------------------------
// The analyst's input (request bodies and form data), validated with sentences naming the field
// ---------------------------------------------------------------------------------------------

const rationale = (what: string) =>
  z.string().trim().min(1, `Give a rationale for the margin for ${what} (say why, even when the margin is 0).`).max(4000);
const margin = (what: string) =>
  z.object({
    value: z.number({ message: `The margin for ${what} must be a number.` }).min(0, `The margin for ${what} cannot be negative.`).max(0.999),
    rationale: rationale(what),
  });
const isoDate = (what: string) => z.string().refine(isIsoDate, `The ${what} must be a calendar date written YYYY-MM-DD.`);

export const judgementSchema = z.object({
  margins: z.object({
    data: margin('data and method deficiencies'),
    practice: margin('changes in lending or recovery practice'),
    general: margin('general estimation error'),
  }),
  /** Omitted: the estimate plus the margins. */
  finalValue: z.number({ message: 'The final value must be a number.' }).optional(),
  intendedUses: z.string().trim().min(1, 'Say what the assumption is intended for (intended uses).').max(4000),
  limitations: z.string().trim().min(1, 'State the limitations of the assumption.').max(4000),
  effectiveDate: isoDate('effective date'),
  /** Omitted: twelve months after the effective date. */
  reviewBy: isoDate('review-by date').optional(),
});

/**
 * Every estimator with an interval can be drafted: the five of DESIGN.md, the persistent-factor
 * ones, the posterior median of a low-default segment (posterior-evidence.ts) and the Student-t
 * copula's maximum (t-copula-evidence.ts).
 */
export const estimatorKeys = [...ESTIMATOR_KEYS, POSTERIOR_ESTIMATOR, T_COPULA_ESTIMATOR] as const;
/**
 * The interval keys of the engine's results: binomialMle's profile, Wald and bootstrap, vasicekMle's
 * chi-square, the moment estimators' bootstrap, ar1Mle's profile, and the posterior's equal-tailed
 * credible interval.
 */
export const intervalMethods = ['profile', 'wald', 'bootstrap', 'chiSquare', CREDIBLE_INTERVAL] as const;

/** The readable name of each interval method, beside the keys (screens, API answers). */
export const INTERVAL_METHOD_LABELS: Readonly<Record<string, string>> = {
  profile: 'profile likelihood',
  wald: 'Wald',
  bootstrap: 'parametric bootstrap',
  chiSquare: 'chi-square (large pool)',
  [CREDIBLE_INTERVAL]: 'equal-tailed credible (posterior)',
};

/** The readable name of an interval method key (a key without a label is shown as it is). */
export function intervalMethodLabel(key: string): string {
  return INTERVAL_METHOD_LABELS[key] ?? key;
}

export const draftInputSchema = judgementSchema.extend({
  fitId: z.number({ message: 'Give the fit run (fitId) the assumption is drawn from.' }).int().positive(),
  segment: z.string().trim().min(1, 'Give the segment.').max(120),
  estimator: z.enum(estimatorKeys, { message: `Choose the estimator: ${estimatorKeys.join(', ')}.` }),
  intervalMethod: z.enum(intervalMethods, { message: `Choose the interval: ${intervalMethods.join(', ')}.` }).default('profile'),
});
export type DraftInput = z.input<typeof draftInputSchema>;

/** An edit changes the judgement only: the evidence stays frozen (draft a new version for another fit). */
export const editInputSchema = judgementSchema.partial().strict();
export type EditInput = z.input<typeof editInputSchema>;

/** Checks the cross-field rules (margins against the estimate, review-by against effective date). */
export function judgementProblems(estimate: number, j: Judgement): { field: string; message: string }[] {
  const out = marginProblems(estimate, { data: j.marginData, practice: j.marginPractice, general: j.marginGeneral }, j.finalValue);
  const rb = reviewByProblem(j.effectiveDate, j.reviewBy);
  if (rb) out.push({ field: 'reviewBy', message: rb });
  return out;
}
