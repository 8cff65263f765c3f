/**
 * What an asset correlation means for two obligors under the Gaussian one-factor (copula) model
 * (DESIGN.md, "The model"): obligor i defaults when its standard normal asset value falls below
 * k_i = Phi^-1(p_i); the two asset values are standard bivariate normal with correlation rho.
 *
 *   joint default probability   P(both) = Phi2(k1, k2; rho)
 *   default (indicator) corr.   (Phi2 - p1 p2) / sqrt(p1 (1 - p1) p2 (1 - p2))
 *
 * The excess Phi2 - p1 p2 is taken from bivariateNormalExcess (Plackett's identity) rather than by
 * subtraction, so the default correlation keeps its digits at small PDs and small rho.
 *
 * Pure: used in the browser by the Pair explorer and on the server by the review screen.
 */
import { bivariateNormalExcess } from '@/lib/stats/bivariate-normal';
import { normalQuantile } from '@/lib/stats/normal';

export type PairMetrics = {
  p1: number;
  p2: number;
  rho: number;
  /** Normal deviates (default thresholds) k_i = Phi^-1(p_i). */
  k1: number;
  k2: number;
  /** P(both default) under the Gaussian copula. */
  joint: number;
  /** p1 * p2: the joint probability if the two were independent. */
  independent: number;
  /** Default (indicator) correlation. */
  defaultCorrelation: number;
  /** P(obligor 2 defaults | obligor 1 defaults) = joint / p1. */
  secondGivenFirst: number;
};

/** Limits of the explorer's inputs: PDs strictly inside (0, 1), rho in [0, 0.999]. */
export const PAIR_LIMITS = { pdMin: 1e-6, pdMax: 0.999, rhoMin: 0, rhoMax: 0.999 } as const;

/** Returns a sentence naming what is wrong with the inputs, or null when they are usable. */
export function pairInputProblem(p1: number, p2: number, rho: number): string | null {
  for (const [name, p] of [
    ['PD of obligor A', p1],
    ['PD of obligor B', p2],
  ] as const) {
    if (!Number.isFinite(p)) return `${name} must be a number.`;
    if (p < PAIR_LIMITS.pdMin || p > PAIR_LIMITS.pdMax) return `${name} must lie between 0.0001% and 99.9%.`;
  }
  if (!Number.isFinite(rho)) return 'The asset correlation must be a number.';
  if (rho < PAIR_LIMITS.rhoMin || rho > PAIR_LIMITS.rhoMax) return 'The asset correlation must lie between 0 and 0.999.';
  return null;
}

/**
 * Joint default probability, independent product and default correlation of two obligors.
 * Throws RangeError (from lib/stats) when an input is outside its domain; check pairInputProblem
 * first to get a sentence for the user.
 *
 * @example pairMetrics(0.05, 0.05, 0.3).joint // ≈ 0.0071346 (SciPy 1.17, common practice)
 */
export function pairMetrics(p1: number, p2: number, rho: number): PairMetrics {
  const problem = pairInputProblem(p1, p2, rho);
  if (problem) throw new RangeError(problem);
  const k1 = normalQuantile(p1);
  const k2 = normalQuantile(p2);
  const independent = p1 * p2;
  const excess = rho === 0 ? 0 : bivariateNormalExcess(k1, k2, rho);
  // Phi2 = p1 p2 + excess: the sum keeps relative accuracy where Phi2 is tiny.
  const joint = independent + excess;
  return {
    p1,
    p2,
    rho,
    k1,
    k2,
    joint,
    independent,
    defaultCorrelation: excess / Math.sqrt(p1 * (1 - p1) * p2 * (1 - p2)),
    secondGivenFirst: joint / p1,
  };
}

