/**
 * The fit of one segment's panel: the five estimators, the intervals of binomialMle, the
 * diagnostics, what the estimate implies, and (optionally) the parametric bootstrap and the
 * estimator audit (lib/stats/audit.ts). Its result,
 * {@link SegmentFit}, is the per-segment JSON of the engine CLI (issue 3) minus `timing`, plus the
 * fields the review screens need (profileCurve, diagnostics, implications, observed).
 *
 * Pure and single-threaded. For large bootstraps and audits, lib/engine's fitPanelParallel runs the
 * same stages (prepareSegmentFit, then bootstrap and audit slices in worker threads, then
 * completeSegmentFit) and gives identical numbers.
 */
import { auditRange, MAX_AUDIT_REPLICATIONS, mergeAudit, type AuditReplication, type AuditSpec, type AuditSummary } from './audit';
import { binomialMleWithProfile, RHO_SEARCH_LIMIT, type ProfileLikelihood } from './estimators/binomial-mle';
import { jointDefault } from './estimators/joint-default';
import { momentVariance } from './estimators/moment-variance';
import { momentVarianceCorrected } from './estimators/moment-variance-corrected';
import type { Estimate, EstimateStatus } from './estimators/types';
import { vasicekMle } from './estimators/vasicek-mle';
import { capitalImplications, type CapitalConvention, type Implications } from './capital-implications';
import { panelDiagnostics, type Diagnostics } from './diagnostics';
import type { FitWarning } from './fit-warnings';
import {
  bootstrapRange,
  MAX_BOOTSTRAP_REPLICATIONS,
  summariseBootstrap,
  type BootstrapInterval,
  type BootstrapReplication,
  type BootstrapSpec,
} from './intervals/bootstrap';
import { chiSquare1Quantile, profileInterval } from './intervals/profile';
import { waldInterval } from './intervals/wald';
import type { AssetClass } from './irb';

// ---------------------------------------------------------------------------------------------
// The result shape (shared with the review screens: keep the names)
// ---------------------------------------------------------------------------------------------

/** An estimate of one of the five estimators: `{ rho, pd, status, reason? }`. */
export interface EstimateDto {
  rho: number | null;
  pd: number | null;
  status: EstimateStatus;
  /** A sentence whenever status is not `ok`. */
  reason?: string;
}

