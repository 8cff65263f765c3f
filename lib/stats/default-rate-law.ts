/**
 * The mixing laws as default-rate distributions: each law's distribution function
 * F(b) = P(pi <= b) of the year's default rate pi, in log form with two derivatives in the
 * coordinate where it is log-concave. This is the one piece a law contributes to the granular
 * probability integral transform of law-count-pit.ts (and any other quantity that integrates the
 * binomial law over the default rate); adding a law means adding one constructor here.
 *
 * Coordinates (y, with b = b(y)):
 * - probit, b = Phi(y): the Gaussian copula, log F = log Phi((sqrt(1 - rho) y - k) / sqrt(rho)),
 *   concave in y; the t copula, F = E_s[Phi((sqrt(1 - rho) y - k_nu s) / sqrt(rho))], log-concave
 *   in y by Prekopa's theorem (the integrand is log-concave in (y, s) for nu >= 1);
 * - logit, b = 1 / (1 + e^-y): logit-normal mixing, log F = log Phi((y - mu) / sigma); beta
 *   mixing, F the distribution function of logit(pi), whose density s(y)^a s(-y)^b / B(a, b) is
 *   log-concave for every a, b > 0, so its distribution function is too (Bagnoli & Bergstrom 2005,
 *   theorem 1).
 * A law without mixing (rho = 0, theta = 0, sigma = 0) is a point mass at its rate: F is a step,
 * given as `lower` (the coordinate of the rate) with log F = 0 above it.
 *
 * References: Vasicek (2002), Risk 15(12), eq. 3 (the Gaussian rate distribution); Frey, R. &
 * McNeil, A. J. (2003), Journal of Risk 6(1):59-92, section 3 (the t copula's); McNeil, Frey &
 * Embrechts (2015), Quantitative Risk Management, 2nd ed., section 11.2.4 (logit-normal and beta
 * mixing); Prekopa, A. (1973), Acta Sci. Math. 34:335-343; Bagnoli, M. & Bergstrom, T. (2005),
 * "Log-concave probability and its applications", Economic Theory 26:445-469.
 */
import betainc from '@stdlib/math-base-special-betainc';
import betaln from '@stdlib/math-base-special-betaln';
import gammainc from '@stdlib/math-base-special-gammainc';
import { betaParameters } from './beta-binomial';
import type { FittedLaw } from './fitted-law';
import { betaThetaFromEquivalentRho } from './estimators/beta-mixing-mle';
import { LogConcaveIntegrator, type LogConcaveIntegrand } from './log-concave-integral';
import { logistic, logLogistic } from './logit-normal-mixing';
import { normalCdf, normalQuantile } from './normal';
import { normalTails, TAIL_SLOTS } from './normal-tails';
import { chiScaleLogDensity } from './t-copula-mixing';
import { tQuantile } from './t-copula-likelihood';

/** The coordinate y of the default rate b: probit b = Phi(y), logit b = 1 / (1 + e^-y). */
export type RateScale = 'probit' | 'logit';

/** A mixing law's default-rate distribution, as law-count-pit.ts integrates it. */
export interface DefaultRateLaw {
  readonly scale: RateScale;
  /** F = 0 below this y (a point mass or a bounded support); -Infinity when F > 0 everywhere. */
  readonly lower: number;
  /**
   * Writes log F(b(y)) and its first and second y-derivatives to out[0..2] (log F concave in y),
   * for y above `lower` (below it a law may write a smooth extension or -Infinity with a huge slope).
   */
  logCdf(y: number, out: Float64Array): void;
}

/** The coordinate of a rate b in (0, 1) on a scale. */
export function rateCoordinate(scale: RateScale, b: number): number {
  return scale === 'probit' ? normalQuantile(b) : Math.log(b) - Math.log1p(-b);
}

/** Writes the values of y <= lower, where F = 0: a huge finite slope sends a mode search back above lower. */
function belowSupport(out: Float64Array): void {
  out[0] = Number.NEGATIVE_INFINITY;
  out[1] = Number.MAX_VALUE;
  out[2] = -Number.MAX_VALUE;
}

/** The law of a rate without mixing: F(b) = 1 for b >= rate, else 0. */
export function pointMassLaw(rate: number, scale: RateScale = 'probit'): DefaultRateLaw {
  if (!(rate > 0 && rate < 1)) throw new RangeError(`pointMassLaw: the rate must be strictly between 0 and 1; got ${rate}.`);
  const lower = rateCoordinate(scale, rate);
  return {
    scale,
    lower,
    // F = 1 from `lower` on, where the integral runs; the constant extension below keeps the
    // integrand smooth for the mode search, which the integrator then clamps to the range.
    logCdf(_y, out) {
      out[0] = 0;
      out[1] = 0;
      out[2] = 0;
    },
  };
}

