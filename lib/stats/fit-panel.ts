/**
 * The fit of one segment's panel: the estimators of the chosen factor models with their
 * intervals, the diagnostics, what the estimate implies, stability across the window, and
 * (optionally) the parametric bootstraps, the break test's bootstrap and the estimator audit
 * (lib/stats/audit.ts). Its result, {@link SegmentFit} (fit-result.ts), is the per-segment JSON of
 * the engine CLI minus `timing`, plus the fields the review screens need (profileCurve,
 * diagnostics, implications, observed).
 *
 * Pure and single-threaded. For large bootstraps and audits, lib/engine's fitPanelParallel runs the
 * same stages (prepareSegmentFit, then the replications in worker threads, then
 * completeSegmentFit) and gives identical numbers.
 */
import { auditRange, MAX_AUDIT_REPLICATIONS, mergeAudit, type AuditReplication, type AuditSpec } from './audit';
import { capitalImplications, type CapitalConvention } from './capital-implications';
import { cohortTooLarge } from './cohort-limit';
import { panelDiagnostics } from './diagnostics';
import { binomialMleWithProfile, RHO_SEARCH_LIMIT, type ProfileLikelihood } from './estimators/binomial-mle';
import { jointDefault } from './estimators/joint-default';
import type { MomentEstimatorKey } from './estimators/moment-target';
import { momentVariance } from './estimators/moment-variance';
import { momentVarianceCorrected } from './estimators/moment-variance-corrected';
import { vasicekMle } from './estimators/vasicek-mle';
import { assertModels, FIT_MODELS, type FitModel } from './fit-models';
import { ar1MleDto, autocorrectedDto, estimateOf, persistenceCheck } from './fit-persistent';
import type { Ar1MleDto, BinomialMleDto, MomentEstimateDto, SegmentEstimates, SegmentFailure, SegmentFit, VasicekMleDto } from './fit-result';
import { completeBreakTest, prepareStability, type BreakTestPlan, type StabilityOptions } from './fit-stability';
import {
  bootstrapRange,
  MAX_BOOTSTRAP_REPLICATIONS,
  summariseBootstrap,
  type BootstrapInterval,
  type BootstrapReplication,
  type BootstrapSpec,
} from './intervals/bootstrap';
import { vasicekChiSquareInterval } from './intervals/chi-square';
import { momentBootstrapRange, summariseMomentBootstrap, type MomentBootstrapReplication, type MomentBootstrapSpec } from './intervals/moment-bootstrap';
import { chiSquare1Quantile, profileInterval } from './intervals/profile';
import { waldInterval } from './intervals/wald';
import type { AssetClass } from './irb';
import { copulaBootstrapRange, copulaPowerRange, type CopulaLrReplication } from './copula-lr-test';
import { completeMixingLaws, MIXING_LAW_MODELS, prepareMixingLaws, type MixingLawModel, type PreparedMixingLaws } from './mixing-laws-block';
import { StageTimer, type StageTimes } from './stage-timer';
import { breakTestRange, MAX_BREAK_REPLICATIONS, type BreakReplication } from './stability/break-test';
import { DEFAULT_ROLLING_WINDOW } from './stability/rolling-window';

export type {
  Ar1MleDto,
  AutocorrectedMomentDto,
  BinomialMleDto,
  BreakTestDto,
  JackknifeDto,
  MomentEstimateDto,
  ObservedPeriod,
  SegmentEstimates,
  SegmentFailure,
  SegmentFit,
  Stability,
  TimedSegmentFit,
  VasicekMleDto,
} from './fit-result';
export type { StabilityOptions } from './fit-stability';

