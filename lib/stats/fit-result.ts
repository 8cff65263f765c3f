/**
 * The result of a segment fit (fit-panel.ts): the per-segment JSON of the engine CLI (`fit --json`)
 * and of a fit run, shared with the review screens (keep the names).
 *
 * ```
 * { segment, T, periods: string[], models: ['independent', 'ar1'],
 *   estimates: { binomialMle, vasicekMle?, momentVariance?, momentVarianceCorrected?,
 *                momentVarianceAutocorrected?, jointDefault?, ar1Mle? },
 *   warnings: [{ code, message }],
 *   level,                              // the interval level asked for
 *   profileCurve: [{ rho, logLik }],    // ~40 points of binomialMle's l*(rho), [] without an MLE
 *   profileCutoff,                      // logLik - chi2_1(level) / 2, null without an MLE
 *   diagnostics: Diagnostics,           // lib/stats/diagnostics.ts
 *   implications: Implications | null,  // quantile999, capital at estimate / interval ends, supervisory
 *   stability: Stability | null,        // jackknife, breakTest, rolling (the independent model)
 *   observed: [{ period, obligors, defaults, dr }],
 *   estimatorAudit: AuditSummary | null }
 * ```
 *
 * Which estimates are present follows `models` (fit-models.ts): binomialMle always; vasicekMle,
 * momentVariance, momentVarianceCorrected and jointDefault with `independent`;
 * momentVarianceAutocorrected and ar1Mle with `ar1`. Every estimator with an interval carries it
 * under `intervals` (null when it was not asked for or cannot be computed; `intervalNotes` says why
 * in the second case).
 */
import type { MixingLawEstimates, ModelComparison } from './mixing-laws-block';
import type { AuditSummary } from './audit';
import type { Implications } from './capital-implications';
import type { Diagnostics } from './diagnostics';
import type { AutocorrelationCorrection } from './estimators/moment-target';
import type { Estimate } from './estimators/types';
import type { FitModel } from './fit-models';
import type { FitWarning } from './fit-warnings';
import type { Ar1Interval } from './intervals/ar1-intervals';
import type { BootstrapInterval } from './intervals/bootstrap';
import type { MomentBootstrapInterval } from './intervals/moment-bootstrap';
import type { StageTimes } from './stage-timer';
import type { Jackknife } from './stability/jackknife';
import type { RollingWindow, RollingWindowUndefined } from './stability/rolling-window';

/** binomialMle with its log-likelihood and three intervals. */
export interface BinomialMleDto extends Estimate {
  /** Log-likelihood at the estimate, binomial coefficients included; null when undefined. */
  logLik: number | null;
  /** The maximum is at rho = 0 exactly. */
  atBoundary: boolean;
  intervals: {
    /** Profile-likelihood interval (the lower end may be 0); `upperAtSearchLimit` when the profile never falls below the cut-off. */
    profile: { level: number; lower: number; upper: number; upperAtSearchLimit: boolean } | null;
    /** Wald interval on the logit scale; `se` is the standard error of rho on its own scale. Null at the boundary. */
    wald: { level: number; lower: number; upper: number; se: number } | null;
    /** Parametric bootstrap percentile interval; null unless requested (and possible). */
    bootstrap: BootstrapInterval | null;
  };
}

/** Why an interval of an estimator is null although it was asked for, by interval key. */
export type IntervalNotes = Partial<Record<string, string>>;

/** vasicekMle with its chi-square interval (intervals/chi-square.ts). */
export interface VasicekMleDto extends Estimate {
  intervals: {
    /** The interval from the chi-square law of the closed-form variance, with the approximation it rests on. */
    chiSquare: { level: number; lower: number; upper: number; approximation: string } | null;
  };
  intervalNotes?: IntervalNotes;
}

/** A moment estimator with its parametric bootstrap (intervals/moment-bootstrap.ts). */
export interface MomentEstimateDto extends Estimate {
  intervals: {
    /** DESIGN.md's `{ level, lower, upper, bias, replications, clipped, undefined }` and the seed; null unless requested (and possible). */
    bootstrap: (MomentBootstrapInterval & { seed: number }) | null;
  };
  intervalNotes?: IntervalNotes;
}

/** momentVarianceAutocorrected: a moment estimator with the correction it applied. */
export interface AutocorrectedMomentDto extends MomentEstimateDto {
  /** r_1, the value used after the clip, and the bias factor; null when the target is undefined. */
  correction: AutocorrelationCorrection | null;
}

/** ar1Mle with its intervals, the profile of phi and the LR test of phi = 0. */
export interface Ar1MleDto extends Estimate {
  /** The factor's AR(1) coefficient; null when undefined or at rho = 0 (not identified there). */
  phi: number | null;
  /** Log-likelihood at the estimate; null when undefined. */
  logLik: number | null;
  /** The maximum is at rho = 0. */
  atBoundary: boolean;
  /** phi at the edge of the search (|phi| = 0.99). */
  phiAtEdge: boolean;
  intervals: {
    /** Profile-likelihood interval of rho, p and phi re-maximised; null without an estimate. */
    profile: Ar1Interval | null;
  };
  /** Profile-likelihood interval of phi, p and rho re-maximised. */
  phiInterval: Ar1Interval | null;
  /** The likelihood-ratio test of phi = 0 (the independent model) against the AR(1) factor. */
  lrTestPhi0: { statistic: number; pValue: number } | null;
  /** binomialMle's maximum, the log-likelihood at phi = 0. */
  logLikIndependent: number | null;
  /** The profile of phi, max over (p, rho) at each phi, on a grid, and the intervals' cut-off. */
  phiProfile: { points: { phi: number; logLik: number }[]; cutoff: number } | null;
  intervalNotes?: IntervalNotes;
}