/**
 * The Gaussian copula's (Vasicek) default-rate law at (p, rho):
 * F(b) = Phi((sqrt(1 - rho) Phi^-1(b) - Phi^-1(p)) / sqrt(rho)); rho = 0 is the point mass at p.
 *
 * @example gaussianRateLaw(0.01, 0.12).logCdf(normalQuantile(0.05), out) // out[0] = log F(0.05)
 *
 * Reference: Vasicek (2002), eq. 3.
 */
export function gaussianRateLaw(p: number, rho: number): DefaultRateLaw {
  if (!(p > 0 && p < 1)) throw new RangeError(`gaussianRateLaw: p must be strictly between 0 and 1; got ${p}.`);
  if (!(rho >= 0 && rho < 1)) throw new RangeError(`gaussianRateLaw: rho must be in [0, 1); got ${rho}.`);
  if (rho === 0) return pointMassLaw(p, 'probit');
  const k = normalQuantile(p);
  const s = Math.sqrt(rho);
  const alpha = Math.sqrt(1 - rho) / s;
  const T = new Float64Array(TAIL_SLOTS);
  return {
    scale: 'probit',
    lower: Number.NEGATIVE_INFINITY,
    logCdf(y, out) {
      normalTails(alpha * y - k / s, T);
      out[0] = T[0];
      out[1] = alpha * T[2];
      out[2] = -alpha * alpha * T[4];
    },
  };
}

/**
 * The logit-normal law, pi = 1 / (1 + exp(-(mu + sigma Z))): F = Phi((logit b - mu) / sigma) on
 * the logit scale; sigma = 0 is the point mass at logistic(mu).
 *
 * Reference: McNeil, Frey & Embrechts (2015), section 11.2.4.
 */
export function logitNormalRateLaw(mu: number, sigma: number): DefaultRateLaw {
  if (!Number.isFinite(mu) || !(sigma >= 0) || !Number.isFinite(sigma)) {
    throw new RangeError(`logitNormalRateLaw: mu must be finite and sigma a finite number at or above 0; got mu = ${mu}, sigma = ${sigma}.`);
  }
  if (sigma === 0) return pointMassLaw(logistic(mu), 'logit');
  const T = new Float64Array(TAIL_SLOTS);
  return {
    scale: 'logit',
    lower: Number.NEGATIVE_INFINITY,
    logCdf(y, out) {
      normalTails((y - mu) / sigma, T);
      out[0] = T[0];
      out[1] = T[2] / sigma;
      out[2] = -T[4] / (sigma * sigma);
    },
  };
}

/** Below this F the regularised incomplete beta is taken in log form from its hypergeometric series. */
const BETA_SERIES_BELOW = 1e-250;

/**
 * log I_b(a, c), the regularised incomplete beta function, for y = logit b, without underflow:
 * stdlib's betainc (the lower or, near 1, the upper tail with log1p), and where the value is
 * below 1e-250 DLMF 8.17.8, I_b(a, c) = b^a (1 - b)^c / (a B(a, c)) 2F1(a + c, 1; a + 1; b), its
 * series summed in log form (there b lies far below the mean, so the terms fall geometrically).
 */
function logIncompleteBeta(y: number, a: number, c: number, logB: number): number {
  const b = logistic(y);
  const mean = a / (a + c);
  if (b > mean) {
    const upper = betainc(b, a, c, true, true);
    return Math.log1p(-upper);
  }
  const F = b > 0 ? betainc(b, a, c, true, false) : 0;
  if (F > BETA_SERIES_BELOW) return Math.log(F);
  let term = 1;
  let sum = 1;
  for (let k = 0; k < 100000; k++) {
    term *= ((a + c + k) * b) / (a + 1 + k);
    sum += term;
    if (term < 1e-17 * sum) break;
  }
  return a * logLogistic(y) + c * logLogistic(-y) - Math.log(a) - logB + Math.log(sum);
}

/**
 * The beta law, pi ~ Beta(a, c) with mean p and overdispersion theta = 1 / (a + c), on the logit
 * scale: F = I_b(a, c) (regularised incomplete beta); theta = 0 is the point mass at p.
 * d log F / dy = f / F with f = s(y)^a s(-y)^c / B(a, c) the density of logit(pi), and
 * d^2 log F / dy^2 = (f / F)(a s(-y) - c s(y)) - (f / F)^2.
 *
 * Reference: Skellam (1948); DLMF 8.17.8 (the series of the incomplete beta function).
 */