/** binomialMle with its log-likelihood and three intervals (issue 3's CLI JSON). */
export interface BinomialMleDto extends EstimateDto {
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

/** One observed period. */
export interface ObservedPeriod {
  period: string;
  obligors: number;
  defaults: number;
  /** defaults / obligors. */
  dr: number;
}

/**
 * The fit of one segment (issue 3's per-segment CLI JSON without `timing`, plus review fields).
 *
 * ```
 * { segment, T, periods: string[],
 *   estimates: { binomialMle: BinomialMleDto, vasicekMle, momentVariance,
 *                momentVarianceCorrected, jointDefault: EstimateDto },
 *   warnings: [{ code, message }],
 *   level,                       // the interval level asked for
 *   profileCurve: [{ rho, logLik }],   // ~40 points of l*(rho), [] without an MLE
 *   profileCutoff,               // logLik - chi2_1(level) / 2, null without an MLE
 *   diagnostics: Diagnostics,    // lib/stats/diagnostics.ts
 *   implications: Implications | null, // quantile999, capital at estimate / interval ends, supervisory
 *   observed: [{ period, obligors, defaults, dr }],
 *   estimatorAudit: AuditSummary | null }  // lib/stats/audit.ts
 * ```
 */
export interface SegmentFit {
  segment: string;
  T: number;
  periods: string[];
  estimates: {
    binomialMle: BinomialMleDto;
    vasicekMle: EstimateDto;
    momentVariance: EstimateDto;
    momentVarianceCorrected: EstimateDto;
    jointDefault: EstimateDto;
  };
  warnings: FitWarning[];
  /** Level of every interval in this fit. */
  level: number;
  /** Profile log-likelihood l*(rho) = max_p l(p, rho) on ~40 points of [0, span] plus the estimate and the interval ends, increasing in rho. */
  profileCurve: { rho: number; logLik: number }[];
  /** The profile interval's cut-off, logLik - chi2_1(level) / 2 (the horizontal line of the profile chart); null without an MLE. */
  profileCutoff: number | null;
  diagnostics: Diagnostics;
  /** Null when binomialMle gives no estimate. */
  implications: Implications | null;
  observed: ObservedPeriod[];
  /**
   * The estimator audit (lib/stats/audit.ts): R panels simulated at the fitted (p, rho) with these
   * n_t, every estimator's bias, sd and RMSE, and the coverage of the profile and Wald intervals.
   * Null unless requested (and possible).
   */
  estimatorAudit: AuditSummary | null;
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

/** The failure record of a segment from the error that stopped its fit. */
export function segmentFailure(segment: string, position: number, err: unknown): SegmentFailure {
  const message = err instanceof Error ? err.message : String(err);
  return { segment, status: 'failed', reason: message.length > 0 ? message : 'The fit stopped without saying why.', position };
}

/** {@link SegmentFit} with the compute time, as printed by the CLI. */
export interface TimedSegmentFit extends SegmentFit {
  timing: { ms: number };
}

// ---------------------------------------------------------------------------------------------
// Inputs
// ---------------------------------------------------------------------------------------------

/** One segment's panel. */
export interface PanelInput {
  segment: string;
  /** Period labels in order (for example years), one per period. */
  periods: readonly string[];
  obligors: readonly number[];
  defaults: readonly number[];
}

/** Options of {@link fitPanel}. */
export interface FitPanelOptions {
  /** Level of all intervals, in (0, 1); default 0.95. */
  level?: number;
  /** Parametric bootstrap: B replications, master seed. Null or absent: none. */
  bootstrap?: { replications: number; seed: number } | null;
  /** Estimator audit: R replications, master seed (use another seed than the bootstrap's). Null or absent: none. */
  audit?: { replications: number; seed: number } | null;
  /** Asset class for the supervisory comparison; null or absent: none. */
  assetClass?: AssetClass | null;
  /** Annual turnover in EUR millions ('sme-corporate'). */
  turnoverMillions?: number | null;
  /** LGD of the capital implications; default 0.45. */
  lgd?: number;
  /** Maturity of the maturity adjustment; default 2.5 years for corporate classes, none otherwise. Null: none. */
  maturityYears?: number | null;
  /** Points of the profile curve (besides the estimate and interval ends); default 40. */
  profileCurvePoints?: number;
}

/**
 * Largest cohort the engine fits: 10^9 obligors in one period. Up to there the likelihood is
 * checked against a 40-digit integral (tests/fixtures/engine/make_large_cohorts.py); beyond it
 * the n-sized terms of the log-integrand lose more than 1e-7 to rounding and the fit slows down,
 * so a larger count (the upload accepts whole numbers up to 2^53) is refused with a sentence.
 */
export const MAX_OBLIGORS_PER_PERIOD = 1e9;

/** Checks a segment's panel and throws RangeError naming the segment, period and problem. */
export function assertPanelInput(input: PanelInput): void {
  const name = typeof input.segment === 'string' ? input.segment : String(input.segment);
  if (typeof input.segment !== 'string' || input.segment.length === 0) {
    throw new RangeError('fitPanel: the segment needs a non-empty name.');
  }
  const { periods, obligors, defaults } = input;
  if (!Array.isArray(periods) || !Array.isArray(obligors) || !Array.isArray(defaults)) {
    throw new RangeError(`fitPanel: segment "${name}" needs arrays of periods, obligors and defaults.`);
  }
  if (periods.length === 0) throw new RangeError(`fitPanel: segment "${name}" has no periods.`);
  if (obligors.length !== periods.length || defaults.length !== periods.length) {
    throw new RangeError(
      `fitPanel: segment "${name}" has ${periods.length} periods, ${obligors.length} obligor counts and ${defaults.length} default counts; give one of each per period.`,
    );
  }
  const seen = new Set<string>();
  for (let t = 0; t < periods.length; t++) {
    const label = String(periods[t]);
    if (seen.has(label)) throw new RangeError(`fitPanel: segment "${name}" has period ${label} twice.`);
    seen.add(label);
    const n = obligors[t];
    const d = defaults[t];
    if (!Number.isSafeInteger(n) || n < 1) {
      throw new RangeError(`fitPanel: segment "${name}", period ${label}: obligors = ${n}; it must be a positive whole number.`);
    }
    if (n > MAX_OBLIGORS_PER_PERIOD) {
      throw new RangeError(
        `fitPanel: segment "${name}", period ${label}: ${n} obligors is more than the engine handles (${MAX_OBLIGORS_PER_PERIOD.toExponential(0)} per period, where its likelihood is checked against a 40-digit integral); no loan book has a cohort this large, so check the file (a sum of balances in the obligors column?).`,
      );
    }
    if (!Number.isSafeInteger(d) || d < 0 || d > n) {
      throw new RangeError(
        `fitPanel: segment "${name}", period ${label}: defaults = ${d} with obligors = ${n}; defaults must be a whole number from 0 to obligors.`,
      );
    }
  }
}

function assertOptions(options: FitPanelOptions): void {
  const level = options.level ?? 0.95;
  if (!(level > 0 && level < 1)) throw new RangeError(`fitPanel: the level must be strictly between 0 and 1 (for example 0.95); got ${level}.`);
  const b = options.bootstrap;
  if (b) {
    if (!Number.isInteger(b.replications) || b.replications < 2 || b.replications > MAX_BOOTSTRAP_REPLICATIONS) {
      throw new RangeError(
        `fitPanel: the bootstrap needs a whole number of replications from 2 to ${MAX_BOOTSTRAP_REPLICATIONS}; got ${b.replications}.`,
      );
    }
    if (!Number.isInteger(b.seed) || b.seed < 0 || b.seed > 0xffffffff) {
      throw new RangeError(`fitPanel: the bootstrap seed must be a whole number from 0 to 4294967295; got ${b.seed}.`);
    }
  }
  const a = options.audit;
  if (a) {
    if (!Number.isInteger(a.replications) || a.replications < 2 || a.replications > MAX_AUDIT_REPLICATIONS) {
      throw new RangeError(
        `fitPanel: the estimator audit needs a whole number of replications from 2 to ${MAX_AUDIT_REPLICATIONS}; got ${a.replications}.`,
      );
    }
    if (!Number.isInteger(a.seed) || a.seed < 0 || a.seed > 0xffffffff) {
      throw new RangeError(`fitPanel: the audit seed must be a whole number from 0 to 4294967295; got ${a.seed}.`);
    }
  }
  const points = options.profileCurvePoints ?? 40;
  if (!Number.isInteger(points) || points < 2 || points > 1000) {
    throw new RangeError(`fitPanel: profileCurvePoints must be a whole number from 2 to 1000; got ${points}.`);
  }
}

function dto(e: Estimate): EstimateDto {
  return e.reason === undefined ? { rho: e.rho, pd: e.pd, status: e.status } : { rho: e.rho, pd: e.pd, status: e.status, reason: e.reason };
}

function profileCurve(
  profile: ProfileLikelihood,
  rhoHat: number,
  logLikHat: number,
  interval: { lower: number; upper: number } | null,
  count: number,
): { rho: number; logLik: number }[] {
  const reach = interval ? Math.max(1.5 * interval.upper, 2 * rhoHat, 0.05) : Math.max(2 * rhoHat, 0.2);
  const span = Math.min(RHO_SEARCH_LIMIT, reach);
  const rhos = new Set<number>();
  for (let i = 0; i < count; i++) rhos.add((span * i) / (count - 1));
  if (interval) {
    rhos.add(interval.lower);
    rhos.add(interval.upper);
  }
  const points = [...rhos]
    .filter((r) => r !== rhoHat)
    .sort((a, b) => a - b)
    .map((rho) => ({ rho, logLik: profile.at(rho).logLik }));
  points.push({ rho: rhoHat, logLik: logLikHat });
  return points.sort((a, b) => a.rho - b.rho);
}

const CORPORATE_CLASSES: readonly AssetClass[] = ['corporate', 'sme-corporate'];

/** The work left after {@link prepareSegmentFit}: the bootstrap and the audit to run, if any. */
export interface PreparedFit {
  fit: SegmentFit;
  /** What to simulate when a bootstrap was asked for and is possible; else null. */
  bootstrap: { spec: BootstrapSpec; replications: number } | null;
  /** What to simulate when an audit was asked for and is possible; else null. */
  audit: { spec: AuditSpec; replications: number } | null;
}

/**
 * Stage 1 of a segment fit: everything but the bootstrap and the audit.
 *
 * Runs binomialMle (with its profile object) and the four other estimators (DESIGN.md keys), the
 * profile interval and the logit-scale Wald interval at `level`, the profile curve, the LR test
 * of rho = 0 and the other diagnostics (diagnostics.ts), and the implications (quantile999,
 * capital at the estimate and at the profile interval's ends). The bootstrap and the audit, when
 * asked for, are described in `bootstrap` and `audit` for the caller to run (bootstrapRange and
 * auditRange over any split of their index ranges) and attach with {@link completeSegmentFit}.
 *
 * Special cases: binomialMle undefined or not converged: its intervals, profile curve and
 * implications are null/empty and a warning says why; a bootstrap or audit asked for then becomes
 * the `bootstrap-unavailable` or `audit-unavailable` warning. Invalid input throws RangeError
 * naming the segment and period.
 */
export function prepareSegmentFit(input: PanelInput, options: FitPanelOptions = {}): PreparedFit {
  assertPanelInput(input);
  assertOptions(options);
  const level = options.level ?? 0.95;
  const panel = { obligors: input.obligors.slice(), defaults: input.defaults.slice() };
  const T = panel.obligors.length;

  const { result: mle, profile } = binomialMleWithProfile(panel);
  const usable = mle.rho !== null && mle.pd !== null && mle.logLik !== null && profile !== null && mle.status !== 'not-converged';
  const binomial: BinomialMleDto = {
    ...dto(mle),
    logLik: mle.logLik,
    atBoundary: mle.atBoundary,
    intervals: { profile: null, wald: null, bootstrap: null },
  };
  let curve: SegmentFit['profileCurve'] = [];
  let logLikAtZero: number | null = null;
  let logLikAtLimit: number | null = null;
  if (usable) {
    const pi = profileInterval(profile, mle, level);
    binomial.intervals.profile = { level, lower: pi.lower, upper: pi.upper, upperAtSearchLimit: pi.upperAtSearchLimit };
    const w = waldInterval(profile, mle, level);
    binomial.intervals.wald = w === null ? null : { level, lower: w.lower, upper: w.upper, se: w.se };
    logLikAtZero = profile.at(0).logLik;
    logLikAtLimit = profile.at(RHO_SEARCH_LIMIT).logLik;
    curve = profileCurve(profile, mle.rho!, mle.logLik!, binomial.intervals.profile, options.profileCurvePoints ?? 40);
  }

  const assetClass = options.assetClass ?? null;
  const convention: CapitalConvention = {
    lgd: options.lgd ?? 0.45,
    maturityYears:
      options.maturityYears !== undefined ? options.maturityYears : assetClass !== null && CORPORATE_CLASSES.includes(assetClass) ? 2.5 : null,
    assetClass,
    turnoverMillions: options.turnoverMillions ?? null,
  };
  const { diagnostics, warnings } = panelDiagnostics({
    obligors: panel.obligors,
    defaults: panel.defaults,
    mle: { rho: mle.rho, pd: mle.pd, logLik: mle.logLik, status: mle.status, atBoundary: mle.atBoundary },
    logLikAtZero,
    logLikAtLimit,
    interval: binomial.intervals.profile,
    capital: convention,
  });
  const implications = usable ? capitalImplications(mle.pd!, mle.rho!, binomial.intervals.profile, convention) : null;
  const integration = profile?.likelihood.report();
  if (integration && integration.unconverged > 0) {
    warnings.push({
      code: 'integration-tolerance',
      message: `${integration.unconverged} of the period integrals behind the likelihood (over ${integration.evaluations} evaluations) stopped above their error tolerance of 1e-8 (largest error estimate ${integration.worstRelativeError.toExponential(1)}, relative); the values were used. Differences of this size do not move the estimate or its intervals visibly, but an independent check is advised.`,
    });
  }

  let bootstrap: PreparedFit['bootstrap'] = null;
  if (options.bootstrap) {
    if (usable) {
      bootstrap = {
        spec: { obligors: panel.obligors, pd: mle.pd!, rho: mle.rho!, seed: options.bootstrap.seed },
        replications: options.bootstrap.replications,
      };
    } else {
      warnings.push({
        code: 'bootstrap-unavailable',
        message: 'No bootstrap was run: it simulates at the likelihood estimate, and there is none for these data.',
      });
    }
  }

  let audit: PreparedFit['audit'] = null;
  if (options.audit) {
    if (usable) {
      audit = {
        spec: { obligors: panel.obligors, pd: mle.pd!, rho: mle.rho!, seed: options.audit.seed, level },
        replications: options.audit.replications,
      };
    } else {
      warnings.push({
        code: 'audit-unavailable',
        message: 'No small-sample simulation study was run: it simulates at the likelihood estimate, and there is none for these data.',
      });
    }
  }

  const fit: SegmentFit = {
    segment: input.segment,
    T,
    periods: input.periods.map(String),
    estimates: {
      binomialMle: binomial,
      vasicekMle: dto(vasicekMle(panel)),
      momentVariance: dto(momentVariance(panel)),
      momentVarianceCorrected: dto(momentVarianceCorrected(panel)),
      jointDefault: dto(jointDefault(panel)),
    },
    warnings,
    level,
    profileCurve: curve,
    profileCutoff: usable ? mle.logLik! - chiSquare1Quantile(level) / 2 : null,
    diagnostics,
    implications,
    observed: input.periods.map((period, t) => ({
      period: String(period),
      obligors: panel.obligors[t],
      defaults: panel.defaults[t],
      dr: panel.defaults[t] / panel.obligors[t],
    })),
    estimatorAudit: null,
  };
  return { fit, bootstrap, audit };
}

/** Share of failed bootstrap replications above which a warning is added (5%). */
export const BOOTSTRAP_FAILURE_WARNING_SHARE = 0.05;

/** The replications computed for a prepared fit (each merged from any split of its index range). */
export interface FitReplications {
  bootstrap?: readonly BootstrapReplication[];
  audit?: readonly AuditReplication[];
}

/**
 * Stage 2 of a segment fit: puts the replications planned by {@link prepareSegmentFit} into the
 * fit. Bootstrap: `estimates.binomialMle.intervals.bootstrap` (summariseBootstrap), with a
 * `bootstrap-failures` warning when more than 5% of the replications gave no estimate, or
 * `bootstrap-unavailable` when fewer than 2 did. Audit: `estimatorAudit` (mergeAudit). Returns a
 * new object; the input is not changed.
 *
 * Special cases: replications for a part that was not planned, a planned part without its
 * replications, or the wrong number of them throw RangeError.
 *
 * @example completeSegmentFit(prepared, { bootstrap: bootstrapRange(prepared.bootstrap.spec, 0, B) })
 */
export function completeSegmentFit(prepared: PreparedFit, replications: FitReplications): SegmentFit {
  const { fit } = prepared;
  for (const part of ['bootstrap', 'audit'] as const) {
    const planned = prepared[part];
    const got = replications[part];
    if (planned === null && got !== undefined) throw new RangeError(`completeSegmentFit: this fit did not plan a ${part}.`);
    if (planned !== null && got === undefined) throw new RangeError(`completeSegmentFit: the ${part} replications are missing.`);
    if (planned !== null && got!.length !== planned.replications) {
      throw new RangeError(`completeSegmentFit: expected ${planned.replications} ${part} replications, got ${got!.length}.`);
    }
  }
  const warnings = fit.warnings.slice();
  let interval: BootstrapInterval | null = null;
  if (prepared.bootstrap !== null) {
    const reps = replications.bootstrap!;
    const failed = reps.filter((r) => r.rho === null).length;
    if (reps.length - failed < 2) {
      warnings.push({
        code: 'bootstrap-unavailable',
        message: `Only ${reps.length - failed} of ${reps.length} bootstrap replications gave an estimate, so there is no bootstrap interval.`,
      });
    } else {
      interval = summariseBootstrap(reps, prepared.bootstrap.spec, fit.level);
      if (interval.failed > BOOTSTRAP_FAILURE_WARNING_SHARE * interval.replications) {
        warnings.push({
          code: 'bootstrap-failures',
          message: `${interval.failed} of ${interval.replications} bootstrap replications gave no estimate (most often: ${interval.failures[0].reason}). The interval and bias use the others, so they describe the estimator only when it gives a value.`,
        });
      }
    }
  }
  const estimatorAudit = prepared.audit === null ? null : mergeAudit([replications.audit!], prepared.audit.spec);
  return {
    ...fit,
    estimates: {
      ...fit.estimates,
      binomialMle: { ...fit.estimates.binomialMle, intervals: { ...fit.estimates.binomialMle.intervals, bootstrap: interval } },
    },
    warnings,
    estimatorAudit,
  };
}

/**
 * Fits one segment's panel in this thread: {@link prepareSegmentFit}, the bootstrap over [0, B)
 * and the audit over [0, R) when asked for, and {@link completeSegmentFit}. See SegmentFit for the
 * result.
 *
 * @example fitPanel({ segment: 'SME', periods: ['2015', '2016', ...], obligors: [...], defaults: [...] }, { level: 0.95 })
 *
 * Reference: Gordy & Heitfield (2002) (binomialMle); DESIGN.md for every estimator's definition.
 */
export function fitPanel(input: PanelInput, options: FitPanelOptions = {}): SegmentFit {
  const prepared = prepareSegmentFit(input, options);
  if (prepared.bootstrap === null && prepared.audit === null) return prepared.fit;
  return completeSegmentFit(prepared, {
    ...(prepared.bootstrap ? { bootstrap: bootstrapRange(prepared.bootstrap.spec, 0, prepared.bootstrap.replications) } : {}),
    ...(prepared.audit ? { audit: auditRange(prepared.audit.spec, 0, prepared.audit.replications) } : {}),
  });
}
