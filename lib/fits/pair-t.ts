/**
 * The pair explorer's Student-t copula: two obligors whose latent pair is standard bivariate t with
 * correlation rho and nu degrees of freedom; obligor i defaults when its latent value falls below
 * k_i = t_nu^-1(p_i), so each keeps its PD and only the joint behaviour changes.
 *
 *   joint default probability   P(both) = P(T1 <= k1, T2 <= k2)          (bivariateTJointDefault)
 *   default (indicator) corr.   (P(both) - p1 p2) / sqrt(p1 (1 - p1) p2 (1 - p2))
 *   lower tail dependence       2 t_{nu+1}(-sqrt((nu + 1)(1 - rho) / (1 + rho)))  (0 for the Gaussian)
 *
 * beside the Gaussian copula at the same p1, p2 and rho (pairMetrics) and the ratio of the two
 * joint probabilities. Pure: used in the browser by the Pair explorer.
 */
import { tCopulaTailDependence, bivariateTJointDefault } from '@/lib/stats/t-copula-tail';
import { tQuantile } from '@/lib/stats/t-copula-likelihood';
import { pairInputProblem, pairMetrics, readPlainNumber, type PairMetrics } from './pair';

/** The explorer's range of nu: above 2 (a finite variance, as the engine's fit requires) and at most 1000 (beyond, the t copula is the Gaussian one to the digits shown). */
export const PAIR_NU_LIMITS = { nuMin: 2, nuMax: 1000 } as const;

/**
 * The pair's figures under the t copula: the Gaussian ones' fields (PairMetrics), with k_i the
 * latent t values' default thresholds t_nu^-1(p_i) and joint the probability that both default
 * under the t copula; and what only the t copula has.
 */
export type PairTMetrics = PairMetrics & {
  nu: number;
  /** Lower tail-dependence coefficient of the latent pair. */
  tailDependence: number;
  /** The Gaussian copula at the same p1, p2 and rho. */
  gaussian: PairMetrics;
  /** joint / gaussian.joint. */
  ratioToGaussian: number;
};

/** Returns a sentence naming what is wrong with nu, or null when it is usable. */
export function pairNuProblem(nu: number): string | null {
  if (!Number.isFinite(nu)) return 'The degrees of freedom ν must be a number.';
  if (!(nu > PAIR_NU_LIMITS.nuMin)) return `The degrees of freedom ν must be above ${PAIR_NU_LIMITS.nuMin} (the t copula's fits need a finite variance), for example 4.`;
  if (nu > PAIR_NU_LIMITS.nuMax)
    return `A ν above ${PAIR_NU_LIMITS.nuMax} is the Gaussian copula to the digits shown: choose the Gaussian copula, or a ν of at most ${PAIR_NU_LIMITS.nuMax}.`;
  return null;
}

/**
 * Joint default probability, default correlation and tail dependence of two obligors under the
 * t copula, with the Gaussian copula's figures at the same inputs. Throws RangeError with the
 * sentence of pairInputProblem / pairNuProblem when an input is outside the explorer's range.
 *
 * @example pairTMetrics(0.01, 0.01, 0.3, 4).joint // ≈ 0.0019110276 (SciPy 1.17, make_pair_t.py)
 */
export function pairTMetrics(p1: number, p2: number, rho: number, nu: number): PairTMetrics {
  const problem = pairInputProblem(p1, p2, rho) ?? pairNuProblem(nu);
  if (problem) throw new RangeError(problem);
  const gaussian = pairMetrics(p1, p2, rho);
  const joint = bivariateTJointDefault(p1, p2, rho, nu);
  const independent = p1 * p2;
  return {
    p1,
    p2,
    rho,
    nu,
    k1: tQuantile(p1, nu),
    k2: tQuantile(p2, nu),
    joint,
    independent,
    defaultCorrelation: (joint - independent) / Math.sqrt(p1 * (1 - p1) * p2 * (1 - p2)),
    secondGivenFirst: joint / p1,
    tailDependence: tCopulaTailDependence(rho, nu),
    gaussian,
    ratioToGaussian: joint / gaussian.joint,
  };
}

/**
 * Reads the degrees of freedom as typed, by the explorer's rules (one plain number, a decimal
 * comma refused with a sentence, the range of PAIR_NU_LIMITS): the value, or the sentence for the field.
 */
export function readPairNu(text: string): { problem: string; value: null } | { problem: null; value: number } {
  const r = readPlainNumber(text, 'the degrees of freedom ν', '4', false);
  if (r.problem !== null) return { problem: r.problem, value: null };
  const problem = pairNuProblem(r.value);
  return problem ? { problem, value: null } : { problem: null, value: r.value };
}

/** The part of a segment's stored `estimates.tCopula` (the engine's JSON) that a start reads. */
export type StoredTCopula = { rho: number | null; pd: number | null; nu: number | null; status: string; reason?: string };

/**
 * What the explorer can start from a fitted segment's t copula: its rho, nu and PD (`start`); the
 * Gaussian limit (`gaussian-limit`: nu = infinity, stored as null, or beyond the explorer's largest
 * nu, where the two copulas agree to the digits shown), so the explorer keeps the Gaussian copula;
 * or no usable estimate (`none`, with the engine's reason or a sentence). Null when the fit ran no t copula.
 */
export function pairTStartOf(
  t: StoredTCopula | undefined,
): { kind: 'start'; pd: number; rho: number; nu: number } | { kind: 'gaussian-limit'; pd: number; rho: number } | { kind: 'none'; reason: string } | null {
  if (t === undefined) return null;
  if (!(t.status === 'ok' || t.status === 'clipped') || t.rho === null || t.pd === null) return { kind: 'none', reason: t.reason ?? `the estimate's status is ${t.status}.` };
  const inputs = pairInputProblem(t.pd, t.pd, t.rho);
  if (inputs !== null) return { kind: 'none', reason: inputs };
  if (t.nu === null || !Number.isFinite(t.nu) || t.nu > PAIR_NU_LIMITS.nuMax) return { kind: 'gaussian-limit', pd: t.pd, rho: t.rho };
  const nuProblem = pairNuProblem(t.nu);
  return nuProblem !== null ? { kind: 'none', reason: nuProblem } : { kind: 'start', pd: t.pd, rho: t.rho, nu: t.nu };
}