export function betaRateLaw(p: number, theta: number): DefaultRateLaw {
  if (!(p > 0 && p < 1)) throw new RangeError(`betaRateLaw: p must be strictly between 0 and 1; got ${p}.`);
  if (!(theta >= 0) || !Number.isFinite(theta)) throw new RangeError(`betaRateLaw: theta must be a finite number at or above 0; got ${theta}.`);
  if (theta === 0) return pointMassLaw(p, 'logit');
  const { a, b: c } = betaParameters(p, theta);
  const logB = betaln(a, c);
  return {
    scale: 'logit',
    lower: Number.NEGATIVE_INFINITY,
    logCdf(y, out) {
      const logF = logIncompleteBeta(y, a, c, logB);
      const h = Math.exp(a * logLogistic(y) + c * logLogistic(-y) - logB - logF);
      out[0] = logF;
      out[1] = h;
      out[2] = h * (a * logistic(-y) - c * logistic(y)) - h * h;
    },
  };
}

/** Moment functions of the t law's inner integral: u = h - h(mode), u^2 and the curvature term. */
const T_RATE_MOMENTS = 3;

/**
 * The inner integrand of the t law's F at one y, over s = sqrt(V / nu):
 * g(s) = log Phi(z) + log f_nu(s), z = (a y - k s) / c, a = sqrt(1 - rho), c = sqrt(rho);
 * concave with curvature at most -nu (t-copula-mixing.ts). Its moment functions give the
 * y-derivatives of log F: h = (a / c) Phi'(z) / Phi(z) and -(a / c)^2 w(z).
 */
class TRateIntegrand implements LogConcaveIntegrand {
  readonly moments = T_RATE_MOMENTS;
  private readonly T = new Float64Array(TAIL_SLOTS);
  y = 0;
  hAtMode = 0;
  constructor(
    private readonly a: number,
    private readonly c: number,
    private readonly k: number,
    private readonly nu: number,
  ) {}

  guess(): number {
    return 1;
  }

  derivatives(s: number, out: Float64Array): void {
    if (!(s > 0)) return belowSupport(out);
    const T = this.T;
    normalTails((this.a * this.y - this.k * s) / this.c, T);
    const r = this.k / this.c;
    out[0] = T[0] + chiScaleLogDensity(s, this.nu);
    out[1] = -r * T[2] + (this.nu - 1) / s - this.nu * s;
    out[2] = -r * r * T[4] - (this.nu - 1) / (s * s) - this.nu;
  }

  prepare(mode: number): void {
    normalTails((this.a * this.y - this.k * mode) / this.c, this.T);
    this.hAtMode = (this.a / this.c) * this.T[2];
  }

  node(s: number, row: Float64Array): number {
    if (!(s > 0)) {
      row[0] = 0;
      row[1] = 0;
      row[2] = 0;
      return Number.NEGATIVE_INFINITY;
    }
    const T = this.T;
    normalTails((this.a * this.y - this.k * s) / this.c, T);
    const q = this.a / this.c;
    const u = q * T[2] - this.hAtMode;
    row[0] = u;
    row[1] = u * u;
    row[2] = -q * q * T[4];
    return T[0] + chiScaleLogDensity(s, this.nu);
  }
}

/**
 * log P(s > u) (upper) or log P(s <= u) of s = sqrt(V / nu), V ~ chi-square(nu), u > 0: the
 * regularised incomplete gamma function at (nu / 2, nu u^2 / 2) (stdlib gammainc); where it
 * underflows, the leading term of its tail, log f(u) - log(nu u - (nu - 1) / u) above (the hazard
 * of a log-concave density tends to -(log f)') and log f(u) + log(u / nu) below (f ~ c s^(nu - 1)).
 *
 * Reference: Abramowitz & Stegun (1964), 6.5.2, 6.5.3 and 26.4.19 (chi-square as incomplete gamma), 6.5.32.
 */
function chiScaleLogProbability(u: number, nu: number, upper: boolean): number {
  const x = 0.5 * nu * u * u;
  const value = gammainc(x, 0.5 * nu, true, upper);
  if (value > 0.5) return Math.log1p(-gammainc(x, 0.5 * nu, true, !upper));
  if (value > 1e-280) return Math.log(value);
  const logF = chiScaleLogDensity(u, nu);
  return upper ? logF - Math.log(nu * u - (nu - 1) / u) : logF + Math.log(u / nu);
}

