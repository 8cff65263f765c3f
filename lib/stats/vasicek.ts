/**
 * The Vasicek one-factor (Gaussian copula) default model with probability of default p and asset
 * correlation rho: conditional PD, the default-rate distribution of an infinitely granular pool,
 * and the joint default probability and default correlation of two obligors.
 *
 * Obligor i defaults in a period when sqrt(rho) X + sqrt(1 - rho) e_i < k = Phi^-1(p), with X and
 * e_i independent standard normals.
 *
 * Conventions at the edges (decided here once, used everywhere):
 * - p must lie in [0, 1] and rho in [0, 1]; anything else (or NaN) throws RangeError.
 * - p = 0 (k = -Infinity): nobody defaults; the default rate is degenerate at 0.
 *   p = 1 (k = Infinity): everybody defaults; degenerate at 1.
 * - rho = 0: defaults are independent, the conditional PD is p whatever the factor, and the
 *   default-rate distribution is degenerate at p.
 * - rho = 1: the factor decides everything; the conditional PD is 1 for x < k, 0 for x > k and
 *   1/2 at x = k (the limit as rho -> 1), and the default rate is 0 with probability 1 - p and 1
 *   with probability p.
 * Functions without a meaningful value at an edge (a density of a degenerate law, a correlation of
 * a constant) throw RangeError saying so.
 *
 * References: Vasicek, O. A. (1987), "Probability of loss on loan portfolio", KMV Corporation;
 * Vasicek, O. A. (2002), "The distribution of loan portfolio value", Risk 15(12):160-162;
 * Gordy, M. B. (2003), "A risk-factor model foundation for ratings-based bank capital rules",
 * Journal of Financial Intermediation 12:199-232.
 */
import { bivariateNormalExcess } from './bivariate-normal';
import { normalCdf, normalLogCdf, normalQuantile } from './normal';

function assertP(fn: string, p: number, name = 'p'): void {
  if (typeof p !== 'number' || Number.isNaN(p) || p < 0 || p > 1) {
    throw new RangeError(`${fn}: ${name} (a probability of default) must be in [0, 1], got ${String(p)}.`);
  }
}

function assertRho(fn: string, rho: number): void {
  if (typeof rho !== 'number' || Number.isNaN(rho) || rho < 0 || rho > 1) {
    throw new RangeError(`${fn}: rho (the asset correlation) must be in [0, 1], got ${String(rho)}.`);
  }
}

function assertUnit(fn: string, x: number, name: string): void {
  if (typeof x !== 'number' || Number.isNaN(x) || x < 0 || x > 1) {
    throw new RangeError(`${fn}: ${name} must be in [0, 1], got ${String(x)}.`);
  }
}

/** Argument z of the conditional PD Phi(z), z = (k - sqrt(rho) x) / sqrt(1 - rho), for rho < 1. */
function conditionalArgument(p: number, rho: number, x: number): number {
  const k = normalQuantile(p);
  if (rho === 0) return k;
  return (k - Math.sqrt(rho) * x) / Math.sqrt(1 - rho);
}

function assertFactor(fn: string, x: number): void {
  if (typeof x !== 'number' || Number.isNaN(x)) {
    throw new RangeError(`${fn}: the factor value x must be a number, got ${String(x)}.`);
  }
}

/**
 * Probability of default conditional on the systematic factor X = x.
 *
 * P(x) = Phi((Phi^-1(p) - sqrt(rho) x) / sqrt(1 - rho))
 *
 * Method: direct evaluation with the accurate normalCdf and normalQuantile (relative accuracy
 * ~1e-15 times the conditioning, also for conditional PDs of 1e-300).
 *
 * Special cases: rho = 0 -> p; rho = 1 -> 1 if x < k, 0 if x > k, 1/2 if x = k; p = 0 -> 0;
 * p = 1 -> 1; x = -Infinity -> 1 and x = Infinity -> 0 when 0 < rho and 0 < p < 1.
 *
 * @example conditionalPd(0.01, 0.12, -3.090232306167813) // the 0.1% factor: 0.0903258313...
 *
 * Reference: Vasicek (2002), eq. (1); Gordy (2003), section 3.
 */
export function conditionalPd(p: number, rho: number, x: number): number {
  assertP('conditionalPd', p);
  assertRho('conditionalPd', rho);
  assertFactor('conditionalPd', x);
  if (p === 0 || p === 1 || rho === 0) return p;
  if (rho === 1) {
    const k = normalQuantile(p);
    return x < k ? 1 : x > k ? 0 : 0.5;
  }
  return normalCdf(conditionalArgument(p, rho, x));
}

