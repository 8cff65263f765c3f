/**
 * Estimator audit: how the estimators behave at the user's own sample size.
 *
 * For a fitted panel, R panels are simulated from the Vasicek one-factor model at the fitted
 * (p, rho) with the same cohort sizes n_t (hence the same T), every estimator of DESIGN.md is run
 * on each, and the audit reports per estimator the bias, standard deviation and root mean square
 * error of rho-hat around the simulated truth, how often the estimator gave no value (by status),
 * and the coverage of the profile-likelihood and logit-Wald intervals of binomialMle and of the
 * chi-square interval of vasicekMle. This tells a validator how far to trust an estimate from
 * these data, which no textbook table does.
 *
 * With `phi` the panels are simulated with a persistent factor (an AR(1) with that coefficient,
 * simulate.ts), so the validator sees how the estimators and intervals behave under the
 * persistence their own data show; with `persistent` the audit also runs the estimators that allow
 * for it (ar1Mle with its profile interval, momentVarianceAutocorrected) and audits phi-hat.
 *
 * Reproducibility across threads: replication r draws from its own stream
 * createRng(deriveSeed(seed, r)), so replications can be computed over any split of [0, R)
 * (auditRange over [from, to)) and merged (mergeAudit) with identical results.
 *
 * The bootstrap interval's coverage is not audited: it would need a bootstrap of B panels inside
 * each of the R replications (R x B = 200 x 1000 = 200,000 fits, about 15 minutes on the reference
 * 2-core machine); the summary says so in `omitted`.
 *
 * Reference: Morris, T. P., White, I. R. & Crowther, M. J. (2019), "Using simulation studies to
 * evaluate statistical methods", Statistics in Medicine 38:2074-2102 (bias, empirical SE, RMSE,
 * coverage and their Monte Carlo standard errors, table 6).
 */
import { binomialMleWithProfile } from './estimators/binomial-mle';
import { jointDefault } from './estimators/joint-default';
import { momentVariance } from './estimators/moment-variance';
import { momentVarianceCorrected } from './estimators/moment-variance-corrected';
import { INDEPENDENT_ESTIMATOR_KEYS, type EstimateStatus, type IndependentEstimatorKey } from './estimators/types';
import { vasicekMle } from './estimators/vasicek-mle';
import { ar1Mle } from './estimators/ar1-mle';
import { momentVarianceAutocorrected } from './estimators/moment-variance-autocorrected';
import { ar1Fit } from './intervals/ar1-intervals';
import { vasicekChiSquareInterval } from './intervals/chi-square';
import { profileInterval } from './intervals/profile';
import { waldInterval } from './intervals/wald';
import type { Panel } from './mixture-likelihood';
import { createRng, deriveSeed } from './random';
import { simulatePanel } from './simulate';
import { assertSimulationModel } from './simulation-spec';

/** Most replications one audit may ask for. */
export const MAX_AUDIT_REPLICATIONS = 100_000;

/** What an audit simulates: the observed cohort sizes, the fitted (p, rho) as truth, the seed. */
export interface AuditSpec {
  /** Cohort sizes n_t of the observed panel, in period order. */
  obligors: readonly number[];
  /** Fitted PD, in (0, 1): the truth of the simulation. */
  pd: number;
  /** Fitted rho, in [0, 1): the truth of the simulation. */
  rho: number;
  /** Master seed, an integer in [0, 2^32). */
  seed: number;
  /** Level of the audited intervals (default 0.95). */
  level?: number;
  /** AR(1) coefficient of the simulated factor, in (-1, 1) (default 0: independent years). */
  phi?: number;
  /** Also run and audit the estimators that allow for a persistent factor (default false). */
  persistent?: boolean;
}

/** One estimator on one simulated panel. */
export interface AuditEstimate {
  rho: number | null;
  status: EstimateStatus;
}

/** One replication of the audit. */
export interface AuditReplication {
  /** Replication index r in [0, R); its stream is createRng(deriveSeed(seed, r)). */
  index: number;
  estimates: Record<IndependentEstimatorKey, AuditEstimate>;
  /** binomialMle's profile interval, null when the estimate is undefined. */
  profile: { lower: number; upper: number } | null;
  /** binomialMle's logit-Wald interval, null when there is none (estimate at rho = 0 or undefined). */
  wald: { lower: number; upper: number } | null;
  /** vasicekMle's chi-square interval, null when there is none (a default rate of 0 or 1). */
  chiSquare: { lower: number; upper: number } | null;
  /** The persistent-factor estimators (when the spec asks for them). */
  persistent?: {
    ar1Mle: AuditEstimate;
    /** ar1Mle's phi; null when undefined or at rho = 0. */
    phi: number | null;
    /** ar1Mle's profile interval of rho (p and phi re-maximised); null without an estimate. */
    ar1Profile: { lower: number; upper: number } | null;
    momentVarianceAutocorrected: AuditEstimate;
  };
}