/** The failure record of a segment from the error that stopped its fit. */
export function segmentFailure(segment: string, position: number, err: unknown): SegmentFailure {
  const message = err instanceof Error ? err.message : String(err);
  return { segment, status: 'failed', reason: message.length > 0 ? message : 'The fit stopped without saying why.', position };
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
  /** The factor models to run (fit-models.ts); default every model, `independent` and `ar1`. */
  models?: readonly FitModel[];
  /**
   * Parametric bootstraps: B replications and the master seed of binomialMle's bootstrap and of
   * each moment estimator's (each simulates at its own estimate). Null or absent: none.
   */
  bootstrap?: { replications: number; seed: number } | null;
  /** Estimator audit: R replications, master seed (use another seed than the bootstrap's). Null or absent: none. */
  audit?: { replications: number; seed: number } | null;
  /**
   * Stability across the window (of the independent model: run only with `independent`): the
   * rolling window's length (default 10) and the break test's bootstrap. Null: none. Absent: the
   * defaults (a 10-year window, the break statistic without a p-value).
   */
  stability?: StabilityOptions | null;
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
  /** A clock in ms (lib/engine passes performance.now) to time each stage; absent: no timing. */
  clock?: () => number;
  /**
   * The other mixing laws to fit beside the Gaussian one (mixing-laws-block.ts: t, beta,
   * logitNormal) and the replications of the LR test's bootstrap and of its power study (seeded
   * with `seed`); absent or an empty list: none.
   */
  mixingLaws?: { models: readonly MixingLawModel[]; replications?: number; powerReplications?: number; seed?: number } | null;
}

export { MAX_OBLIGORS_PER_PERIOD } from './cohort-limit';

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
    const tooLarge = cohortTooLarge(n);
    if (tooLarge !== null) throw new RangeError(`fitPanel: segment "${name}", period ${label}: ${tooLarge}`);
    if (!Number.isSafeInteger(d) || d < 0 || d > n) {
      throw new RangeError(
        `fitPanel: segment "${name}", period ${label}: defaults = ${d} with obligors = ${n}; defaults must be a whole number from 0 to obligors.`,
      );
    }
  }
}

function assertReplicationOption(what: string, r: { replications: number; seed: number } | null | undefined, max: number): void {
  if (!r) return;
  if (!Number.isInteger(r.replications) || r.replications < 2 || r.replications > max) {
    throw new RangeError(`fitPanel: the ${what} needs a whole number of replications from 2 to ${max}; got ${r.replications}.`);
  }
  if (!Number.isInteger(r.seed) || r.seed < 0 || r.seed > 0xffffffff) {
    throw new RangeError(`fitPanel: the ${what} seed must be a whole number from 0 to 4294967295; got ${r.seed}.`);
  }
}

