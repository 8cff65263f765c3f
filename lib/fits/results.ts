/**
 * The results of a fit run, as stored in fit_runs.results and answered by GET /api/fits/:id.
 *
 * `{ engine: { version }, segments: [...] }` is the JSON document of the engine CLI (`fit --json`,
 * lib/cli/fit.ts): each segment is the engine's own TimedSegmentFit (lib/stats/fit-panel.ts:
 * estimates of the five estimators with the profile, Wald and bootstrap intervals of binomialMle,
 * warnings, level, profileCurve, profileCutoff, diagnostics, implications, observed, timing,
 * estimatorAudit), untouched, so a run's numbers can be compared field by field with the CLI's and
 * fitPanel's. The fit run adds a few fields of its own beside them, under plain names: the
 * segment's asset class as set in the dataset, the estimator the review leads with and the window
 * comparison.
 */
import type { AssetClass } from '@/db/schema';
import type { Estimate } from '@/lib/stats/estimators/types';
import type { SegmentFailure, TimedSegmentFit } from '@/lib/stats/fit-panel';

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

/** The same segment fitted over another window (fitPanel on the sub-panel, no bootstrap). */
export type WindowResult = {
  label: string;
  periods: string[];
  T: number;
  binomialMle: {
    rho: number | null;
    pd: number | null;
    status: Estimate['status'];
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
  windows: WindowResult[];
};

/**
 * A run's results. `failures` (absent in runs stored before segments could fail one by one) lists
 * the segments whose fit failed, each with its reason and its position among all the run's segments.
 */
export type FitResults = { engine: { version: string }; segments: FitSegmentResult[]; failures?: SegmentFailure[] };

/** The run's segments in their order, fitted and failed alike (older results have no failures). */
export function segmentsInOrder(results: FitResults): ({ kind: 'fit'; fit: FitSegmentResult; index: number } | { kind: 'failed'; failure: SegmentFailure })[] {
  const failures = results.failures ?? [];
  const out: ({ kind: 'fit'; fit: FitSegmentResult; index: number } | { kind: 'failed'; failure: SegmentFailure })[] = [];
  let next = 0;
  const total = results.segments.length + failures.length;
  for (let position = 0; position < total; position++) {
    const failure = failures.find((f) => f.position === position);
    if (failure) out.push({ kind: 'failed', failure });
    else if (next < results.segments.length) {
      out.push({ kind: 'fit', fit: results.segments[next], index: next });
      next++;
    }
  }
  return out;
}

/**
 * True when stored results have the shape above. Runs computed before the engine landed (engine
 * "rhobook-fit 0.2 (interim engine)"), or before the engine's estimator audit replaced the interim
 * one (no `estimatorAudit`), have another shape; the screens say so instead of guessing.
 */
export function isCurrentResults(results: unknown): results is FitResults {
  const r = results as FitResults | null;
  return (
    !!r &&
    Array.isArray(r.segments) &&
    r.segments.every(
      (s) => Array.isArray(s?.observed) && Array.isArray(s?.profileCurve) && Array.isArray(s?.windows) && typeof s?.level === 'number' && s.estimatorAudit !== undefined,
    )
  );
}