/** Audit summary of one estimator. */
export interface EstimatorAudit {
  /** Replications with a value (status `ok` or `clipped`). */
  defined: number;
  /** Replications by status (ok, clipped, undefined, not-converged). */
  statusCounts: Record<EstimateStatus, number>;
  /** mean(rho-hat) over the replications with a value; null when fewer than 2 have one. */
  mean: number | null;
  /** mean(rho-hat) - rho (truth). */
  bias: number | null;
  /** Monte Carlo standard error of the bias, sd / sqrt(defined). */
  biasMcse: number | null;
  /** Empirical standard deviation of rho-hat (divisor defined - 1). */
  sd: number | null;
  /** sqrt(mean((rho-hat - rho)^2)). */
  rmse: number | null;
}

/** Coverage of one interval method. */
export interface CoverageAudit {
  level: number;
  /** Replications where the interval exists. */
  available: number;
  /** Replications without an interval (for Wald: the estimate at rho = 0; for both: no estimate). They count as misses. */
  missing: number;
  /** ... and contains the truth. */
  covered: number;
  /** covered / replications: a panel without an interval is a miss of the method, never left out; null when there are no replications. */
  coverage: number | null;
  /** Monte Carlo standard error of the coverage, sqrt(c (1 - c) / replications). */
  mcse: number | null;
  /** Mean width (upper - lower) of the available intervals. */
  meanWidth: number | null;
}

/** Audit of the persistent-factor estimators (AuditSpec.persistent). */
export interface PersistentAudit {
  ar1Mle: EstimatorAudit;
  /** ar1Mle's phi-hat around the true phi (rho-named fields hold phi here). */
  phi: EstimatorAudit;
  momentVarianceAutocorrected: EstimatorAudit;
  /** Coverage of ar1Mle's profile interval of rho. */
  ar1Profile: CoverageAudit;
}

/** Result of an estimator audit. */
export interface AuditSummary {
  /** The simulated truth; phi only when the spec names one (absent: the independent factor). */
  truth: { pd: number; rho: number; phi?: number };
  replications: number;
  seed: number;
  periods: number;
  estimators: Record<IndependentEstimatorKey, EstimatorAudit>;
  coverage: { profile: CoverageAudit; wald: CoverageAudit; chiSquare: CoverageAudit };
  /** The persistent-factor estimators; present only when the spec asks for them. */
  persistent?: PersistentAudit;
  /** What was not audited and why. */
  omitted: { item: string; reason: string }[];
}

function assertSpec(fn: string, spec: AuditSpec): void {
  assertSimulationModel(fn, spec);
  const level = spec.level ?? 0.95;
  if (!(level > 0 && level < 1)) {
    throw new RangeError(`${fn}: the interval level must be strictly between 0 and 1; got ${level}.`);
  }
}

function statusOf(fn: () => { rho: number | null; status: EstimateStatus }): AuditEstimate {
  try {
    const e = fn();
    return { rho: e.rho, status: e.status };
  } catch (err) {
    // Estimators throw only for invalid panels, which simulatePanel does not produce; keep the
    // replication and count it as undefined rather than lose the whole audit.
    if (err instanceof RangeError) return { rho: null, status: 'undefined' };
    throw err;
  }
}

/** ar1Mle with its rho interval and momentVarianceAutocorrected on one panel. */
function auditPersistent(panel: Panel, level: number): NonNullable<AuditReplication['persistent']> {
  let phi: number | null = null;
  let ar1Profile: { lower: number; upper: number } | null = null;
  const ar1 = statusOf(() => {
    try {
      const fit = ar1Fit(panel, { level, phiInterval: false, phiProfilePoints: 0 });
      phi = fit.result.phi;
      if (fit.profile) ar1Profile = { lower: fit.profile.lower, upper: fit.profile.upper };
      return fit.result;
    } catch (err) {
      // the interval search failed: keep the estimate, count the interval as unavailable
      if (!(err instanceof RangeError)) throw err;
      const { result } = ar1Mle(panel);
      phi = result.phi;
      return result;
    }
  });
  return { ar1Mle: ar1, phi, ar1Profile, momentVarianceAutocorrected: statusOf(() => momentVarianceAutocorrected(panel)) };
}