/**
 * The t copula's default-rate law at (p, rho, nu), nu > 1, on the probit scale:
 * F(b) = E_s[Phi((sqrt(1 - rho) Phi^-1(b) - k_nu s) / sqrt(rho))], k_nu = t_nu^-1(p),
 * s = sqrt(V / nu), V ~ chi-square(nu); nu = Infinity is the Gaussian law.
 *
 * Method: log F at each y by the log-concave integrator over s (curvature bound nu, lower limit
 * 0, relative tolerance 1e-10), its y-derivatives as posterior moments (d log F / dy = E[h],
 * d^2 log F / dy^2 = E[-(a / c)^2 w] + Var h, centred at the mode). At rho = 0 the rate is
 * Phi(k_nu s), so F(b) = P(k_nu s <= Phi^-1(b)): the mass of s above (k_nu < 0) or below
 * (k_nu > 0) u = Phi^-1(b) / k_nu, a chi-square probability (regularised incomplete gamma), with
 * d log F / du = -+f(u) / F; k_nu = 0 (p = 1/2) is the point mass at 1/2.
 *
 * Special cases: nu <= 1 (log-concavity in s is lost) or a failed inner integral throw RangeError.
 *
 * Reference: Frey & McNeil (2003), section 3; McNeil, Frey & Embrechts (2015), section 11.2.
 */
export function tRateLaw(p: number, rho: number, nu: number): DefaultRateLaw {
  if (!(p > 0 && p < 1)) throw new RangeError(`tRateLaw: p must be strictly between 0 and 1; got ${p}.`);
  if (!(rho >= 0 && rho < 1)) throw new RangeError(`tRateLaw: rho must be in [0, 1); got ${rho}.`);
  if (!(nu > 1)) throw new RangeError(`tRateLaw: the degrees of freedom nu must be above 1 (Infinity for the Gaussian copula); got ${nu}.`);
  if (nu === Number.POSITIVE_INFINITY) return gaussianRateLaw(p, rho);
  const k = tQuantile(p, nu);
  const integrator = new LogConcaveIntegrator(T_RATE_MOMENTS);
  const fail = (y: number, reason: string | undefined): never => {
    throw new RangeError(`tRateLaw: the integral over the mixing variable failed at the rate ${normalCdf(y).toPrecision(3)} (p = ${p}, rho = ${rho}, nu = ${nu}): ${reason ?? 'unknown'}.`);
  };
  if (rho === 0) {
    if (k === 0) return pointMassLaw(0.5, 'probit');
    const logDensityDerivative = (u: number) => (nu - 1) / u - nu * u;
    return {
      scale: 'probit',
      lower: k > 0 ? 0 : Number.NEGATIVE_INFINITY,
      logCdf(y, out) {
        if (k < 0 && y >= 0) {
          out[0] = 0;
          out[1] = 0;
          out[2] = 0;
          return;
        }
        if (k > 0 && y <= 0) return belowSupport(out);
        const u = y / k;
        const logF = chiScaleLogProbability(u, nu, k < 0);
        const h = Math.exp(chiScaleLogDensity(u, nu) - logF);
        const sign = k < 0 ? -1 : 1; // d log F / du = -h (mass of s above u) or +h (mass below u)
        out[0] = logF;
        out[1] = (sign * h) / k;
        out[2] = (sign * h * logDensityDerivative(u) - h * h) / (k * k);
      },
    };
  }
  const inner = new TRateIntegrand(Math.sqrt(1 - rho), Math.sqrt(rho), k, nu);
  let warm = 1;
  return {
    scale: 'probit',
    lower: Number.NEGATIVE_INFINITY,
    logCdf(y, out) {
      inner.y = y;
      const r = integrator.integrate(inner, { curvatureBound: nu, lower: 0, start: warm, relativeTolerance: 1e-10 });
      if (!r.converged) fail(y, r.reason);
      warm = r.mode > 0 ? r.mode : 1;
      const M = integrator.moments;
      out[0] = r.value;
      out[1] = inner.hAtMode + M[0];
      out[2] = M[2] + M[1] - M[0] * M[0];
    },
  };
}

/**
 * The default-rate law of a fitted law of the comparison (copula-comparison.ts): the Gaussian at
 * (pd, rho), the t copula at (pd, rho, nu), beta at (pd, theta) from its equivalent rho,
 * logit-normal at (mu, sigma).
 */
export function rateLawOf(law: FittedLaw): DefaultRateLaw {
  switch (law.law) {
    case 'gaussian':
      return gaussianRateLaw(law.pd, law.rho);
    case 't':
      return tRateLaw(law.pd, law.rho, law.nu);
    case 'beta':
      return betaRateLaw(law.pd, betaThetaFromEquivalentRho(law.pd, law.equivalentRho));
    case 'logitNormal':
      return logitNormalRateLaw(law.mu, law.sigma);
  }
}
