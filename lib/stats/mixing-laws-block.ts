/**
 * The challenge of the Gaussian copula for one segment, as the fit results carry it: the other
 * mixing laws' estimates, their comparison with the Gaussian law, the likelihood-ratio test with
 * its bootstrap p-value, the power at the segment's own cohort sizes, and the cautions that follow.
 *
 * Two stages, as a segment fit's bootstrap: {@link prepareMixingLaws} fits the laws and describes
 * the replications to run (copulaBootstrapRange and copulaPowerRange over any split, on the worker
 * threads), {@link completeMixingLaws} attaches them (the power study needs the bootstrap's
 * critical value, so its replications are counted only once the bootstrap is done).
 */
import { compareMixingLaws, fittedLaws, type LawComparison, type MixingLaw } from './copula-comparison';
import type { FittedLaw } from './fitted-law';
import { rateLawOf } from './default-rate-law';
import { lawPanelPit } from './law-count-pit';
import {
  COPULA_TEST_LEVEL,
  POWER_ALTERNATIVE_NU,
  summariseCopulaPower,
  summariseCopulaTest,
  type CopulaLrReplication,
  type CopulaPowerSpec,
  type CopulaTestSpec,
} from './copula-lr-test';
import { betaMixingMle, type BetaMixingFit } from './estimators/beta-mixing-mle';
import { logitNormalMle, type LogitNormalFit } from './estimators/logit-normal-mle';
import { tCopulaMle, type TCopulaFit } from './estimators/t-copula-mle';
import { lrTestRhoZero } from './lr-test';
import type { Panel } from './panel';

/** The laws a fit can be asked for beside the Gaussian one (CLI and request names). */
export const MIXING_LAW_MODELS = ['t', 'beta', 'logitNormal'] as const;
export type MixingLawModel = (typeof MIXING_LAW_MODELS)[number];

/** Power below this share: the history cannot tell the laws apart (a caution says so). */
export const LOW_POWER = 0.5;

/** The estimates of the other laws under a segment (`estimates.tCopula` etc.). */
export interface MixingLawEstimates {
  tCopula?: Omit<TCopulaFit, 'inverseNu' | 'gaussianLogLik' | 'nuProfile'> & { nuProfile: TCopulaFit['nuProfile'] };
  betaMixing?: BetaMixingFit;
  logitNormal?: LogitNormalFit;
}

/** `modelComparison` under a segment. */
export interface ModelComparison {
  laws: LawComparison[];
  lrTestGaussianVsT: { statistic: number; pValue: number | null; pValueAsymptotic: number; replications: number; criticalValue: number | null; failed: number } | null;
  power: { replications: number; rejectRate: number; failed: number; nu: number } | null;
  cautions: string[];
}

/** Stage 1's result: the block without the bootstrap and power, and what to simulate for them. */
export interface PreparedMixingLaws {
  estimates: MixingLawEstimates;
  comparison: ModelComparison;
  /** Replications to run under the fitted Gaussian model; null when the test is not possible or not asked for. */
  bootstrap: { spec: CopulaTestSpec; replications: number } | null;
  /** Replications to run under the alternative t law; null when not possible or not asked for. */
  power: { spec: CopulaPowerSpec; replications: number } | null;
}

/** Options of {@link prepareMixingLaws}. */
export interface MixingLawOptions {
  models: readonly MixingLawModel[];
  level?: number;
  /** Bootstrap replications of the LR test (0: none). */
  replications?: number;
  /** Replications of the power study (0: none). */
  powerReplications?: number;
  seed?: number;
}