/** Runs every estimator and binomialMle's two likelihood intervals on one panel. */
function auditPanel(panel: Panel, level: number, persistent: boolean): Omit<AuditReplication, 'index'> {
  let profile: AuditReplication['profile'] = null;
  let wald: AuditReplication['wald'] = null;
  const mle = statusOf(() => {
    const { result, profile: likelihood } = binomialMleWithProfile(panel);
    if (likelihood && result.rho !== null && result.status !== 'not-converged') {
      const p = profileInterval(likelihood, result, level);
      profile = { lower: p.lower, upper: p.upper };
      const w = waldInterval(likelihood, result, level);
      if (w) wald = { lower: w.lower, upper: w.upper };
    }
    return result;
  });
  const chi = vasicekChiSquareInterval(panel, level);
  const chiSquare = chi.status === 'ok' ? { lower: chi.lower, upper: chi.upper } : null;
  const estimates: Record<IndependentEstimatorKey, AuditEstimate> = {
    binomialMle: mle,
    vasicekMle: statusOf(() => vasicekMle(panel)),
    momentVariance: statusOf(() => momentVariance(panel)),
    momentVarianceCorrected: statusOf(() => momentVarianceCorrected(panel)),
    jointDefault: statusOf(() => jointDefault(panel)),
  };
  return persistent ? { estimates, profile, wald, chiSquare, persistent: auditPersistent(panel, level) } : { estimates, profile, wald, chiSquare };
}

/**
 * Computes audit replications r = from, ..., to - 1 (a slice of [0, R)).
 *
 * Replication r: rng = createRng(deriveSeed(seed, r)); a panel d_t ~ simulatePanel at (pd, rho)
 * (and phi) with the cohort sizes n_t; every estimator on (n_t, d_t); binomialMle's profile and
 * logit-Wald intervals and vasicekMle's chi-square interval at `level`; with `persistent`, ar1Mle with its profile interval of rho and
 * momentVarianceAutocorrected.
 *
 * Special cases: from = to gives []; a range that is not 0 <= from <= to (whole numbers), a PD
 * outside (0, 1), rho outside [0, 1), a bad seed or level throw RangeError.
 *
 * @example auditRange({ obligors: [1000, 1000, 1000], pd: 0.01, rho: 0.1, seed: 7 }, 0, 10)
 *
 * Reference: Morris, White & Crowther (2019), section 5 (simulation procedure).
 *
 * @param onReplication called after each replication (for progress); must not throw.
 */
export function auditRange(
  spec: AuditSpec,
  from: number,
  to: number,
  onReplication?: (replication: AuditReplication) => void,
): AuditReplication[] {
  assertSpec('auditRange', spec);
  if (!Number.isSafeInteger(from) || !Number.isSafeInteger(to) || from < 0 || to < from) {
    throw new RangeError(`auditRange: the index range must satisfy 0 <= from <= to (whole numbers); got [${from}, ${to}).`);
  }
  const level = spec.level ?? 0.95;
  const obligors = spec.obligors.slice();
  const out: AuditReplication[] = [];
  for (let r = from; r < to; r++) {
    const sim = simulatePanel({ pd: spec.pd, rho: spec.rho, obligors, phi: spec.phi }, createRng(deriveSeed(spec.seed, r)));
    const replication = { index: r, ...auditPanel({ obligors: sim.obligors, defaults: sim.defaults }, level, spec.persistent === true) };
    out.push(replication);
    onReplication?.(replication);
  }
  return out;
}

function summariseEstimator(values: AuditEstimate[], truth: number): EstimatorAudit {
  const statusCounts: Record<EstimateStatus, number> = { ok: 0, clipped: 0, undefined: 0, 'not-converged': 0 };
  const xs: number[] = [];
  for (const v of values) {
    statusCounts[v.status]++;
    if (v.rho !== null && (v.status === 'ok' || v.status === 'clipped')) xs.push(v.rho);
  }
  const m = xs.length;
  if (m < 2) return { defined: m, statusCounts, mean: null, bias: null, biasMcse: null, sd: null, rmse: null };
  let sum = 0;
  for (const x of xs) sum += x;
  const mean = sum / m;
  let ss = 0;
  let se = 0;
  for (const x of xs) {
    ss += (x - mean) * (x - mean);
    se += (x - truth) * (x - truth);
  }
  const sd = Math.sqrt(ss / (m - 1));
  return { defined: m, statusCounts, mean, bias: mean - truth, biasMcse: sd / Math.sqrt(m), sd, rmse: Math.sqrt(se / m) };
}

function summariseCoverage(intervals: ({ lower: number; upper: number } | null)[], truth: number, level: number): CoverageAudit {
  let available = 0;
  let covered = 0;
  let width = 0;
  for (const iv of intervals) {
    if (!iv) continue;
    available++;
    width += iv.upper - iv.lower;
    if (iv.lower <= truth && truth <= iv.upper) covered++;
  }
  const R = intervals.length;
  const missing = R - available;
  if (R === 0) return { level, available, missing, covered, coverage: null, mcse: null, meanWidth: null };
  const c = covered / R;
  return { level, available, missing, covered, coverage: c, mcse: Math.sqrt((c * (1 - c)) / R), meanWidth: available === 0 ? null : width / available };
}

