/**
 * Fits one segment's panel for a fit run and builds the per-segment results of lib/fits/results.ts.
 *
 * INTERIM: the engine issue (3) is still landing. This file assembles the per-segment results from
 * what lib/stats exports (the five estimators, the profile likelihood, Brent's root finder, the
 * Vasicek distribution, the IRB formulas, the seeded generator and panel simulation). When
 * lib/stats/fit-panel.ts and lib/engine's worker-thread pool land, the estimation part should call
 * them (bootstrap and audit on worker threads) and FIT_ENGINE_VERSION should follow ENGINE_VERSION.
 *
 * Deterministic: given the panel, the request and the seeds, the numbers are identical on every run.
 */
import chisquareQuantile from '@stdlib/stats-base-dists-chisquare-quantile';
import type { AssetClass } from '@/db/schema';
import { brentRoot } from '@/lib/stats/brent';
import { binomialMleWithProfile, RHO_SEARCH_LIMIT, type ProfileLikelihood } from '@/lib/stats/estimators/binomial-mle';
import { jointDefault } from '@/lib/stats/estimators/joint-default';
import { momentVariance } from '@/lib/stats/estimators/moment-variance';
import { momentVarianceCorrected } from '@/lib/stats/estimators/moment-variance-corrected';
import type { Estimate } from '@/lib/stats/estimators/types';
import { vasicekMle } from '@/lib/stats/estimators/vasicek-mle';
import { capitalRequirement, supervisoryCorrelation, type AssetClass as IrbAssetClass } from '@/lib/stats/irb';
import type { Panel } from '@/lib/stats/mixture-likelihood';
import { normalCdf } from '@/lib/stats/normal';
import { createRng, type Rng } from '@/lib/stats/random';
import { simulatePanel } from '@/lib/stats/simulate';
import { defaultCorrelation, impliedFactor as impliedFactorOf, jointDefaultProbability, vasicekCdf, vasicekQuantile } from '@/lib/stats/vasicek';
import type {
  AuditRow,
  BinomialMleResultDto,
  EstimateResult,
  EstimatorKey,
  SegmentResult,
  Warning,
  WindowResult,
} from './results';
import { ESTIMATOR_ORDER } from './results';

export const FIT_ENGINE_VERSION = 'rhobook-fit 0.2 (interim engine)';

export type SegmentInput = {
  segment: string;
  assetClass: AssetClass;
  /** Annual turnover in EUR millions (SME size adjustment). */
  turnoverEurMillions?: number | null;
  periods: string[];
  obligors: number[];
  defaults: number[];
};

export type FitOptions = {
  level: number;
  bootstrap?: { replications: number; seed: number } | null;
  audit?: { replications: number; seed: number } | null;
  /** Called often during long work; may throw to stop (cancellation, lost lease). */
  onProgress?: (fraction: number, message: string) => Promise<void>;
};

/** The IRB asset class of a segment, or null when the segment has none (no supervisory benchmark). */
function irbClass(assetClass: AssetClass): IrbAssetClass | null {
  return assetClass === 'none' ? null : assetClass;
}

function capital(pd: number, rho: number, lgd: number, maturityYears: number | null): number {
  return capitalRequirement({ pd, rho, lgd, ...(maturityYears === null ? {} : { maturityYears }) });
}

function simulate(obligors: readonly number[], pd: number, rho: number, rng: Rng): Panel {
  const sim = simulatePanel({ pd, rho, obligors: [...obligors] }, rng);
  return { obligors: sim.obligors, defaults: sim.defaults };
}

// ---------------------------------------------------------------------------------------------
// The fit of one segment
// ---------------------------------------------------------------------------------------------

function safely(fn: () => Estimate): EstimateResult {
  try {
    const e = fn();
    return { rho: e.rho, pd: e.pd, status: e.status, ...(e.reason ? { reason: e.reason } : {}) };
  } catch (err) {
    return { rho: null, pd: null, status: 'undefined', reason: err instanceof Error ? err.message : String(err) };
  }
}