/**
 * Stage 1: fits the laws asked for (the t copula, beta and logit-normal mixing by maximum likelihood
 * with their profile intervals), compares them with the Gaussian law (binomialMle's maximum, given),
 * gives each compared law its granular probability integral transform (`laws[i].pit`: the mid-PIT
 * of every year, as the Gaussian diagnostics, with a Kolmogorov-Smirnov test on the PIT randomised
 * from `seed` and the tail years; law-count-pit.ts) and computes the LR statistic of the Gaussian
 * against the t copula.
 *
 * The power study's alternative is the fitted t law, or nu = 5 at the Gaussian fit's p and rho when
 * the t fit reaches the Gaussian limit (or rho = 0 and 1/nu = 0 at once).
 *
 * Special cases: a Gaussian fit without a maximum gives an empty comparison and no test; laws that
 * are undefined on these data keep their status and sentence in `estimates` and are left out of the
 * comparison.
 */
export function prepareMixingLaws(
  panel: Panel,
  gaussian: { pd: number | null; rho: number | null; logLik: number | null },
  options: MixingLawOptions,
): PreparedMixingLaws {
  const level = options.level ?? 0.95;
  const seed = options.seed ?? 1;
  const estimates: MixingLawEstimates = {};
  let t: TCopulaFit | null = null;
  let beta: BetaMixingFit | null = null;
  let logit: LogitNormalFit | null = null;
  if (options.models.includes('t')) {
    t = tCopulaMle(panel, { level });
    const { inverseNu: _w, gaussianLogLik: _g, ...rest } = t;
    estimates.tCopula = rest;
  }
  if (options.models.includes('beta')) estimates.betaMixing = beta = betaMixingMle(panel, { level });
  if (options.models.includes('logitNormal')) estimates.logitNormal = logit = logitNormalMle(panel, { level });
  const comparison: ModelComparison = { laws: [], lrTestGaussianVsT: null, power: null, cautions: [] };
  if (gaussian.pd === null || gaussian.rho === null || gaussian.logLik === null) return { estimates, comparison, bootstrap: null, power: null };
  const fitted = fittedLaws(gaussian, t, beta, logit);
  comparison.laws = compareMixingLaws(fitted, panel.obligors.length).map((row, i) => ({ ...row, ...lawPit(fitted[i], panel, seed) }));
  let bootstrap: PreparedMixingLaws['bootstrap'] = null;
  let power: PreparedMixingLaws['power'] = null;
  if (t && t.logLik !== null && t.gaussianLogLik !== null && t.status !== 'not-converged') {
    const statistic = Math.max(0, 2 * (t.logLik - t.gaussianLogLik));
    // 0.5 P(chi2_1 >= s), 1 at s = 0 (Self & Liang 1987)
    const asymptotic = lrTestRhoZero(statistic / 2, 0).pValue;
    comparison.lrTestGaussianVsT = { statistic, pValue: null, pValueAsymptotic: asymptotic, replications: 0, criticalValue: null, failed: 0 };
    const B = options.replications ?? 0;
    if (B > 0) bootstrap = { spec: { obligors: panel.obligors.slice(), pd: gaussian.pd, rho: gaussian.rho, seed }, replications: B };
    const R = options.powerReplications ?? 0;
    if (B > 0 && R > 0) {
      const gaussianLimit = t.nu === null || t.pd === null || t.rho === null;
      const alt = gaussianLimit ? { pd: gaussian.pd, rho: gaussian.rho, nu: POWER_ALTERNATIVE_NU } : { pd: t.pd!, rho: t.rho!, nu: t.nu! };
      power = { spec: { obligors: panel.obligors.slice(), seed, ...alt }, replications: R };
    }
  }
  return { estimates, comparison, bootstrap, power };
}

/**
 * The granular probability integral transform of a fitted law on the panel (lawPanelPit: the
 * mid-PIT, and the Kolmogorov-Smirnov test on the PIT randomised from `seed`, the same draws for
 * every law), or why it could not be computed.
 */
function lawPit(law: FittedLaw, panel: Panel, seed: number): Pick<LawComparison, 'pit' | 'pitNote'> {
  try {
    return { pit: lawPanelPit(rateLawOf(law), panel, seed) };
  } catch (err) {
    const why = err instanceof Error ? err.message : String(err);
    return { pit: null, pitNote: `The probability integral transform under ${LAW_NAMES[law.law]} could not be computed: ${why}` };
  }
}

