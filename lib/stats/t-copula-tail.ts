/**
 * What the Student-t copula implies for two obligors and for a granular pool: the lower
 * tail-dependence coefficient, the joint default probability under the bivariate t, and the
 * default-rate distribution of an infinitely granular pool.
 */
import chiSquareCdf from '@stdlib/stats-base-dists-chisquare-cdf';
import { adaptiveIntegral } from './adaptive-quadrature';
import { bivariateNormalCdf } from './bivariate-normal';
import { brentRoot } from './brent';
import { normalCdf, normalQuantile } from './normal';
import { chiScaleLogConstant, chiScaleLogDensity } from './t-copula-mixing';
import { studentT, tQuantile } from './t-copula-likelihood';

function assertLaw(fn: string, rho: number, nu: number, rhoLower = 0): void {
  if (!(rho >= rhoLower && rho < 1)) throw new RangeError(`${fn}: rho must be in [${rhoLower}, 1); got ${rho}.`);
  if (!(nu > 0)) throw new RangeError(`${fn}: the degrees of freedom nu must be positive (Infinity for the Gaussian copula); got ${nu}.`);
}

/** The range of s = sqrt(V / nu) outside which its density is below e^-50 of its peak (for the quadratures). */
function chiScaleRange(nu: number): [number, number] {
  // log f(s) - log f(m) with the mode m = sqrt((nu - 1) / nu); each end by Brent on its side.
  const m = nu > 1 ? Math.sqrt((nu - 1) / nu) : 0;
  const drop = (s: number) => chiScaleLogDensity(s, nu) - (m > 0 ? chiScaleLogDensity(m, nu) : 0) + 50;
  const width = 20 / Math.sqrt(nu) + 20;
  const upper = brentRoot(drop, m > 0 ? m : 1e-300, m + width, { tolerance: 1e-12 }).value;
  const lower = m > 0 && drop(Number.MIN_VALUE) < 0 ? brentRoot(drop, Number.MIN_VALUE, m, { tolerance: 1e-15 }).value : 0;
  return [lower, upper];
}

/**
 * Lower tail-dependence coefficient of the bivariate t copula with correlation rho and nu degrees
 * of freedom: lambda = lim_{q -> 0} P(U1 <= q | U2 <= q) = 2 t_{nu+1}(-sqrt((nu + 1)(1 - rho) / (1 + rho))).
 *
 * Special cases: nu = Infinity (the Gaussian copula) gives 0 for rho < 1; rho outside (-1, 1) or
 * nu not positive throw RangeError.
 *
 * @example tCopulaTailDependence(0.5, 4) // 0.25317
 *
 * Reference: McNeil, A. J., Frey, R. & Embrechts, P. (2015), Quantitative Risk Management, 2nd
 * ed., example 7.39 (tail dependence of the t copula); Embrechts, McNeil & Straumann (2002).
 */
export function tCopulaTailDependence(rho: number, nu: number): number {
  assertLaw('tCopulaTailDependence', rho, nu, -1 + Number.EPSILON);
  if (nu === Number.POSITIVE_INFINITY) return 0;
  return 2 * studentT(-Math.sqrt(((nu + 1) * (1 - rho)) / (1 + rho)), nu + 1);
}

/**
 * Joint default probability of two obligors with PDs p1, p2 under the bivariate t copula with
 * correlation rho and nu degrees of freedom: P(T1 <= t_nu^-1(p1), T2 <= t_nu^-1(p2)) =
 * E[Phi2(k1 s, k2 s; rho)], s = sqrt(V / nu), V ~ chi-square(nu), k_i = t_nu^-1(p_i).
 *
 * Method: the mixture over s by adaptive Gauss-Kronrod (adaptive-quadrature.ts, relative 1e-11)
 * on the range that holds the law of s to e^-50, and where that rule misses its tolerance (nu near
 * 2 with small PDs) the same integral in log s; Phi2 by bivariateNormalCdf (Genz 2004).
 *
 * Special cases: nu = Infinity is Phi2(Phi^-1(p1), Phi^-1(p2); rho), the Gaussian copula; p outside
 * (0, 1), rho outside (-1, 1) or nu not positive throw RangeError.
 *
 * @example bivariateTJointDefault(0.01, 0.01, 0.2, 4) // 0.0015351
 *
 * Reference: McNeil, Frey & Embrechts (2015), section 6.2 (the t as a normal variance mixture);
 * Genz, A. (2004), Statistics and Computing 14:251-260.
 */