/** Profile-likelihood interval: where l*(rho) falls chi2_1(level) / 2 below its maximum. */
function profileInterval(profile: ProfileLikelihood, rhoHat: number, maxLogLik: number, level: number) {
  const drop = chisquareQuantile(level, 1) / 2;
  const target = maxLogLik - drop;
  const f = (rho: number) => profile.at(rho).logLik - target;
  let lower = 0;
  if (rhoHat > 0 && f(0) < 0) lower = brentRoot(f, 0, rhoHat, { tolerance: 1e-7 }).value;
  let upper = RHO_SEARCH_LIMIT;
  if (f(RHO_SEARCH_LIMIT) < 0) upper = brentRoot(f, Math.max(rhoHat, 1e-9), RHO_SEARCH_LIMIT, { tolerance: 1e-7 }).value;
  return { level, lower, upper, drop };
}

type MleOutcome = { dto: BinomialMleResultDto; profile: ProfileLikelihood | null; drop: number | null };

function fitMle(panel: Panel, level: number): MleOutcome {
  let out;
  try {
    out = binomialMleWithProfile(panel);
  } catch (err) {
    const reason = err instanceof Error ? err.message : String(err);
    return {
      dto: { rho: null, pd: null, status: 'undefined', reason, logLik: null, atBoundary: false, intervals: { profile: null, wald: null, bootstrap: null } },
      profile: null,
      drop: null,
    };
  }
  const r = out.result;
  const dto: BinomialMleResultDto = {
    rho: r.rho,
    pd: r.pd,
    status: r.status,
    ...(r.reason ? { reason: r.reason } : {}),
    logLik: r.logLik,
    atBoundary: r.atBoundary,
    intervals: { profile: null, wald: null, bootstrap: null },
  };
  let drop: number | null = null;
  if (out.profile && r.rho !== null && r.logLik !== null && r.status !== 'undefined') {
    const pi = profileInterval(out.profile, r.rho, r.logLik, level);
    dto.intervals.profile = { level, lower: pi.lower, upper: pi.upper };
    drop = pi.drop;
  }
  return { dto, profile: out.profile, drop };
}

function quietMle(panel: Panel): number | null {
  try {
    const r = binomialMleWithProfile(panel).result;
    return r.status === 'undefined' ? null : r.rho;
  } catch {
    return null;
  }
}

function lag1(xs: number[]): number | null {
  if (xs.length < 4) return null;
  const m = xs.reduce((a, b) => a + b, 0) / xs.length;
  let num = 0;
  let den = 0;
  for (let i = 0; i < xs.length; i++) {
    den += (xs[i] - m) ** 2;
    if (i > 0) num += (xs[i] - m) * (xs[i - 1] - m);
  }
  return den > 0 ? num / den : null;
}