function assertOptions(options: FitPanelOptions): void {
  const level = options.level ?? 0.95;
  if (!(level > 0 && level < 1)) throw new RangeError(`fitPanel: the level must be strictly between 0 and 1 (for example 0.95); got ${level}.`);
  if (options.models !== undefined) assertModels(options.models, 'fitPanel');
  assertReplicationOption('bootstrap', options.bootstrap, MAX_BOOTSTRAP_REPLICATIONS);
  // the audit's own sentence names it "estimator audit"
  assertReplicationOption('estimator audit', options.audit, MAX_AUDIT_REPLICATIONS);
  if (options.stability) {
    assertReplicationOption('break test', options.stability.breakTest, MAX_BREAK_REPLICATIONS);
    const w = options.stability.rollingWindow;
    if (w !== undefined && (!Number.isInteger(w) || w < 2 || w > 1000)) {
      throw new RangeError(`fitPanel: the rolling window must be a whole number of periods from 2 to 1000; got ${w}.`);
    }
  }
  if (options.mixingLaws) {
    const { models, replications, powerReplications, seed } = options.mixingLaws;
    for (const m of models) {
      if (!(MIXING_LAW_MODELS as readonly string[]).includes(m)) throw new RangeError(`fitPanel: unknown mixing law "${m}"; the laws are ${MIXING_LAW_MODELS.join(', ')}.`);
    }
    if (new Set(models).size !== models.length) throw new RangeError('fitPanel: a mixing law is named twice.');
    if (replications) assertReplicationOption('LR test bootstrap', { replications, seed: seed ?? 1 }, MAX_BOOTSTRAP_REPLICATIONS);
    if (powerReplications) assertReplicationOption('power study', { replications: powerReplications, seed: seed ?? 1 }, MAX_BOOTSTRAP_REPLICATIONS);
  }
  const points = options.profileCurvePoints ?? 40;
  if (!Number.isInteger(points) || points < 2 || points > 1000) {
    throw new RangeError(`fitPanel: profileCurvePoints must be a whole number from 2 to 1000; got ${points}.`);
  }
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

/** A moment estimator's bootstrap left to run. */
export interface MomentBootstrapPlan {
  estimator: MomentEstimatorKey;
  spec: MomentBootstrapSpec;
  replications: number;
}

/** The work left after {@link prepareSegmentFit}: the replications to run, if any. */
export interface PreparedFit {
  fit: SegmentFit;
  /** binomialMle's bootstrap, when asked for and possible; else null. */
  bootstrap: { spec: BootstrapSpec; replications: number } | null;
  /** The moment estimators' bootstraps (each at its own estimate), when asked for and possible. */
  momentBootstraps: MomentBootstrapPlan[];
  /** The break test's bootstrap, when asked for and possible; else null. */
  breakTest: BreakTestPlan | null;
  /** The estimator audit, when asked for and possible; else null. */
  audit: { spec: AuditSpec; replications: number } | null;
  /** The mixing laws' stage-1 block, with the LR test's bootstrap and power replications to run; null when no law was asked for. */
  mixingLaws: PreparedMixingLaws | null;
  /** ms per stage of the preparation ({} without a clock). */
  stages: StageTimes;
}

/** The estimates of an estimator that have a value to simulate at: ok or clipped, rho < 1. */
function simulable(e: { rho: number | null; pd: number | null; status: string }): e is { rho: number; pd: number; status: string } {
  return e.rho !== null && e.pd !== null && (e.status === 'ok' || e.status === 'clipped') && e.rho < 1 && e.pd > 0 && e.pd < 1;
}

/** The sentence of a moment bootstrap that cannot run. */
function noMomentBootstrap(e: { rho: number | null; status: string }): string {
  if (e.rho === 1) return 'No bootstrap: the estimate is at the boundary rho = 1, where the model has no randomness left to simulate.';
  return 'No bootstrap: the estimator has no value on these data to simulate at.';
}

/**
 * Stage 1 of a segment fit: everything but the replications (bootstraps, the break test's
 * bootstrap, the estimator audit).
 *
 * Runs binomialMle (always: the diagnostics check it and the AR(1) model nests it) with its
 * profile and logit-Wald intervals and profile curve; with `independent` the other four estimators
 * of DESIGN.md (vasicekMle with its chi-square interval) and the stability block (jackknife,
 * rolling window, break statistic); with `ar1` ar1Mle with its intervals, the profile of phi and
 * the LR test of phi = 0, and momentVarianceAutocorrected; the diagnostics (with the LR test of
 * phi = 0 as a serial-dependence check) and the implications. The replications, when asked for,
 * are described in the plans for the caller to run over any split of their index ranges and attach
 * with {@link completeSegmentFit}. With a clock, each stage is timed into `stages`.
 *
 * The estimator audit simulates at binomialMle's (p, rho), or, with `ar1` and an AR(1) estimate,
 * at ar1Mle's (p, rho, phi) and audits the persistent-factor estimators too: the coverage of every
 * interval under the persistence the data show.
 *
 * Special cases: binomialMle undefined or not converged: its intervals, profile curve and
 * implications are null/empty and a warning says why; its bootstrap or an audit asked for then
 * becomes the `bootstrap-unavailable` or `audit-unavailable` warning; a moment estimator without a
 * value gets no bootstrap and a sentence in `intervalNotes.bootstrap`. Invalid input throws
 * RangeError naming the segment and period.
 */
export function prepareSegmentFit(input: PanelInput, options: FitPanelOptions = {}): PreparedFit {
  assertPanelInput(input);
  assertOptions(options);
  const timer = new StageTimer(options.clock);
  const level = options.level ?? 0.95;
  const models: FitModel[] = FIT_MODELS.filter((m) => (options.models ?? FIT_MODELS).includes(m));
  const independent = models.includes('independent');
  const persistent = models.includes('ar1');
  const panel = { obligors: input.obligors.slice(), defaults: input.defaults.slice() };
  const T = panel.obligors.length;

  const { result: mle, profile } = timer.time('binomialMle', () => binomialMleWithProfile(panel));
  const usable = mle.rho !== null && mle.pd !== null && mle.logLik !== null && profile !== null && mle.status !== 'not-converged';
  const binomial: BinomialMleDto = {
    ...estimateOf(mle),
    logLik: mle.logLik,
    atBoundary: mle.atBoundary,
    intervals: { profile: null, wald: null, bootstrap: null },
  };
  let curve: SegmentFit['profileCurve'] = [];
  let logLikAtZero: number | null = null;
  let logLikAtLimit: number | null = null;
  if (usable) {
    timer.time('binomialMle.profile', () => {
      const pi = profileInterval(profile, mle, level);
      binomial.intervals.profile = { level, lower: pi.lower, upper: pi.upper, upperAtSearchLimit: pi.upperAtSearchLimit };
      logLikAtZero = profile.at(0).logLik;
      logLikAtLimit = profile.at(RHO_SEARCH_LIMIT).logLik;
      curve = profileCurve(profile, mle.rho!, mle.logLik!, binomial.intervals.profile, options.profileCurvePoints ?? 40);
    });
    timer.time('binomialMle.wald', () => {
      const w = waldInterval(profile, mle, level);
      binomial.intervals.wald = w === null ? null : { level, lower: w.lower, upper: w.upper, se: w.se };
    });
  }

  const estimates: SegmentEstimates = { binomialMle: binomial };
  if (independent) {
    const v = timer.time('vasicekMle', () => vasicekMle(panel));
    const chi = timer.time('vasicekMle.chiSquare', () => vasicekChiSquareInterval(panel, level));
    const dto: VasicekMleDto = {
      ...estimateOf(v),
      intervals: { chiSquare: chi.status === 'ok' ? { level, lower: chi.lower, upper: chi.upper, approximation: chi.approximation } : null },
    };
    if (chi.status === 'undefined') dto.intervalNotes = { chiSquare: chi.reason };
    estimates.vasicekMle = dto;
    estimates.momentVariance = { ...estimateOf(timer.time('momentVariance', () => momentVariance(panel))), intervals: { bootstrap: null } };
    estimates.momentVarianceCorrected = {
      ...estimateOf(timer.time('momentVarianceCorrected', () => momentVarianceCorrected(panel))),
      intervals: { bootstrap: null },
    };
  }
  let ar1: Ar1MleDto | null = null;
  if (persistent) {
    estimates.momentVarianceAutocorrected = timer.time('momentVarianceAutocorrected', () => autocorrectedDto(panel));
  }
  if (independent) {
    estimates.jointDefault = { ...estimateOf(timer.time('jointDefault', () => jointDefault(panel))), intervals: { bootstrap: null } };
  }
  if (persistent) {
    ar1 = ar1MleDto(panel, level, timer);
    estimates.ar1Mle = ar1;
  }

  const assetClass = options.assetClass ?? null;
  const convention: CapitalConvention = {
    lgd: options.lgd ?? 0.45,
    maturityYears:
      options.maturityYears !== undefined ? options.maturityYears : assetClass !== null && CORPORATE_CLASSES.includes(assetClass) ? 2.5 : null,
    assetClass,
    turnoverMillions: options.turnoverMillions ?? null,
  };
  const { diagnostics, warnings } = timer.time('diagnostics', () =>
    panelDiagnostics({
      obligors: panel.obligors,
      defaults: panel.defaults,
      mle: { rho: mle.rho, pd: mle.pd, logLik: mle.logLik, status: mle.status, atBoundary: mle.atBoundary },
      logLikAtZero,
      logLikAtLimit,
      interval: binomial.intervals.profile,
      capital: convention,
      persistence: persistenceCheck(ar1),
    }),
  );
  const implications = timer.time('implications', () =>
    usable ? capitalImplications(mle.pd!, mle.rho!, binomial.intervals.profile, convention) : null,
  );
  const integration = profile?.likelihood.report();
  if (integration && integration.unconverged > 0) {
    warnings.push({
      code: 'integration-tolerance',
      message: `${integration.unconverged} of the period integrals behind the likelihood (over ${integration.evaluations} evaluations) stopped above their error tolerance of 1e-8 (largest error estimate ${integration.worstRelativeError.toExponential(1)}, relative); the values were used. Differences of this size do not move the estimate or its intervals visibly, but an independent check is advised.`,
    });
  }

  let stability: SegmentFit['stability'] = null;
  let breakPlan: BreakTestPlan | null = null;
  if (independent && options.stability !== null) {
    const nullModel = usable
      ? { pd: mle.pd!, rho: mle.rho! }
      : { reason: mle.reason ?? 'The no-break model (binomialMle on the whole window) has no estimate, so there is nothing to simulate from.' };
    const prepared = prepareStability(
      { periods: input.periods.map(String), ...panel },
      nullModel,
      level,
      { rollingWindow: options.stability?.rollingWindow ?? DEFAULT_ROLLING_WINDOW, breakTest: options.stability?.breakTest ?? null },
      timer,
    );
    stability = prepared.stability;
    breakPlan = prepared.breakTest;
  }

  let bootstrap: PreparedFit['bootstrap'] = null;
  const momentBootstraps: MomentBootstrapPlan[] = [];
  if (options.bootstrap) {
    const { replications, seed } = options.bootstrap;
    if (usable) {
      bootstrap = { spec: { obligors: panel.obligors, pd: mle.pd!, rho: mle.rho!, seed }, replications };
    } else {
      warnings.push({
        code: 'bootstrap-unavailable',
        message: 'No bootstrap of the likelihood estimate was run: it simulates at that estimate, and there is none for these data.',
      });
    }
    for (const key of ['momentVariance', 'momentVarianceCorrected', 'momentVarianceAutocorrected', 'jointDefault'] as const) {
      const e: MomentEstimateDto | undefined = estimates[key];
      if (!e) continue;
      if (!simulable(e)) {
        e.intervalNotes = { bootstrap: noMomentBootstrap(e) };
        continue;
      }
      // the autocorrected estimator simulates the persistence its own correction assumed
      const phi = key === 'momentVarianceAutocorrected' ? estimates.momentVarianceAutocorrected!.correction?.lag1Used : undefined;
      momentBootstraps.push({
        estimator: key,
        spec: { estimator: key, obligors: panel.obligors, pd: e.pd!, rho: e.rho!, seed, ...(phi ? { phi } : {}) },
        replications,
      });
    }
  }

  let audit: PreparedFit['audit'] = null;
  if (options.audit) {
    const truth = persistent && ar1 !== null && simulable(ar1) ? { pd: ar1.pd!, rho: ar1.rho!, phi: ar1.phi } : usable ? { pd: mle.pd!, rho: mle.rho!, phi: null } : null;
    if (truth) {
      audit = {
        spec: {
          obligors: panel.obligors,
          pd: truth.pd,
          rho: truth.rho,
          seed: options.audit.seed,
          level,
          ...(truth.phi !== null ? { phi: truth.phi } : {}),
          ...(persistent ? { persistent: true } : {}),
        },
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
    models,
    estimates,
    warnings,
    level,
    profileCurve: curve,
    profileCutoff: usable ? mle.logLik! - chiSquare1Quantile(level) / 2 : null,
    diagnostics,
    implications,
    stability,
    observed: input.periods.map((period, t) => ({
      period: String(period),
      obligors: panel.obligors[t],
      defaults: panel.defaults[t],
      dr: panel.defaults[t] / panel.obligors[t],
    })),
    estimatorAudit: null,
  };
  let mixingLaws: PreparedMixingLaws | null = null;
  if (options.mixingLaws && options.mixingLaws.models.length > 0) {
    const asked = options.mixingLaws;
    mixingLaws = timer.time('mixingLaws', () =>
      prepareMixingLaws(panel, usable ? { pd: mle.pd, rho: mle.rho, logLik: mle.logLik } : { pd: null, rho: null, logLik: null }, {
        models: asked.models,
        level,
        replications: asked.replications ?? 0,
        powerReplications: asked.powerReplications ?? 0,
        seed: asked.seed ?? 1,
      }),
    );
    Object.assign(fit.estimates, mixingLaws.estimates);
    fit.modelComparison = mixingLaws.comparison;
  }
  return { fit, bootstrap, momentBootstraps, breakTest: breakPlan, audit, mixingLaws, stages: timer.stages };
}

/** Share of failed bootstrap replications above which a warning is added (5%). */
export const BOOTSTRAP_FAILURE_WARNING_SHARE = 0.05;

/** The replications computed for a prepared fit (each merged from any split of its index range). */
export interface FitReplications {
  bootstrap?: readonly BootstrapReplication[];
  /** By estimator, one entry per planned moment bootstrap. */
  momentBootstraps?: Partial<Record<MomentEstimatorKey, readonly MomentBootstrapReplication[]>>;
  breakTest?: readonly BreakReplication[];
  audit?: readonly AuditReplication[];
  /** The LR test's bootstrap under the Gaussian fit and the power study's replications (copula-lr-test.ts). */
  copulaBootstrap?: readonly CopulaLrReplication[];
  copulaPower?: readonly CopulaLrReplication[];
}

function checkPart(part: string, planned: number | null, got: readonly unknown[] | undefined): void {
  if (planned === null && got !== undefined) throw new RangeError(`completeSegmentFit: this fit did not plan a ${part}.`);
  if (planned !== null && got === undefined) throw new RangeError(`completeSegmentFit: the ${part} replications are missing.`);
  if (planned !== null && got!.length !== planned) {
    throw new RangeError(`completeSegmentFit: expected ${planned} ${part} replications, got ${got!.length}.`);
  }
}

/**
 * Stage 2 of a segment fit: puts the replications planned by {@link prepareSegmentFit} into the
 * fit. binomialMle's bootstrap: `estimates.binomialMle.intervals.bootstrap` (summariseBootstrap),
 * with a `bootstrap-failures` warning when more than 5% of the replications gave no estimate, or
 * `bootstrap-unavailable` when fewer than 2 did. Each moment bootstrap: the estimator's
 * `intervals.bootstrap` (summariseMomentBootstrap), or its sentence in `intervalNotes.bootstrap`.
 * The break test: `stability.breakTest` with its p-value (and the `structural-break` warning at
 * 5%). The audit: `estimatorAudit` (mergeAudit). Returns a new object; the input is not changed.
 *
 * Special cases: replications for a part that was not planned, a planned part without its
 * replications, or the wrong number of them throw RangeError.
 *
 * @example completeSegmentFit(prepared, { bootstrap: bootstrapRange(prepared.bootstrap.spec, 0, B) })
 */
export function completeSegmentFit(prepared: PreparedFit, replications: FitReplications): SegmentFit {
  const fit = structuredClone(prepared.fit);
  checkPart('bootstrap', prepared.bootstrap?.replications ?? null, replications.bootstrap);
  checkPart('audit', prepared.audit?.replications ?? null, replications.audit);
  checkPart('break test', prepared.breakTest?.replications ?? null, replications.breakTest);
  const planned = new Set(prepared.momentBootstraps.map((m) => m.estimator));
  for (const key of Object.keys(replications.momentBootstraps ?? {})) {
    if (!planned.has(key as MomentEstimatorKey)) throw new RangeError(`completeSegmentFit: this fit did not plan a bootstrap of ${key}.`);
  }
  for (const m of prepared.momentBootstraps) checkPart(`${m.estimator} bootstrap`, m.replications, replications.momentBootstraps?.[m.estimator]);

  if (prepared.bootstrap !== null) {
    const reps = replications.bootstrap!;
    const failed = reps.filter((r) => r.rho === null).length;
    let interval: BootstrapInterval | null = null;
    if (reps.length - failed < 2) {
      fit.warnings.push({
        code: 'bootstrap-unavailable',
        message: `Only ${reps.length - failed} of ${reps.length} bootstrap replications gave an estimate, so there is no bootstrap interval.`,
      });
    } else {
      interval = summariseBootstrap(reps, prepared.bootstrap.spec, fit.level);
      if (interval.failed > BOOTSTRAP_FAILURE_WARNING_SHARE * interval.replications) {
        fit.warnings.push({
          code: 'bootstrap-failures',
          message: `${interval.failed} of ${interval.replications} bootstrap replications gave no estimate (most often: ${interval.failures[0].reason}). The interval and bias use the others, so they describe the estimator only when it gives a value.`,
        });
      }
    }
    fit.estimates.binomialMle.intervals.bootstrap = interval;
  }
  for (const m of prepared.momentBootstraps) {
    const e = fit.estimates[m.estimator]!;
    const r = summariseMomentBootstrap(replications.momentBootstraps![m.estimator]!, m.spec, fit.level);
    if (r.status === 'ok') {
      const { status: _status, ...interval } = r;
      e.intervals.bootstrap = { ...interval, seed: m.spec.seed };
    } else {
      e.intervalNotes = { ...e.intervalNotes, bootstrap: r.reason };
    }
  }
  if (prepared.breakTest !== null && fit.stability !== null) {
    const { breakTest, warning } = completeBreakTest(
      { periods: fit.periods, obligors: fit.observed.map((o) => o.obligors), defaults: fit.observed.map((o) => o.defaults) },
      prepared.breakTest,
      replications.breakTest!,
    );
    fit.stability.breakTest = breakTest;
    if (warning) fit.warnings.push(warning);
  }
  if (prepared.audit !== null) fit.estimatorAudit = mergeAudit([replications.audit!], prepared.audit.spec);
  checkPart('LR test bootstrap', prepared.mixingLaws?.bootstrap?.replications ?? null, replications.copulaBootstrap);
  checkPart('power study', prepared.mixingLaws?.power?.replications ?? null, replications.copulaPower);
  if (prepared.mixingLaws !== null) {
    const done = completeMixingLaws(prepared.mixingLaws, replications.copulaBootstrap ?? null, replications.copulaPower ?? null);
    fit.modelComparison = done.modelComparison;
  }
  return fit;
}

/**
 * Fits one segment's panel in this thread: {@link prepareSegmentFit}, every planned replication
 * range from 0, and {@link completeSegmentFit}. See SegmentFit (fit-result.ts) for the result.
 *
 * @example fitPanel({ segment: 'SME', periods: ['2015', '2016', ...], obligors: [...], defaults: [...] }, { level: 0.95 })
 *
 * Reference: Gordy & Heitfield (2002) (binomialMle); McNeil & Wendin (2007) (the AR(1) factor);
 * DESIGN.md for every estimator's definition and the stability block.
 */
export function fitPanel(input: PanelInput, options: FitPanelOptions = {}): SegmentFit {
  const prepared = prepareSegmentFit(input, options);
  const copula = prepared.mixingLaws;
  const none =
    prepared.bootstrap === null && prepared.momentBootstraps.length === 0 && prepared.breakTest === null && prepared.audit === null && copula === null;
  if (none) return prepared.fit;
  return completeSegmentFit(prepared, {
    ...(prepared.bootstrap ? { bootstrap: bootstrapRange(prepared.bootstrap.spec, 0, prepared.bootstrap.replications) } : {}),
    ...(prepared.momentBootstraps.length > 0
      ? { momentBootstraps: Object.fromEntries(prepared.momentBootstraps.map((m) => [m.estimator, momentBootstrapRange(m.spec, 0, m.replications)])) }
      : {}),
    ...(prepared.breakTest ? { breakTest: breakTestRange(prepared.breakTest.spec, 0, prepared.breakTest.replications) } : {}),
    ...(prepared.audit ? { audit: auditRange(prepared.audit.spec, 0, prepared.audit.replications) } : {}),
    ...(copula?.bootstrap ? { copulaBootstrap: copulaBootstrapRange(copula.bootstrap.spec, 0, copula.bootstrap.replications) } : {}),
    ...(copula?.power ? { copulaPower: copulaPowerRange(copula.power.spec, 0, copula.power.replications) } : {}),
  });
}