/**
 * Logarithms of the conditional PD and of its complement, { logPd: log P(x), log1mPd: log(1 - P(x)) },
 * both accurate where P(x) underflows or rounds to 1 (for the binomial likelihood in a factor
 * integral).
 *
 * log P(x) = log Phi(z), log(1 - P(x)) = log Phi(-z), z = (Phi^-1(p) - sqrt(rho) x) / sqrt(1 - rho)
 *
 * Special cases: as conditionalPd; a probability of 0 gives -Infinity.
 *
 * @example conditionalLogPd(0.01, 0.12, 40).logPd // -152.5664621989... (P(x) = 5.5e-67)
 *
 * Reference: Vasicek (2002), eq. (1).
 */
export function conditionalLogPd(
  p: number,
  rho: number,
  x: number,
): { logPd: number; log1mPd: number } {
  assertP('conditionalLogPd', p);
  assertRho('conditionalLogPd', rho);
  assertFactor('conditionalLogPd', x);
  if (p === 0) return { logPd: -Infinity, log1mPd: 0 };
  if (p === 1) return { logPd: 0, log1mPd: -Infinity };
  if (rho === 0) return { logPd: Math.log(p), log1mPd: Math.log1p(-p) };
  if (rho === 1) {
    const c = conditionalPd(p, rho, x);
    return { logPd: Math.log(c), log1mPd: Math.log(1 - c) };
  }
  const z = conditionalArgument(p, rho, x);
  return { logPd: normalLogCdf(z), log1mPd: normalLogCdf(-z) };
}

/**
 * CDF of the Vasicek default-rate distribution (the limiting default rate of an infinitely
 * granular pool).
 *
 * F(x) = Phi((sqrt(1 - rho) Phi^-1(x) - Phi^-1(p)) / sqrt(rho)),  0 <= x <= 1
 *
 * Special cases: rho = 0 -> step at p (F = 1 for x >= p, else 0); rho = 1 -> 1 - p for
 * 0 <= x < 1 and 1 at x = 1; p = 0 -> 1; p = 1 -> 0 for x < 1 and 1 at x = 1. x outside [0, 1]
 * throws RangeError (a default rate is a fraction).
 *
 * @example vasicekCdf(0.0903258313, 0.01, 0.12) // ~0.999
 *
 * Reference: Vasicek (2002), eq. (4).
 */
export function vasicekCdf(x: number, p: number, rho: number): number {
  assertUnit('vasicekCdf', x, 'the default rate x');
  assertP('vasicekCdf', p);
  assertRho('vasicekCdf', rho);
  if (x === 1) return 1;
  if (p === 0) return 1;
  if (p === 1) return 0;
  if (rho === 0) return x >= p ? 1 : 0;
  if (rho === 1) return 1 - p;
  if (x === 0) return 0;
  const k = normalQuantile(p);
  return normalCdf((Math.sqrt(1 - rho) * normalQuantile(x) - k) / Math.sqrt(rho));
}

/**
 * Natural logarithm of the Vasicek default-rate density.
 *
 * log f(x) = (1/2) log((1 - rho) / rho) + y^2 / 2 - (sqrt(1 - rho) y - k)^2 / (2 rho),
 * y = Phi^-1(x), k = Phi^-1(p)
 *
 * Special cases: defined for 0 < p < 1 and 0 < rho < 1 (otherwise the law has no density:
 * RangeError). At x = 0 or 1 the value is the limit: -Infinity when rho < 1/2, Infinity when
 * rho > 1/2; at rho = 1/2 it is the limit of the exponent's linear term.
 *
 * @example vasicekLogPdf(0.01, 0.01, 0.12)
 *
 * Reference: Vasicek (2002), eq. (5).
 */