/**
 * Density contour of the standard bivariate normal with correlation rho that encloses probability
 * q: the ellipse x^2 - 2 rho x y + y^2 = c^2 (1 - rho^2) with c^2 = -2 ln(1 - q) (the squared
 * Mahalanobis distance is chi-square with 2 degrees of freedom). In coordinates turned by 45
 * degrees it has semi-axes c sqrt(1 + rho) along the diagonal and c sqrt(1 - rho) across it.
 */
export function densityContour(rho: number, q: number): { alongDiagonal: number; acrossDiagonal: number } {
  if (!(q > 0 && q < 1)) throw new RangeError('densityContour: the enclosed probability must lie in (0, 1).');
  if (!(rho > -1 && rho < 1)) throw new RangeError('densityContour: rho must lie in (-1, 1).');
  const c = Math.sqrt(-2 * Math.log(1 - q));
  return { alongDiagonal: c * Math.sqrt(1 + rho), acrossDiagonal: c * Math.sqrt(1 - rho) };
}

/** The explorer's three inputs, as typed. */
export type PairInputText = { pdA: string; pdB: string; rho: string };

/**
 * Reads one of the explorer's fields as one plain number (a trailing % is allowed unless `allowPercent` is false). A decimal comma
 * is refused with a sentence rather than guessed at ("5,5" may be 5.5 or fifty-five), and so is
 * anything that is not one plain number; `what` names the field in the sentence.
 */
export function readPlainNumber(
  raw: string,
  what: string,
  example: string,
  allowPercent = true,
): { problem: string; value: null } | { problem: null; value: number } {
  const t = allowPercent ? raw.trim().replace(/%$/, '').trim() : raw.trim();
  if (t === '') return { problem: `Give ${what}, for example ${example}.`, value: null };
  if (/^[+-]?\d*,\d+$/.test(t)) return { problem: `Write the decimal with a point (${t.replace(',', '.')}), not a comma.`, value: null };
  if (!/^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i.test(t)) return { problem: `${what[0].toUpperCase()}${what.slice(1)} must be one number, for example ${example}.`, value: null };
  return { problem: null, value: Number(t) };
}

/**
 * Reads the explorer's inputs: PDs in percent, the correlation as a plain number. A decimal comma
 * is refused with a sentence rather than guessed at ("5,5" may be 5.5 or fifty-five), and so is
 * anything that is not one plain number; each field gets its own sentence. `values` is set only
 * when all three are usable, so nothing is ever computed from a field that has an error.
 */
export function readPairInputs(text: PairInputText): { problems: Partial<Record<keyof PairInputText, string>>; values: { p1: number; p2: number; rho: number } | null } {
  const problems: Partial<Record<keyof PairInputText, string>> = {};
  const read = (key: keyof PairInputText, what: string, example: string): number => {
    const r = readPlainNumber(text[key], what, example);
    if (r.problem !== null) {
      problems[key] = r.problem;
      return Number.NaN;
    }
    return r.value;
  };
  const pdA = read('pdA', 'the PD of obligor A in percent', '1.5');
  const pdB = read('pdB', 'the PD of obligor B in percent', '1.5');
  const rho = read('rho', 'the asset correlation', '0.12');
  if (problems.pdA === undefined && (pdA / 100 < PAIR_LIMITS.pdMin || pdA / 100 > PAIR_LIMITS.pdMax)) problems.pdA = 'The PD of obligor A must lie between 0.0001% and 99.9%.';
  if (problems.pdB === undefined && (pdB / 100 < PAIR_LIMITS.pdMin || pdB / 100 > PAIR_LIMITS.pdMax)) problems.pdB = 'The PD of obligor B must lie between 0.0001% and 99.9%.';
  if (problems.rho === undefined && (rho < PAIR_LIMITS.rhoMin || rho > PAIR_LIMITS.rhoMax)) problems.rho = 'The asset correlation must lie between 0 and 0.999.';
  const ok = Object.keys(problems).length === 0;
  return { problems, values: ok ? { p1: pdA / 100, p2: pdB / 100, rho } : null };
}