/** The estimates block. */
export interface SegmentEstimates {
  binomialMle: BinomialMleDto;
  vasicekMle?: VasicekMleDto;
  momentVariance?: MomentEstimateDto;
  momentVarianceCorrected?: MomentEstimateDto;
  momentVarianceAutocorrected?: AutocorrectedMomentDto;
  jointDefault?: MomentEstimateDto;
  ar1Mle?: Ar1MleDto;
  /** The other mixing laws (mixing-laws-block.ts), when asked for. */
  tCopula?: MixingLawEstimates['tCopula'];
  betaMixing?: MixingLawEstimates['betaMixing'];
  logitNormal?: MixingLawEstimates['logitNormal'];
}

/** The jackknife (DESIGN.md `stability.jackknife`), or why there is none. */
export type JackknifeDto = ({ status: 'ok' } & Jackknife) | { status: 'undefined'; reason: string };

/**
 * The structural-break test (DESIGN.md `stability.breakTest` `{ statistic, splitYear, pValue,
 * replications }`): `ok` with the bootstrap p-value; `statistic-only` when no bootstrap was asked
 * for (the supremum is not chi-square, so there is no p-value without one; `reason` says so);
 * `undefined` with a sentence when the panel is too short or has no estimate.
 */
export type BreakTestDto =
  | {
      status: 'ok' | 'statistic-only';
      statistic: number;
      /** The first period of the second part, at the supremum. */
      splitYear: string;
      pValue: number | null;
      replications: number;
      /** Replications whose fits did not converge (left out of the p-value). */
      failed: number;
      seed: number | null;
      /** LR statistic per candidate split year (the first year of the second part). */
      splits: { splitYear: string; statistic: number }[];
      reason?: string;
    }
  | { status: 'undefined'; reason: string };

/** Stability across the window (DESIGN.md): of the independent-factor model. */
export interface Stability {
  jackknife: JackknifeDto;
  breakTest: BreakTestDto;
  /** DESIGN.md `{ window, entries: [ { from, to, rho, lower, upper } ] }`, or `undefined` with a sentence when the panel is shorter than the window. */
  rolling: RollingWindow | RollingWindowUndefined;
}

/** One observed period. */
export interface ObservedPeriod {
  period: string;
  obligors: number;
  defaults: number;
  /** defaults / obligors. */
  dr: number;
}

/** The fit of one segment (the CLI's per-segment JSON without `timing`, plus review fields). */
export interface SegmentFit {
  segment: string;
  T: number;
  periods: string[];
  /** The models that were run (fit-models.ts). */
  models: FitModel[];
  estimates: SegmentEstimates;
  warnings: FitWarning[];
  /** Level of every interval in this fit. */
  level: number;
  /** binomialMle's profile log-likelihood l*(rho) = max_p l(p, rho) on ~40 points of [0, span] plus the estimate and the interval ends, increasing in rho. */
  profileCurve: { rho: number; logLik: number }[];
  /** The profile interval's cut-off, logLik - chi2_1(level) / 2 (the horizontal line of the profile chart); null without an MLE. */
  profileCutoff: number | null;
  diagnostics: Diagnostics;
  /** Null when binomialMle gives no estimate. */
  implications: Implications | null;
  /** Stability across the window; null when the independent model was not run or stability was not asked for. */
  stability: Stability | null;
  observed: ObservedPeriod[];
  /**
   * The estimator audit (lib/stats/audit.ts): R panels simulated at the fitted values with these
   * n_t (with the AR(1) model, at ar1Mle's (p, rho, phi): the coverage of each interval under the
   * persistence the data show), every estimator's bias, sd and RMSE, and the coverage of the
   * likelihood and chi-square intervals. Null unless requested (and possible).
   */
  estimatorAudit: AuditSummary | null;
  /**
   * The mixing laws side by side with the Gaussian one, the LR test of the Gaussian against the t
   * copula (bootstrap p-value when replications were run) and the power study, with their cautions;
   * absent unless a mixing law was asked for.
   */
  modelComparison?: ModelComparison;
}

/**
 * A segment whose fit failed: it stands in the document in its place among the fitted segments
 * (`position` counts both kinds, from 0), with the error's sentence, so that one segment does not
 * sink the others.
 */
export interface SegmentFailure {
  segment: string;
  status: 'failed';
  /** What went wrong, in the engine's sentence. */
  reason: string;
  /** Index of the segment among all segments of the run or file, failed or not. */
  position: number;
}

/** {@link SegmentFit} with the compute time, as printed by the CLI. */
export interface TimedSegmentFit extends SegmentFit {
  /** Wall-clock ms of the whole segment, and per stage (each estimator, each interval method, diagnostics, stability, audit). */
  timing: { ms: number; stages: StageTimes };
}