/**
 * Stage 2: attaches the merged bootstrap and power replications and writes the cautions.
 *
 * Cautions (DESIGN.md, "Cautions"): where another law fits materially better (bootstrap p under 5%
 * for the t copula, or an AIC lower than the Gaussian's by more than 2 for beta or logit-normal
 * mixing), the Gaussian value carries a sentence stating how its 99.9% quantile and joint default
 * probability differ from that law's, in whichever direction the numbers go; where the power is
 * under 50%, a sentence that the history cannot distinguish the laws, so the Gaussian choice is a
 * convention, not a finding.
 */
export function completeMixingLaws(
  prepared: PreparedMixingLaws,
  bootstrap: readonly CopulaLrReplication[] | null,
  power: readonly CopulaLrReplication[] | null,
): { estimates: MixingLawEstimates; modelComparison: ModelComparison } {
  const comparison: ModelComparison = { ...prepared.comparison, cautions: [] };
  const test = comparison.lrTestGaussianVsT;
  if (test && bootstrap && bootstrap.length > 0) {
    const s = summariseCopulaTest(test.statistic, bootstrap);
    comparison.lrTestGaussianVsT = { ...test, pValue: s.pValue, replications: s.replications, criticalValue: s.criticalValue, failed: s.failed };
    if (power && power.length > 0 && prepared.power) {
      const pw = summariseCopulaPower(s.criticalValue, power);
      comparison.power = { ...pw, nu: prepared.power.spec.nu };
    }
  }
  comparison.cautions = mixingLawCautions(comparison);
  return { estimates: prepared.estimates, modelComparison: comparison };
}

const pct = (x: number) => `${(100 * x).toPrecision(3)}%`;
const LAW_NAMES: Readonly<Record<MixingLaw, string>> = { gaussian: 'the Gaussian copula', t: 'the t copula', beta: 'beta mixing', logitNormal: 'logit-normal mixing' };

/** The cautions of {@link completeMixingLaws} from a comparison. */
export function mixingLawCautions(comparison: ModelComparison): string[] {
  const out: string[] = [];
  const g = comparison.laws.find((l) => l.law === 'gaussian');
  if (!g) return out;
  const better: LawComparison[] = [];
  const test = comparison.lrTestGaussianVsT;
  const t = comparison.laws.find((l) => l.law === 't');
  if (t && test && test.pValue !== null && test.pValue < COPULA_TEST_LEVEL) better.push(t);
  for (const l of comparison.laws) if ((l.law === 'beta' || l.law === 'logitNormal') && l.aic < g.aic - 2) better.push(l);
  for (const l of better) {
    const q = g.quantile999 / l.quantile999;
    const j = g.jointDefault / l.jointDefault;
    const ratio = (r: number) => (r >= 1 ? `${r.toFixed(2)} times as high` : `${(1 / r).toFixed(2)} times lower`);
    const name = LAW_NAMES[l.law];
    out.push(
      `${name[0].toUpperCase()}${name.slice(1)} fits these data materially better than the Gaussian copula${l.law === 't' ? ` (bootstrap p = ${test!.pValue!.toFixed(3)})` : ' (AIC lower by more than 2)'}: under the Gaussian value the 99.9% default-rate quantile is ${pct(g.quantile999)} against ${pct(l.quantile999)} (${ratio(q)}), and the joint default probability of two obligors ${g.jointDefault.toExponential(3)} against ${l.jointDefault.toExponential(3)} (${ratio(j)}).`,
    );
  }
  if (comparison.power && comparison.power.rejectRate < LOW_POWER) {
    out.push(
      `At these cohort sizes and years the test would detect a t copula with nu = ${comparison.power.nu.toPrecision(3)} only ${pct(comparison.power.rejectRate)} of the time: this history cannot distinguish the laws, so the Gaussian choice is a convention, not a finding.`,
    );
  }
  return out;
}
