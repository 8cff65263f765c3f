/**
 * The results of a fit run, as stored in fit_runs.results and answered by GET /api/fits/:id.
 *
 * `{ engine: { version }, segments: [...] }` is the JSON document of the engine CLI (issue 3,
 * lib/cli/fit.ts): each segment is the engine's own TimedSegmentFit (lib/stats/fit-panel.ts:
 * estimates of the five estimators with the profile, Wald and bootstrap intervals of binomialMle,
 * warnings, level, profileCurve, profileCutoff, diagnostics, implications, observed, timing),
 * untouched, so a run's numbers can be compared field by field with the CLI's. The fit run adds a
 * few fields of its own beside them, under plain names: the segment's asset class as set in the
 * dataset, the estimator the review leads with, the estimator audit and the window comparison.
 */
import type { AssetClass } from '@/db/schema';
import type { EstimateDto, TimedSegmentFit } from '@/lib/stats/fit-panel';

export type EstimatorKey = 'binomialMle' | 'vasicekMle' | 'momentVariance' | 'momentVarianceCorrected' | 'jointDefault';

export const ESTIMATOR_ORDER: readonly EstimatorKey[] = [
  'binomialMle',
  'vasicekMle',
  'momentVariance',
  'momentVarianceCorrected',
  'jointDefault',
];

export const ESTIMATOR_NAMES: Record<EstimatorKey, string> = {
  binomialMle: 'Binomial-mixture ML',
  vasicekMle: 'Vasicek closed-form ML',
  momentVariance: 'Moments (DR variance)',
  momentVarianceCorrected: 'Moments, finite-cohort corrected',
  jointDefault: 'Joint-default moments',
};

/** A warning of the fit run itself (not of the engine), same shape as the engine's. */
export type RunWarning = { code: 'sme-turnover-missing'; message: string };

/** One estimator's sampling behaviour in the audit. */
export type AuditRow = {
  estimator: EstimatorKey;
  /** Replications in which the estimator gave a value. */
  defined: number;
  /** mean(estimate) - true rho over the replications with a value. */
  bias: number | null;
  /** Root mean squared error over the replications with a value. */
  rmse: number | null;
  /** binomialMle only: share of replications whose profile interval covered the true rho. */
  profileCoverage: number | null;
  /** binomialMle only: share of replications whose Wald interval covered the true rho (replications without a Wald interval are left out; see waldMissing). */
  waldCoverage: number | null;
  /** binomialMle only: replications with an estimate but no Wald interval (maximum at rho = 0). */
  waldMissing: number | null;
};

/** The estimator audit of one segment: panels simulated at the fitted values with the segment's own n_t. */
export type AuditResult = {
  /** Which code produced it: the interim path of lib/fits/interim-audit.ts until lib/stats/audit.ts lands. */
  implementation: string;
  replications: number;
  seed: number;
  level: number;
  truth: { pd: number; rho: number };
  rows: AuditRow[];
};

/** The same segment fitted over another window (fitPanel on the sub-panel, no bootstrap). */
export type WindowResult = {
  label: string;
  periods: string[];
  T: number;
  binomialMle: {
    rho: number | null;
    pd: number | null;
    status: EstimateDto['status'];
    profile: { lower: number; upper: number } | null;
  };
  momentVarianceCorrected: number | null;
  jointDefault: number | null;
  /** Codes of the engine's warnings for this window. */
  warnings: string[];
};

/** One segment of a fit run: the engine's TimedSegmentFit plus the run's own fields. */
export type FitSegmentResult = Omit<TimedSegmentFit, 'warnings'> & {
  warnings: (TimedSegmentFit['warnings'][number] | RunWarning)[];
  /** The segment's asset class as set on the dataset ('none': no supervisory benchmark). */
  assetClass: AssetClass;
  /** The estimator the review leads with: binomialMle unless it gives no value. */
  chosen: EstimatorKey;
  audit: AuditResult | null;
  windows: WindowResult[];
};

export type FitResults = { engine: { version: string }; segments: FitSegmentResult[] };

/**
 * True when stored results have the shape above. Runs computed before the engine landed (engine
 * "rhobook-fit 0.2 (interim engine)") have another shape; the screens say so instead of guessing.
 */
export function isCurrentResults(results: unknown): results is FitResults {
  const r = results as FitResults | null;
  return (
    !!r &&
    Array.isArray(r.segments) &&
    r.segments.every((s) => Array.isArray(s?.observed) && Array.isArray(s?.profileCurve) && Array.isArray(s?.windows) && typeof s?.level === 'number')
  );
}