export function vasicekLogPdf(x: number, p: number, rho: number): number {
  assertUnit('vasicekLogPdf', x, 'the default rate x');
  assertP('vasicekLogPdf', p);
  assertRho('vasicekLogPdf', rho);
  if (p === 0 || p === 1 || rho === 0 || rho === 1) {
    throw new RangeError(
      `vasicekLogPdf: the default-rate distribution has no density at p = ${p}, rho = ${rho} (it is degenerate or two-point); use vasicekCdf.`,
    );
  }
  const k = normalQuantile(p);
  if (x === 0 || x === 1) {
    if (rho < 0.5) return -Infinity;
    if (rho > 0.5) return Infinity;
    // rho = 1/2: exponent = y^2/2 - (y/sqrt2 - k)^2 = sqrt2 k y - k^2, y -> -+Infinity
    const sign = x === 0 ? -k : k;
    return sign > 0 ? Infinity : sign < 0 ? -Infinity : 0;
  }
  const y = normalQuantile(x);
  const t = Math.sqrt(1 - rho) * y - k;
  return 0.5 * Math.log((1 - rho) / rho) + (y / 2) * y - (t * t) / (2 * rho);
}

/**
 * Density of the Vasicek default-rate distribution, f(x) = exp(vasicekLogPdf(x, p, rho)).
 *
 * f(x) = sqrt((1 - rho) / rho) exp(y^2 / 2 - (sqrt(1 - rho) y - k)^2 / (2 rho)), y = Phi^-1(x)
 *
 * Special cases: as vasicekLogPdf.
 *
 * @example vasicekPdf(0.01, 0.01, 0.12)
 *
 * Reference: Vasicek (2002), eq. (5).
 */
export function vasicekPdf(x: number, p: number, rho: number): number {
  return Math.exp(vasicekLogPdf(x, p, rho));
}

/**
 * Quantile of the Vasicek default-rate distribution (the default rate not exceeded with
 * probability q; at q = 0.999 the Basel IRB "worst-case" default rate).
 *
 * F^-1(q) = Phi((Phi^-1(p) + sqrt(rho) Phi^-1(q)) / sqrt(1 - rho))
 *
 * Special cases: rho = 0 -> p; rho = 1 -> 0 for q <= 1 - p, else 1; p = 0 -> 0; p = 1 -> 1;
 * q = 0 -> 0 and q = 1 -> 1 when 0 < rho < 1. q outside [0, 1] throws RangeError.
 *
 * @example vasicekQuantile(0.999, 0.01, 0.12) // 0.0903258313 (computed with SciPy 1.17)
 *
 * Reference: Vasicek (2002), eq. (6); BCBS (2005), An Explanatory Note on the Basel II IRB Risk
 * Weight Functions, section 4.
 */
export function vasicekQuantile(q: number, p: number, rho: number): number {
  assertUnit('vasicekQuantile', q, 'the probability level q');
  assertP('vasicekQuantile', p);
  assertRho('vasicekQuantile', rho);
  if (p === 0 || p === 1) return p;
  if (rho === 0) return p;
  if (rho === 1) return q <= 1 - p ? 0 : 1;
  const k = normalQuantile(p);
  return normalCdf((k + Math.sqrt(rho) * normalQuantile(q)) / Math.sqrt(1 - rho));
}

/**
 * Mean of the Vasicek default-rate distribution: E[P(X)] = p, for any rho.
 *
 * @example vasicekMean(0.01, 0.12) // 0.01
 *
 * Reference: Vasicek (2002), eq. (7).
 */
export function vasicekMean(p: number, rho: number): number {
  assertP('vasicekMean', p);
  assertRho('vasicekMean', rho);
  return p;
}

/**
 * Variance of the Vasicek default-rate distribution.
 *
 * Var[P(X)] = Phi2(k, k; rho) - p^2,  k = Phi^-1(p)
 *
 * Method: bivariateNormalExcess(k, k, rho), so the variance keeps full relative accuracy at small p
 * and small rho (no subtraction of p^2).
 *
 * Special cases: rho = 0 -> 0; rho = 1 -> p (1 - p); p = 0 or 1 -> 0.
 *
 * @example vasicekVariance(0.01, 0.12) // 1.1709607969e-4 (computed with SciPy 1.17)
 *
 * Reference: Vasicek (2002), eq. (8).
 */
export function vasicekVariance(p: number, rho: number): number {
  assertP('vasicekVariance', p);
  assertRho('vasicekVariance', rho);
  if (p === 0 || p === 1 || rho === 0) return 0;
  const k = normalQuantile(p);
  return bivariateNormalExcess(k, k, rho);
}

