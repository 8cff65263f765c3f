/**
 * The Student-t copula mixing law (one factor) of one period, as a nested integrand of the
 * log-concave integrator (log-concave-integral.ts).
 *
 * Obligor i defaults in period t when sqrt(W_t) (sqrt(rho) Z_t + sqrt(1 - rho) e_it) <= k_nu,
 * k_nu = t_nu^-1(p), with Z_t, e_it standard normal and W_t = nu / V_t, V_t ~ chi-square(nu)
 * common to the period. Write s = sqrt(V / nu) (so W = 1 / s^2): given (Z, s) the conditional PD
 * is Phi((k_nu s - sqrt(rho) Z) / sqrt(1 - rho)), so given s alone the period is the Gaussian
 * mixing law at the threshold c = k_nu s, and the period's likelihood is
 *
 *   L = Int_0^inf L_G(k_nu s; rho) f_nu(s) ds,
 *   f_nu(s) = 2 (nu / 2)^(nu / 2) / Gamma(nu / 2) s^(nu - 1) exp(-nu s^2 / 2)  (the law of sqrt(V / nu)),
 *
 * L_G(c; rho) the Gaussian period likelihood (gaussian-mixing.ts) at k = c. The outer integrand
 * g(s) = log L_G(k_nu s) + log f_nu(s) is log-concave in s: log L_G is concave in c (Prekopa 1973:
 * a marginal of the log-concave (c, x) integrand), c is linear in s, and log f_nu is concave with
 * curvature -(nu - 1) / s^2 - nu <= -nu for nu >= 1, so the curvature bound is nu. Its derivatives
 * come from the inner integral's posterior moments (the k-derivatives of the Gaussian law):
 *
 *   g'(s) = k_nu D1(c) + (nu - 1) / s - nu s,  g''(s) = k_nu^2 D2(c) - (nu - 1) / s^2 - nu,
 *   D1 = E[h1] / sqrt(1 - rho),  D2 = (E[h2] + Var h1) / (1 - rho),
 *
 * h1, h2 the z-derivatives of d log Phi(z) + (n - d) log Phi(-z) (normal-tails.ts), supplied by
 * ThresholdLikelihood (threshold-likelihood.ts: exactly, or from its verified table). At rho = 0 the
 * inner likelihood is the binomial at Phi(c) and needs no integral. The outer moment functions
 * give the k_nu-derivatives of log L: u = s D1 - (s D1)(mode), u^2 and s^2 D2, so that
 * d log L / d k_nu = E[s D1] and d^2 log L / d k_nu^2 = E[s^2 D2] + Var(s D1).
 *
 * References: Frey, R. & McNeil, A. J. (2003), "Dependent defaults in models of portfolio credit
 * risk", Journal of Risk 6(1):59-92, section 3 (the t copula as a normal variance mixture);
 * McNeil, A. J., Frey, R. & Embrechts, P. (2015), Quantitative Risk Management, 2nd ed., section
 * 11.2 (threshold and mixture models); Prekopa, A. (1973), Acta Sci. Math. 34:335-343.
 */
import gammaln from '@stdlib/math-base-special-gammaln';
import type { LogConcaveIntegrand } from './log-concave-integral';
import { ThresholdLikelihood } from './threshold-likelihood';

/** Moment functions of the outer integrand (the k_nu-derivatives). */
export const T_COPULA_MOMENTS = 3;

const LN_2PI = 1.8378770664093454836;

/** Stirling's error delta(a) = log Gamma(a) - ((a - 1/2) log a - a + log(2 pi) / 2). */
function stirlingDelta(a: number): number {
  if (a < 10) return gammaln(a) - ((a - 0.5) * Math.log(a) - a + 0.5 * LN_2PI);
  const r = 1 / (a * a);
  return (1 / 12 - r * (1 / 360 - r * (1 / 1260 - r / 1680))) / a;
}

/**
 * log f_nu(s), the log-density of s = sqrt(V / nu), V ~ chi-square(nu), for s > 0:
 *
 *   log f_nu(s) = log 2 + (nu / 2) log(nu / 2) - log Gamma(nu / 2) + (nu - 1) log s - nu s^2 / 2.
 *
 * Method: with a = nu / 2 and u = s^2 - 1, the same as log 2 + (log a - log 2 pi) / 2 - delta(a)
 * - a (u - log1p(u)) - log s, delta Stirling's error of log Gamma (its series for a >= 10), so the
 * large terms of the first form do not cancel when nu is large (the law of s then narrows to 1).
 *
 * Special cases: s <= 0 gives -Infinity; nu must be positive (not checked: inner loop).
 *
 * @example chiScaleLogDensity(1, 4) // log(2 * 4 * e^-2) = 0.0794415...
 *
 * Reference: Johnson, N. L., Kotz, S. & Balakrishnan, N. (1994), Continuous Univariate
 * Distributions, vol. 1, 2nd ed., ch. 18 (chi-square) with the change of variable V = nu s^2;
 * Abramowitz & Stegun (1964), 6.1.41 (Stirling's series).
 */