function percentile(sorted: number[], q: number): number {
  const h = (sorted.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.ceil(h);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

function windowFit(label: string, input: SegmentInput, idx: number[], level: number): WindowResult {
  const panel = { obligors: idx.map((i) => input.obligors[i]), defaults: idx.map((i) => input.defaults[i]) };
  const mle = fitMle(panel, level).dto;
  return {
    label,
    periods: idx.map((i) => input.periods[i]),
    T: idx.length,
    binomialMle: {
      rho: mle.rho,
      pd: mle.pd,
      lower: mle.intervals.profile?.lower ?? null,
      upper: mle.intervals.profile?.upper ?? null,
      status: mle.status,
    },
    momentVarianceCorrected: safely(() => momentVarianceCorrected(panel)).rho,
    jointDefault: safely(() => jointDefault(panel)).rho,
  };
}

const AUTOCORRELATION_MATERIAL = 0.3;

/** Fits one segment: the five estimators, intervals, diagnostics, implications, audit, windows. */
export async function fitSegment(input: SegmentInput, options: FitOptions): Promise<SegmentResult> {
  const t0 = performance.now();
  const { level } = options;
  const progress = options.onProgress ?? (async () => undefined);
  const panel: Panel = { obligors: input.obligors, defaults: input.defaults };
  const T = input.periods.length;
  const warnings: Warning[] = [];

  const mle = fitMle(panel, level);
  const estimates = {
    binomialMle: mle.dto,
    vasicekMle: safely(() => vasicekMle(panel)),
    momentVariance: safely(() => momentVariance(panel)),
    momentVarianceCorrected: safely(() => momentVarianceCorrected(panel)),
    jointDefault: safely(() => jointDefault(panel)),
  };
  const rates = input.defaults.map((d, i) => d / input.obligors[i]);
  const zeroDefaultPeriods = input.defaults.filter((d) => d === 0).length;
  const chosen: EstimatorKey =
    estimates.binomialMle.rho !== null ? 'binomialMle' : (ESTIMATOR_ORDER.find((k) => estimates[k].rho !== null) ?? 'binomialMle');

  if (T < 5) warnings.push({ code: 'not-identified-short', message: `Only ${T} periods: with fewer than 5 the correlation is not identified; do not use these numbers.` });
  else if (T < 15) warnings.push({ code: 'short-series', message: `Only ${T} periods: intervals are wide and the estimates are biased low at this length.` });
  if (zeroDefaultPeriods > 0)
    warnings.push({
      code: 'zero-default-periods',
      message: `${zeroDefaultPeriods} of ${T} periods have no default: the closed-form Vasicek estimator is undefined and the moment estimators lose precision.`,
    });
  if (estimates.binomialMle.status === 'undefined') warnings.push({ code: 'mle-undefined', message: estimates.binomialMle.reason ?? 'The likelihood estimate is undefined for these data.' });
  if (mle.dto.atBoundary) warnings.push({ code: 'boundary', message: 'The likelihood is highest at rho = 0: the data show no evidence of correlation, which is not evidence of none. No Wald interval is given at the boundary.' });
  if (mle.dto.status === 'clipped') warnings.push({ code: 'upper-limit', message: 'The likelihood estimate reached the upper search limit: the data cannot pin the correlation down.' });

  // Profile curve, likelihood-ratio test.
  let profileDto: SegmentResult['profile'] = null;
  let lrTest: SegmentResult['diagnostics']['lrTestRhoZero'] = null;
  const rhoHat = mle.dto.rho;
  const pHat = mle.dto.pd;
  if (mle.profile && rhoHat !== null && mle.dto.logLik !== null && mle.drop !== null) {
    const upper = mle.dto.intervals.profile?.upper ?? rhoHat;
    const span = Math.min(RHO_SEARCH_LIMIT, Math.max(0.1, upper * 1.6, rhoHat * 2));
    const points = [];
    for (let i = 0; i <= 60; i++) {
      const rho = (span * i) / 60;
      points.push({ rho, logLik: mle.profile.at(rho).logLik });
    }
    profileDto = { points, cutoff: mle.dto.logLik - mle.drop, maxLogLik: mle.dto.logLik };
    const statistic = Math.max(0, 2 * (mle.dto.logLik - mle.profile.at(0).logLik));
    lrTest = { statistic, pValue: statistic === 0 ? 0.5 : 0.5 * 2 * normalCdf(-Math.sqrt(statistic)) };
    const range = Math.max(...points.map((p) => p.logLik)) - Math.min(...points.map((p) => p.logLik));
    if (range < 0.5) warnings.push({ code: 'flat-profile', message: 'The profile likelihood is nearly flat: the data say little about the correlation.' });
  }

  // Diagnostics at the fitted values.
  let impliedFactor: (number | null)[] | null = null;
  let lag1Autocorrelation: number | null = null;
  let pit: number[] | null = null;
  let bands: SegmentResult['diagnostics']['bands'] = null;
  let exceed95: number | null = null;
  let exceed99: number | null = null;
  let implications: SegmentResult['implications'] = null;
  if (rhoHat !== null && pHat !== null && rhoHat > 0 && rhoHat < 1) {
    impliedFactor = rates.map((dr) => (dr > 0 && dr < 1 ? impliedFactorOf(dr, pHat, rhoHat) : null));
    const defined = impliedFactor.filter((x): x is number => x !== null);
    lag1Autocorrelation = defined.length === T ? lag1(defined) : null;
    if (lag1Autocorrelation !== null && Math.abs(lag1Autocorrelation) > AUTOCORRELATION_MATERIAL)
      warnings.push({
        code: 'autocorrelation',
        message: `The implied factor has lag-1 autocorrelation ${lag1Autocorrelation.toFixed(2)}: periods are not independent, so the intervals are too narrow and rho may be biased.`,
      });
    pit = rates.map((dr) => vasicekCdf(dr, pHat, rhoHat));
    bands = {
      q005: vasicekQuantile(0.005, pHat, rhoHat),
      q025: vasicekQuantile(0.025, pHat, rhoHat),
      q25: vasicekQuantile(0.25, pHat, rhoHat),
      q50: vasicekQuantile(0.5, pHat, rhoHat),
      q75: vasicekQuantile(0.75, pHat, rhoHat),
      q975: vasicekQuantile(0.975, pHat, rhoHat),
      q995: vasicekQuantile(0.995, pHat, rhoHat),
    };
    const q95 = vasicekQuantile(0.95, pHat, rhoHat);
    const q99 = vasicekQuantile(0.99, pHat, rhoHat);
    exceed95 = rates.filter((r) => r > q95).length;
    exceed99 = rates.filter((r) => r > q99).length;
    const corporate = input.assetClass === 'corporate' || input.assetClass === 'sme-corporate';
    const maturity = corporate ? 2.5 : null;
    const lgd = 0.45;
    const iv = mle.dto.intervals.profile;
    const cls = irbClass(input.assetClass);
    const sup =
      cls === null || (cls === 'sme-corporate' && !(input.turnoverEurMillions && input.turnoverEurMillions > 0))
        ? null
        : supervisoryCorrelation(cls, pHat, cls === 'sme-corporate' ? { turnoverMillions: input.turnoverEurMillions! } : {});
    if (cls === 'sme-corporate' && sup === null)
      warnings.push({ code: 'sme-turnover-missing', message: 'The segment is SME corporate but has no turnover recorded, so the supervisory correlation (which depends on it) is not shown.' });
    implications = {
      pd: pHat,
      rho: rhoHat,
      quantile999: vasicekQuantile(0.999, pHat, rhoHat),
      lgd,
      maturityYears: maturity,
      capital: {
        atEstimate: capital(pHat, rhoHat, lgd, maturity),
        atLower: iv ? capital(pHat, iv.lower, lgd, maturity) : null,
        atUpper: iv ? capital(pHat, Math.min(iv.upper, 0.999), lgd, maturity) : null,
      },
      supervisory: sup === null ? null : { assetClass: input.assetClass, rho: sup, capital: capital(pHat, sup, lgd, maturity) },
      pair: { joint: jointDefaultProbability(pHat, pHat, rhoHat), independent: pHat * pHat, defaultCorrelation: defaultCorrelation(pHat, pHat, rhoHat) },
    };
  }

  // Parametric bootstrap at the estimate (same n_t, seeded, percentile interval, bias).
  const bootstrapWork = options.bootstrap?.replications ?? 0;
  const auditWork = options.audit?.replications ?? 0;
  const totalWork = Math.max(1, bootstrapWork + auditWork);
  if (options.bootstrap && rhoHat !== null && pHat !== null && mle.dto.status !== 'undefined') {
    const { replications, seed } = options.bootstrap;
    const rng = createRng(seed);
    const draws: number[] = [];
    let failed = 0;
    for (let b = 0; b < replications; b++) {
      const sim = simulate(input.obligors, pHat, rhoHat, rng);
      const r = quietMle(sim);
      if (r === null) failed++;
      else draws.push(r);
      if (b % 5 === 4 || b === replications - 1) await progress((b + 1) / totalWork, `Bootstrap ${b + 1} of ${replications}`);
    }
    if (draws.length >= 10) {
      draws.sort((a, b) => a - b);
      const alpha = (1 - level) / 2;
      mle.dto.intervals.bootstrap = {
        level,
        lower: percentile(draws, alpha),
        upper: percentile(draws, 1 - alpha),
        bias: draws.reduce((a, b) => a + b, 0) / draws.length - rhoHat,
        replications,
        seed,
        failed,
      };
    } else {
      warnings.push({ code: 'bootstrap-failed', message: `The bootstrap gave a value in only ${draws.length} of ${replications} replications; no bootstrap interval.` });
    }
  }

  // Estimator audit: simulate the user's own n_t and T at the fitted values.
  let audit: SegmentResult['audit'] = null;
  if (options.audit && rhoHat !== null && pHat !== null && mle.dto.status !== 'undefined') {
    const { replications, seed } = options.audit;
    const rng = createRng(seed);
    const truthRho = rhoHat;
    const acc: Record<EstimatorKey, number[]> = { binomialMle: [], vasicekMle: [], momentVariance: [], momentVarianceCorrected: [], jointDefault: [] };
    let covered = 0;
    let withInterval = 0;
    let failed = 0;
    for (let r = 0; r < replications; r++) {
      const sim = simulate(input.obligors, pHat, truthRho, rng);
      const m = fitMle(sim, level);
      if (m.dto.rho === null) failed++;
      else acc.binomialMle.push(m.dto.rho);
      if (m.dto.intervals.profile) {
        withInterval++;
        if (m.dto.intervals.profile.lower <= truthRho && truthRho <= m.dto.intervals.profile.upper) covered++;
      }
      const others = {
        vasicekMle: safely(() => vasicekMle(sim)).rho,
        momentVariance: safely(() => momentVariance(sim)).rho,
        momentVarianceCorrected: safely(() => momentVarianceCorrected(sim)).rho,
        jointDefault: safely(() => jointDefault(sim)).rho,
      };
      for (const [key, v] of Object.entries(others)) if (v !== null) acc[key as EstimatorKey].push(v);
      if (r % 2 === 1 || r === replications - 1) await progress((bootstrapWork + r + 1) / totalWork, `Estimator audit ${r + 1} of ${replications}`);
    }
    const rows: AuditRow[] = ESTIMATOR_ORDER.map((key) => {
      const xs = acc[key];
      if (xs.length === 0) return { estimator: key, defined: 0, bias: null, rmse: null, profileCoverage: null };
      const bias = xs.reduce((a, b) => a + (b - truthRho), 0) / xs.length;
      const rmse = Math.sqrt(xs.reduce((a, b) => a + (b - truthRho) ** 2, 0) / xs.length);
      return { estimator: key, defined: xs.length, bias, rmse, profileCoverage: key === 'binomialMle' && withInterval > 0 ? covered / withInterval : null };
    });
    audit = { replications, seed, truth: { pd: pHat, rho: truthRho }, rows, failed };
  }

  // Window comparison.
  const all = input.periods.map((_, i) => i);
  const windows: WindowResult[] = [windowFit('Whole window', input, all, level)];
  if (T >= 6) {
    let worst = 0;
    for (let i = 1; i < T; i++) if (rates[i] > rates[worst]) worst = i;
    windows.push(windowFit(`Without the worst period (${input.periods[worst]})`, input, all.filter((i) => i !== worst), level));
  }
  if (T > 10) windows.push(windowFit('Last 10 periods', input, all.slice(T - 10), level));
  if (T >= 12) {
    const half = Math.floor(T / 2);
    windows.push(windowFit('First half', input, all.slice(0, half), level));
    windows.push(windowFit('Second half', input, all.slice(half), level));
  }

  return {
    segment: input.segment,
    T,
    periods: input.periods,
    estimates,
    warnings,
    timing: { ms: Math.round((performance.now() - t0) * 10) / 10 },
    chosen,
    assetClass: input.assetClass,
    panel: { obligors: [...input.obligors], defaults: [...input.defaults] },
    profile: profileDto,
    diagnostics: { zeroDefaultPeriods, lrTestRhoZero: lrTest, impliedFactor, lag1Autocorrelation, pit, bands, exceed95, exceed99 },
    implications,
    audit,
    windows,
  };
}