export function bivariateTJointDefault(p1: number, p2: number, rho: number, nu: number): number {
  if (!(p1 > 0 && p1 < 1) || !(p2 > 0 && p2 < 1)) throw new RangeError(`bivariateTJointDefault: the PDs must be strictly between 0 and 1; got ${p1} and ${p2}.`);
  assertLaw('bivariateTJointDefault', rho, nu, -1 + Number.EPSILON);
  if (nu === Number.POSITIVE_INFINITY) return bivariateNormalCdf(normalQuantile(p1), normalQuantile(p2), rho);
  const k1 = tQuantile(p1, nu);
  const k2 = tQuantile(p2, nu);
  const [lo, hi] = chiScaleRange(nu);
  const r = adaptiveIntegral((s) => (s > 0 ? bivariateNormalCdf(k1 * s, k2 * s, rho) * Math.exp(chiScaleLogDensity(s, nu)) : 0), lo, hi, { relativeTolerance: 1e-11 });
  if (r.converged) return r.value;
  // Near nu = 2 the law of s reaches down to ~e^(-50 / (nu - 1)) and, at small PDs, the integrand
  // lives where k s is a few units, s ~ 1 / |k|: a rule in s cannot resolve both within its
  // panels. In u = log s (ds = s du) both ends are smooth; used only when the rule in s fails, so
  // every value that rule gives stays as it was. The log-density of s plus log s, written in u as
  // C - (nu / 2) expm1(2u) + nu u (C = chiScaleLogConstant), keeps its digits at tiny s, where
  // the kernel's s^2 - 1 rounds to -1.
  const uLo = Math.log(Math.max(lo, 1e-300));
  const constant = chiScaleLogConstant(nu);
  const inLog = adaptiveIntegral(
    (u) => {
      const s = Math.exp(u);
      return bivariateNormalCdf(k1 * s, k2 * s, rho) * Math.exp(constant - 0.5 * nu * Math.expm1(2 * u) + nu * u);
    },
    uLo,
    Math.log(hi),
    { relativeTolerance: 1e-11 },
  );
  if (!inLog.converged) throw new RangeError(`bivariateTJointDefault: the integral over the mixing variable did not meet its tolerance (p1 = ${p1}, p2 = ${p2}, rho = ${rho}, nu = ${nu}).`);
  return inLog.value;
}

/**
 * Distribution function of the default rate of an infinitely granular pool under the one-factor
 * t copula: P(pi <= x) = E[Phi((sqrt(1 - rho) Phi^-1(x) - k_nu s) / sqrt(rho))], k_nu = t_nu^-1(p).
 *
 * Method: adaptive Gauss-Kronrod over s (relative 1e-12); at rho = 0 the rate is Phi(k_nu s), so
 * P(pi <= x) = P(k_nu s <= Phi^-1(x)), a chi-square probability (stdlib).
 *
 * Special cases: x <= 0 gives 0, x >= 1 gives 1; p outside (0, 1), rho outside [0, 1) or nu not
 * positive throw RangeError.
 *
 * @example tDefaultRateCdf(0.05, 0.01, 0.12, 5)
 *
 * Reference: Frey & McNeil (2003), section 3; Vasicek (2002) for the Gaussian case.
 */
export function tDefaultRateCdf(x: number, p: number, rho: number, nu: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`tDefaultRateCdf: p must be strictly between 0 and 1; got ${p}.`);
  assertLaw('tDefaultRateCdf', rho, nu);
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const kt = tQuantile(p, nu);
  const zx = normalQuantile(x);
  if (nu === Number.POSITIVE_INFINITY) return rho === 0 ? (kt <= zx ? 1 : 0) : normalCdf((Math.sqrt(1 - rho) * zx - kt) / Math.sqrt(rho));
  if (rho === 0) {
    // k_nu s <= zx with s > 0
    if (kt === 0) return zx >= 0 ? 1 : 0;
    const ratio = zx / kt;
    if (kt < 0) return ratio <= 0 ? 1 : 1 - chiSquareCdf(nu * ratio * ratio, nu);
    return ratio <= 0 ? 0 : chiSquareCdf(nu * ratio * ratio, nu);
  }
  const a = Math.sqrt(1 - rho) * zx;
  const b = Math.sqrt(rho);
  const [lo, hi] = chiScaleRange(nu);
  const r = adaptiveIntegral((s) => (s > 0 ? normalCdf((a - kt * s) / b) * Math.exp(chiScaleLogDensity(s, nu)) : 0), lo, hi, {
    relativeTolerance: 1e-12,
    absoluteTolerance: 1e-15,
  });
  if (!r.converged) throw new RangeError(`tDefaultRateCdf: the integral over the mixing variable did not meet its tolerance (x = ${x}, p = ${p}, rho = ${rho}, nu = ${nu}).`);
  return Math.min(1, r.value);
}

/**
 * Quantile of the default rate of an infinitely granular pool under the one-factor t copula: the
 * x with tDefaultRateCdf(x) = q.
 *
 * Method: Brent's root of the distribution function in log(x / (1 - x)) on [1e-15, 1 - 1e-15]
 * (tolerance 1e-13).
 *
 * Special cases: q outside (0, 1) throws RangeError; a quantile beyond the search range is
 * reported as its end.
 *
 * @example tDefaultRateQuantile(0.999, 0.01, 0.12, 5)
 *
 * Reference: Frey & McNeil (2003), section 3.
 */
export function tDefaultRateQuantile(q: number, p: number, rho: number, nu: number): number {
  if (!(q > 0 && q < 1)) throw new RangeError(`tDefaultRateQuantile: q must be strictly between 0 and 1; got ${q}.`);
  const lo = Math.log(1e-15 / (1 - 1e-15));
  const hi = -lo;
  const f = (y: number) => tDefaultRateCdf(1 / (1 + Math.exp(-y)), p, rho, nu) - q;
  if (f(lo) >= 0) return 1e-15;
  if (f(hi) <= 0) return 1 - 1e-15;
  const y = brentRoot(f, lo, hi, { tolerance: 1e-13 }).value;
  return 1 / (1 + Math.exp(-y));
}