export function chiScaleLogDensity(s: number, nu: number): number {
  if (!(s > 0)) return Number.NEGATIVE_INFINITY;
  return chiScaleLogConstant(nu) + chiScaleLogKernel(s, nu);
}

/** log 2 + (log a - log 2 pi) / 2 - delta(a), a = nu / 2: the constant of {@link chiScaleLogDensity} in its stable form. */
export function chiScaleLogConstant(nu: number): number {
  const a = 0.5 * nu;
  return Math.LN2 + 0.5 * (Math.log(a) - LN_2PI) - stirlingDelta(a);
}

/** -a (u - log1p(u)) - log s, u = s^2 - 1, a = nu / 2: the part of {@link chiScaleLogDensity} that depends on s. */
export function chiScaleLogKernel(s: number, nu: number): number {
  const u = (s - 1) * (s + 1);
  return -0.5 * nu * (u - Math.log1p(u)) - Math.log(s);
}

/**
 * One period of the t-copula binomial mixture at (k_nu, rho, nu) as the outer integrand over
 * s = sqrt(V / nu) (module comment), with its own inner integrator. Use curvature bound nu and
 * lower limit 0.
 *
 * @example
 * const inner = new ThresholdLikelihood(); inner.set(1000, 12, logBinomialCoefficient(1000, 12), 0.1);
 * const f = new TCopulaPeriodIntegrand();
 * f.setParameters(tQuantile(0.01, 5), 5); f.setPeriod(inner, false);
 * new LogConcaveIntegrator(T_COPULA_MOMENTS).integrate(f, { curvatureBound: 5, lower: 0 }).value
 */
export class TCopulaPeriodIntegrand implements LogConcaveIntegrand {
  moments = T_COPULA_MOMENTS;
  private kt = 0;
  private nu = 4;
  private logConstant = 0;
  private inner: ThresholdLikelihood = new ThresholdLikelihood();
  private tabulate = false;
  /** s D1 at the mode (set by prepare). */
  uAtMode = 0;

  /** Sets k_nu = t_nu^-1(p) and nu > 1 (rho belongs to the period's ThresholdLikelihood). */
  setParameters(kt: number, nu: number): void {
    this.kt = kt;
    this.nu = nu;
    this.logConstant = chiScaleLogConstant(nu);
  }

  /**
   * Sets the period: its Gaussian likelihood in the threshold (ThresholdLikelihood, set to the
   * period's counts and rho), read exactly or from its verified table.
   */
  setPeriod(inner: ThresholdLikelihood, tabulate: boolean): void {
    this.inner = inner;
    this.tabulate = tabulate;
  }

  private integrateInner(s: number): void {
    if (this.tabulate) this.inner.tabulated(this.kt * s);
    else this.inner.exact(this.kt * s);
  }

  /** The centre of the law of s (its mode tends to 1 as nu grows). */
  guess(): number {
    return 1;
  }

  derivatives(s: number, out: Float64Array): void {
    if (!(s > 0)) {
      // The density of s vanishes at 0 for nu > 1: a huge finite slope sends a mode search that
      // overshoots to s <= 0 back into the bracket (s > 0) instead of failing on an infinity.
      out[0] = Number.NEGATIVE_INFINITY;
      out[1] = Number.MAX_VALUE;
      out[2] = -Number.MAX_VALUE;
      return;
    }
    this.integrateInner(s);
    const nu = this.nu;
    const kt = this.kt;
    const I = this.inner;
    out[0] = I.value + this.logConstant + chiScaleLogKernel(s, nu);
    out[1] = kt * I.d1 + (nu - 1) / s - nu * s;
    out[2] = kt * kt * I.d2 - (nu - 1) / (s * s) - nu;
  }

  prepare(mode: number): void {
    this.integrateInner(mode);
    this.uAtMode = mode * this.inner.d1;
  }

  node(s: number, row: Float64Array): number {
    if (!(s > 0)) {
      row[0] = 0;
      row[1] = 0;
      row[2] = 0;
      return Number.NEGATIVE_INFINITY;
    }
    this.integrateInner(s);
    const I = this.inner;
    const u = s * I.d1 - this.uAtMode;
    row[0] = u;
    row[1] = u * u;
    row[2] = s * s * I.d2;
    return I.value + this.logConstant + chiScaleLogKernel(s, this.nu);
  }
}
