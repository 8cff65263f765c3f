/**
 * The results of a fit run, as stored in fit_runs.results and answered by GET /api/fits/:id.
 *
 * `{ engine: { version }, segments: [...] }` is the JSON document of the engine CLI (`fit --json`,
 * lib/cli/fit.ts): each segment is the engine's own TimedSegmentFit (lib/stats/fit-result.ts: the
 * estimates of the models run with their intervals, warnings, level, profileCurve, profileCutoff,
 * diagnostics, implications, stability, observed, timing, estimatorAudit), untouched, so a run's
 * numbers can be compared field by field with the CLI's and fitPanel's. The fit run adds a few
 * fields of its own beside them, under plain names: the segment's asset class as set in the
 * dataset, the estimator the review leads with and the window comparison.
 *
 * Runs stored by engines before 3.0 lack `models` (they ran the independent model only),
 * `stability`, the persistent-factor estimates, the intervals of the other estimators,
 * `diagnostics.lrTestPhi0` and `timing.stages`: the type marks those optional and the screens show
 * what is there.
 */
import type { AssetClass } from '@/db/schema';
import { ESTIMATOR_KEYS, type Estimate, type EstimatorKey } from '@/lib/stats/estimators/types';
import type { FactorCorrelationMatrix } from '@/lib/stats/factor-correlation-matrix';
import type { FitModel } from '@/lib/stats/fit-models';
import type { SegmentFailure, Stability, TimedSegmentFit } from '@/lib/stats/fit-panel';
import type { GradeFit } from '@/lib/stats/grade-fit';
import type { GradeAuditSummary } from '@/lib/stats/grade-audit';
import type { PosteriorBlock, PrudentPdBlock } from '@/lib/stats/low-default';
import type { StageTimes } from '@/lib/stats/stage-timer';
import { ENGINE_VERSION } from '@/lib/stats/version';

export type { EstimatorKey } from '@/lib/stats/estimators/types';

/** Every estimator in display order (a run has those of its models). */
export const ESTIMATOR_ORDER: readonly EstimatorKey[] = ESTIMATOR_KEYS;

/** The models a stored segment ran (older runs: the independent model alone). */
export function modelsOf(seg: Pick<FitSegmentResult, 'models'>): FitModel[] {
  return seg.models ?? ['independent'];
}

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
export type FitSegmentResult = Omit<TimedSegmentFit, 'warnings' | 'models' | 'stability' | 'timing'> & {
  warnings: (TimedSegmentFit['warnings'][number] | RunWarning)[];
  /** Absent in runs stored before the AR(1) model: the independent model alone. */
  models?: FitModel[];
  /** Absent in runs stored before the stability block. */
  stability?: Stability | null;
  /** `stages` is absent in runs stored before the time of each stage was kept. */
  timing: { ms: number; stages?: StageTimes };
  /** The segment's asset class as set on the dataset ('none': no supervisory benchmark). */
  assetClass: AssetClass;
  /** The estimator the review leads with: binomialMle unless it gives no value. */
  chosen: EstimatorKey;
  windows: WindowResult[];
  /** The grid posterior of rho, when the request set a prior. */
  posterior?: PosteriorBlock;
  /** The most prudent PD, when the request asked for it. */
  prudentPd?: PrudentPdBlock;
};

/**
 * A run's results. `failures` (absent in runs stored before segments could fail one by one) lists
 * the segments whose fit failed, each with its reason and its position among all the run's segments.
 */
export type FitResults = {
  engine: { version: string };
  segments: FitSegmentResult[];
  failures?: SegmentFailure[];
  /** Grades under one factor, when the request named a group. */
  group?: GradeFit & { estimatorAudit?: GradeAuditSummary | null };
  /** The factor-correlation matrix, when the request asked for pairs. */
  pairs?: FactorCorrelationMatrix;
};

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

/**
 * A segment of a run by the name in a page address: the name as given, or percent-decoded once
 * (a name with `%` or `/` reaches the page either way). Null when the run has no such segment.
 */
export function findSegment(results: FitResults, name: string): { fit: FitSegmentResult; index: number } | { failure: SegmentFailure } | null {
  let decoded = name;
  try {
    decoded = decodeURIComponent(name);
  } catch {
    // not percent-encoded: the name as given
  }
  for (const candidate of name === decoded ? [name] : [name, decoded]) {
    const index = results.segments.findIndex((s) => s.segment === candidate);
    if (index >= 0) return { fit: results.segments[index], index };
    const failure = results.failures?.find((f) => f.segment === candidate);
    if (failure) return { failure };
  }
  return null;
}

/** The address of a segment's review page. */
export function segmentHref(fitId: number, segment: string): string {
  return `/fits/${fitId}/segments/${encodeURIComponent(segment)}`;
}

/** What one segment of a run came to: its fit, or why it failed (reported in its place). */
export type SegmentOutcome = { kind: 'fit'; fit: FitSegmentResult } | { kind: 'failed'; failure: SegmentFailure };

/** A run's results from its segments' outcomes, in the run's order of segments. */
export function assembleFitResults(outcomes: readonly SegmentOutcome[]): FitResults {
  const segments: FitSegmentResult[] = [];
  const failures: SegmentFailure[] = [];
  for (const o of outcomes) {
    if (o.kind === 'fit') segments.push(o.fit);
    else failures.push(o.failure);
  }
  return { engine: { version: ENGINE_VERSION }, segments, failures };
}