/**
 * Joint default probability of two obligors with PDs p1 and p2 whose assets have correlation rho.
 *
 * P(both default) = Phi2(Phi^-1(p1), Phi^-1(p2); rho)
 *
 * Method: p1 p2 + bivariateNormalExcess(k1, k2, rho) (both terms positive, so full relative
 * accuracy at small PDs).
 *
 * Special cases: rho = 0 -> p1 p2; rho = 1 -> min(p1, p2); p1 or p2 = 0 -> 0; p1 = 1 -> p2.
 *
 * @example jointDefaultProbability(0.05, 0.05, 0.3) // 0.0071346 (computed with SciPy 1.17)
 *
 * Reference: Gordy (2000), "A comparative anatomy of credit risk models", Journal of Banking &
 * Finance 24:119-149, section 3; Vasicek (1987).
 */
export function jointDefaultProbability(p1: number, p2: number, rho: number): number {
  assertP('jointDefaultProbability', p1, 'p1');
  assertP('jointDefaultProbability', p2, 'p2');
  assertRho('jointDefaultProbability', rho);
  if (p1 === 0 || p2 === 0) return 0;
  if (p1 === 1) return p2;
  if (p2 === 1) return p1;
  if (rho === 1) return Math.min(p1, p2);
  const k1 = normalQuantile(p1);
  const k2 = normalQuantile(p2);
  const v = p1 * p2 + bivariateNormalExcess(k1, k2, rho);
  return Math.min(v, p1, p2);
}

/**
 * Default (indicator) correlation of two obligors: the Pearson correlation of their default
 * indicators.
 *
 * corr = (Phi2(k1, k2; rho) - p1 p2) / sqrt(p1 (1 - p1) p2 (1 - p2))
 *
 * Method: the numerator is bivariateNormalExcess (no cancellation), so small default correlations
 * keep their digits.
 *
 * Special cases: rho = 0 -> 0; p1 = p2 and rho = 1 -> 1. A PD of 0 or 1 makes an indicator
 * constant and its correlation undefined: RangeError.
 *
 * @example defaultCorrelation(0.01, 0.01, 0.12) // 0.01182789 (computed with SciPy 1.17)
 *
 * Reference: Gordy (2000), eq. (8); de Servigny, A. & Renault, O. (2002), "Default correlation:
 * empirical evidence", Standard & Poor's working paper, eq. (1).
 */
export function defaultCorrelation(p1: number, p2: number, rho: number): number {
  assertP('defaultCorrelation', p1, 'p1');
  assertP('defaultCorrelation', p2, 'p2');
  assertRho('defaultCorrelation', rho);
  if (p1 === 0 || p1 === 1 || p2 === 0 || p2 === 1) {
    throw new RangeError(
      `defaultCorrelation: PDs of 0 or 1 make a default indicator constant, so its correlation is undefined (got p1 = ${p1}, p2 = ${p2}).`,
    );
  }
  const k1 = normalQuantile(p1);
  const k2 = normalQuantile(p2);
  const excess =
    rho === 1 ? Math.min(p1, p2) - p1 * p2 : bivariateNormalExcess(k1, k2, rho);
  return excess / Math.sqrt(p1 * (1 - p1) * p2 * (1 - p2));
}

/**
 * The systematic factor value implied by an observed default rate: the x at which the
 * conditional PD equals DR (inverse of conditionalPd in x).
 *
 * x = (Phi^-1(p) - sqrt(1 - rho) Phi^-1(DR)) / sqrt(rho)
 *
 * Special cases: needs 0 < rho <= 1 (at rho = 0 the default rate does not depend on the factor)
 * and 0 < p < 1; a default rate of exactly 0 or 1 implies x = +-Infinity, which is not a usable
 * factor value: all of these throw RangeError naming the problem.
 *
 * @example impliedFactor(0.0903258313, 0.01, 0.12) // ~ -3.0902 (the 0.1% factor)
 *
 * Reference: Vasicek (2002), eq. (1) solved for x.
 */
export function impliedFactor(dr: number, p: number, rho: number): number {
  assertUnit('impliedFactor', dr, 'the default rate');
  assertP('impliedFactor', p);
  assertRho('impliedFactor', rho);
  if (rho === 0) {
    throw new RangeError('impliedFactor: at rho = 0 the default rate carries no information on the factor.');
  }
  if (p === 0 || p === 1) {
    throw new RangeError(`impliedFactor: p must be strictly between 0 and 1, got ${p}.`);
  }
  if (dr === 0 || dr === 1) {
    throw new RangeError(
      `impliedFactor: a default rate of ${dr} implies an infinite factor value; the implied factor is defined only for rates strictly between 0 and 1.`,
    );
  }
  return (normalQuantile(p) - Math.sqrt(1 - rho) * normalQuantile(dr)) / Math.sqrt(rho);
}