/**
 * Merges audit slices (from auditRange, in any order and any split of [0, R)) and summarises them.
 *
 * Per estimator, over the replications with a value: mean, bias = mean - rho, its Monte Carlo
 * standard error sd / sqrt(m), sd (divisor m - 1) and RMSE = sqrt(mean((rho-hat - rho)^2)); and
 * the count of each status. Per interval method: coverage = covered / R over all R replications (a
 * panel without an interval, such as a Wald interval at an estimate of 0, is a miss of the method
 * and is also counted in `missing`), its Monte Carlo standard error sqrt(c (1 - c) / R), and the
 * mean width of the intervals that exist. The replications are ordered by
 * index before summing, so the result is the same for every split.
 *
 * Special cases: an index missing, repeated or outside [0, R) (R = total replications merged)
 * throws RangeError; fewer than 2 values for an estimator give null statistics with the counts.
 *
 * @example mergeAudit([auditRange(spec, 0, 100), auditRange(spec, 100, 200)], spec)
 *
 * Reference: Morris, White & Crowther (2019), table 6 (performance measures and their Monte Carlo
 * standard errors).
 */
export function mergeAudit(parts: readonly (readonly AuditReplication[])[], spec: AuditSpec): AuditSummary {
  assertSpec('mergeAudit', spec);
  const all = parts.flat().slice();
  const R = all.length;
  if (R < 1 || R > MAX_AUDIT_REPLICATIONS) {
    throw new RangeError(`mergeAudit: the number of replications must be from 1 to ${MAX_AUDIT_REPLICATIONS}; got ${R}.`);
  }
  all.sort((a, b) => a.index - b.index);
  all.forEach((r, i) => {
    if (r.index !== i) {
      throw new RangeError(
        `mergeAudit: replication index ${i} is missing or repeated (found ${r.index}); merge each slice of 0..${R - 1} exactly once.`,
      );
    }
  });
  const level = spec.level ?? 0.95;
  const estimators = {} as Record<IndependentEstimatorKey, EstimatorAudit>;
  for (const key of INDEPENDENT_ESTIMATOR_KEYS) estimators[key] = summariseEstimator(all.map((r) => r.estimates[key]), spec.rho);
  let persistent: PersistentAudit | undefined;
  if (spec.persistent) {
    const parts = all.map((r) => {
      if (!r.persistent) {
        throw new RangeError(`mergeAudit: replication ${r.index} has no persistent-factor estimates but the spec asks for them; compute every slice with the same spec.`);
      }
      return r.persistent;
    });
    persistent = {
      ar1Mle: summariseEstimator(parts.map((q) => q.ar1Mle), spec.rho),
      phi: summariseEstimator(parts.map((q) => ({ rho: q.phi, status: q.phi === null ? 'undefined' : 'ok' })), spec.phi ?? 0),
      momentVarianceAutocorrected: summariseEstimator(parts.map((q) => q.momentVarianceAutocorrected), spec.rho),
      ar1Profile: summariseCoverage(parts.map((q) => q.ar1Profile), spec.rho, level),
    };
  }
  return {
    truth: spec.phi === undefined ? { pd: spec.pd, rho: spec.rho } : { pd: spec.pd, rho: spec.rho, phi: spec.phi },
    replications: R,
    seed: spec.seed,
    periods: spec.obligors.length,
    estimators,
    coverage: {
      profile: summariseCoverage(all.map((r) => r.profile), spec.rho, level),
      wald: summariseCoverage(all.map((r) => r.wald), spec.rho, level),
      chiSquare: summariseCoverage(all.map((r) => r.chiSquare), spec.rho, level),
    },
    ...(persistent ? { persistent } : {}),
    omitted: [
      {
        item: 'bootstrap interval coverage (binomialMle and the moment estimators)',
        reason:
          'It needs a bootstrap of B panels inside each of the R replications (R x B fits, 200,000 for R = 200 and B = 1000), far beyond an interactive run.',
      },
    ],
  };
}

/**
 * The estimator audit in one call: mergeAudit([auditRange(spec, 0, R)], spec).
 *
 * @example estimatorAudit({ obligors: new Array(20).fill(5000), pd: 0.01, rho: 0.1, seed: 7 }, 200)
 *
 * Reference: Morris, White & Crowther (2019).
 */
export function estimatorAudit(spec: AuditSpec, replications: number): AuditSummary {
  if (!Number.isInteger(replications) || replications < 1 || replications > MAX_AUDIT_REPLICATIONS) {
    throw new RangeError(
      `estimatorAudit: the number of replications must be a whole number from 1 to ${MAX_AUDIT_REPLICATIONS}; got ${replications}.`,
    );
  }
  return mergeAudit([auditRange(spec, 0, replications)], spec);
}
