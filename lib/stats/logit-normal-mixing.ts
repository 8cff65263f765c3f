/**
 * The logit-normal mixing law: the year's default rate is pi = 1 / (1 + exp(-(mu + sigma Z))),
 * Z standard normal, so a year with n obligors has the likelihood
 *
 *   L = Int C(n, d) s(eta)^d (1 - s(eta))^(n - d) phi(x) dx,  eta = mu + sigma x,  s the logistic function,
 *
 * a one-dimensional integral of a log-concave spike: g(x) = log C(n, d) + d log s(eta) +
 * (n - d) log s(-eta) - x^2 / 2 - log sqrt(2 pi), g'(x) = sigma (d - n s(eta)) - x,
 * g''(x) = -sigma^2 n s(eta) s(-eta) - 1 <= -1 (curvature bound 1), integrated by the
 * log-concave integrator as the Gaussian law is.
 *
 * References: McNeil, A. J., Frey, R. & Embrechts, P. (2015), Quantitative Risk Management, 2nd
 * ed., section 11.2.4 (probit- and logit-normal mixing); Frey, R. & McNeil, A. J. (2003), Journal
 * of Risk 6(1):59-92, section 4.
 */
import { LogConcaveIntegrator, type LogConcaveIntegrand, type LogConcaveOptions } from './log-concave-integral';
import { PeriodWarmStarts } from './period-warm-starts';
import type { Panel } from './panel';
import { panelArrays } from './panel-arrays';

const LN_SQRT_2PI = 0.9189385332046727418;

/**
 * Moment functions of the (mu, sigma)-derivatives: with r = d - n s(eta) (the eta-score) and
 * q = n s(eta) s(-eta), u = r - r(mode), v = x r - (x r)(mode): [u, u^2, v, v^2, u v, q, x q, x^2 q].
 * Then d l / d mu = E[r], d l / d sigma = E[x r], and the Hessian is E[-q, -x q, -x^2 q] plus the
 * covariances of (r, x r) (the posterior-moment identities of gaussian-mixing.ts).
 */
export const LOGIT_NORMAL_MOMENTS = 8;

/** log s(eta) = -log(1 + exp(-eta)) without overflow. */
export function logLogistic(eta: number): number {
  return eta >= 0 ? -Math.log1p(Math.exp(-eta)) : eta - Math.log1p(Math.exp(eta));
}

/** s(eta) = 1 / (1 + exp(-eta)) without overflow. */
export function logistic(eta: number): number {
  if (eta >= 0) return 1 / (1 + Math.exp(-eta));
  const e = Math.exp(eta);
  return e / (1 + e);
}

/**
 * One period of the logit-normal binomial mixture at (mu, sigma), sigma >= 0, as an integrand over
 * the factor x (module comment). Reuse the object; it allocates nothing per call.
 *
 * @example
 * const f = new LogitNormalPeriodIntegrand();
 * f.setParameters(-4.5, 0.5); f.setPeriod(1000, 12, logBinomialCoefficient(1000, 12));
 * new LogConcaveIntegrator(0).integrate(f, { curvatureBound: 1 }).value
 */
export class LogitNormalPeriodIntegrand implements LogConcaveIntegrand {
  /** 0, or LOGIT_NORMAL_MOMENTS when the derivatives in (mu, sigma) are wanted. */
  moments = 0;
  private mu = 0;
  private sigma = 0;
  private n = 1;
  private d = 0;
  private logC = 0;
  /** r = d - n s(eta) and x r at the mode (set by prepare). */
  rAtMode = 0;
  xrAtMode = 0;

  /** Sets (mu, sigma) and whether the moments of the (mu, sigma)-derivatives are wanted. */
  setParameters(mu: number, sigma: number, derivatives = false): void {
    this.mu = mu;
    this.sigma = sigma;
    this.moments = derivatives ? LOGIT_NORMAL_MOMENTS : 0;
  }

  setPeriod(n: number, d: number, logC: number): void {
    this.n = n;
    this.d = d;
    this.logC = logC;
  }

  /** The factor at which s(eta) equals the observed rate, else 0. */
  guess(): number {
    if (this.d > 0 && this.d < this.n && this.sigma > 0) {
      const x = (Math.log(this.d / (this.n - this.d)) - this.mu) / this.sigma;
      if (Number.isFinite(x)) return x;
    }
    return 0;
  }

  derivatives(x: number, out: Float64Array): void {
    const eta = this.mu + this.sigma * x;
    const s = logistic(eta);
    const sc = logistic(-eta);
    out[0] = this.logC - LN_SQRT_2PI + this.d * logLogistic(eta) + (this.n - this.d) * logLogistic(-eta) - 0.5 * x * x;
    out[1] = this.sigma * (this.d * sc - (this.n - this.d) * s) - x;
    out[2] = -this.sigma * this.sigma * this.n * s * sc - 1;
  }

  prepare(mode: number): void {
    const eta = this.mu + this.sigma * mode;
    const r = this.d * logistic(-eta) - (this.n - this.d) * logistic(eta);
    this.rAtMode = r;
    this.xrAtMode = mode * r;
  }

  node(x: number, row: Float64Array): number {
    const eta = this.mu + this.sigma * x;
    if (this.moments > 0) {
      const s = logistic(eta);
      const sc = logistic(-eta);
      const r = this.d * sc - (this.n - this.d) * s;
      const q = this.n * s * sc;
      const u = r - this.rAtMode;
      const v = x * r - this.xrAtMode;
      row[0] = u;
      row[1] = u * u;
      row[2] = v;
      row[3] = v * v;
      row[4] = u * v;
      row[5] = q;
      row[6] = x * q;
      row[7] = x * x * q;
    }
    return this.logC - LN_SQRT_2PI + this.d * logLogistic(eta) + (this.n - this.d) * logLogistic(-eta) - 0.5 * x * x;
  }
}

/**
 * Evaluates the logit-normal log-likelihood of one panel at many (mu, sigma), keeping per-period
 * warm starts and counting integrals above tolerance.
 *
 * Method: each period by the mode-bracketed adaptive Gauss-Kronrod rule (log-concave-integral.ts)
 * with curvature bound 1; sigma = 0 is the binomial likelihood at s(mu) (the integrand does not
 * depend on x, and the rule integrates the normal density exactly). Checked against SciPy's quad in
 * tests/unit/stats/logit-normal-mixing.test.ts.
 *
 * Special cases: mu not finite or sigma < 0 throw RangeError; a failed period integral throws a
 * RangeError naming the period.
 */
export class LogitNormalLikelihood {
  readonly periods: number;
  private readonly obligors: Float64Array;
  private readonly defaults: Float64Array;
  private readonly logChoose: Float64Array;
  private readonly warm: PeriodWarmStarts;
  /** The integrator's options, refilled per period by optionsInto (no object per integral). */
  private readonly options: LogConcaveOptions = { curvatureBound: 1 };
  private readonly integrand = new LogitNormalPeriodIntegrand();
  private readonly integrator = new LogConcaveIntegrator(LOGIT_NORMAL_MOMENTS);
  /** Period integrals that missed the tolerance of the adaptive rule (their finite values are used). */
  get unconverged(): number {
    return this.warm.unconverged;
  }
  evaluations = 0;

  constructor(panel: Panel) {
    ({ periods: this.periods, obligors: this.obligors, defaults: this.defaults, logChoose: this.logChoose } = panelArrays(panel, 'LogitNormalLikelihood'));
    this.warm = new PeriodWarmStarts(this.periods);
  }

  /** Log-likelihood at (mu, sigma). */
  logLik(mu: number, sigma: number): number {
    return this.evaluate(mu, sigma, false).value;
  }

  /** Log-likelihood with its gradient and Hessian in (mu, sigma) (module comment of LOGIT_NORMAL_MOMENTS). */
  logLikFull(mu: number, sigma: number): { value: number; gradient: [number, number]; hessian: [[number, number], [number, number]] } {
    const r = this.evaluate(mu, sigma, true);
    return { value: r.value, gradient: [r.g0, r.g1], hessian: [[r.h00, r.h01], [r.h01, r.h11]] };
  }

  private evaluate(mu: number, sigma: number, derivatives: boolean): { value: number; g0: number; g1: number; h00: number; h01: number; h11: number } {
    if (!Number.isFinite(mu)) throw new RangeError(`logit-normal log-likelihood: mu must be finite; got ${mu}.`);
    if (!(sigma >= 0) || !Number.isFinite(sigma)) throw new RangeError(`logit-normal log-likelihood: sigma must be a finite number at or above 0; got ${sigma}.`);
    this.evaluations++;
    const f = this.integrand;
    f.setParameters(mu, sigma, derivatives);
    const M = this.integrator.moments;
    let value = 0;
    let g0 = 0;
    let g1 = 0;
    let h00 = 0;
    let h01 = 0;
    let h11 = 0;
    for (let t = 0; t < this.periods; t++) {
      f.setPeriod(this.obligors[t], this.defaults[t], this.logChoose[t]);
      const r = this.integrator.integrate(f, this.warm.optionsInto(t, this.options));
      this.warm.record(t, r, () => `logit-normal log-likelihood: the integral of period ${t + 1} (n = ${this.obligors[t]}, d = ${this.defaults[t]}) failed at mu = ${mu}, sigma = ${sigma}: ${r.reason}.`);
      value += r.value;
      if (derivatives) {
        const eu = M[0];
        const ev = M[2];
        g0 += f.rAtMode + eu;
        g1 += f.xrAtMode + ev;
        h00 += -M[5] + M[1] - eu * eu;
        h01 += -M[6] + M[4] - eu * ev;
        h11 += -M[7] + M[3] - ev * ev;
      }
    }
    return { value, g0, g1, h00, h01, h11 };
  }
}

/**
 * E[pi^m] of the logit-normal law, m = 1 or 2: the mean default rate and the joint default
 * probability of two obligors, Int s(mu + sigma x)^m phi(x) dx.
 *
 * Method: the integrand is log-concave (m log s(eta) is concave), integrated by the log-concave
 * integrator (relative error ~1e-12); sigma = 0 gives s(mu)^m.
 *
 * Special cases: m other than 1 or 2, mu not finite or sigma < 0 throw RangeError.
 *
 * @example logitNormalMoment(-4.5, 0.5, 1) // ~0.0123
 *
 * Reference: McNeil, Frey & Embrechts (2015), section 11.2.4.
 */
export function logitNormalMoment(mu: number, sigma: number, m: 1 | 2): number {
  if (m !== 1 && m !== 2) throw new RangeError(`logitNormalMoment: the order must be 1 or 2; got ${String(m)}.`);
  if (!Number.isFinite(mu) || !(sigma >= 0) || !Number.isFinite(sigma)) {
    throw new RangeError(`logitNormalMoment: mu must be finite and sigma a finite number at or above 0; got mu = ${mu}, sigma = ${sigma}.`);
  }
  if (sigma === 0) return logistic(mu) ** m;
  const integrand: LogConcaveIntegrand = {
    moments: 0,
    derivatives(x, out) {
      const eta = mu + sigma * x;
      const sc = logistic(-eta);
      out[0] = m * logLogistic(eta) - 0.5 * x * x - LN_SQRT_2PI;
      out[1] = m * sigma * sc - x;
      out[2] = -m * sigma * sigma * sc * logistic(eta) - 1;
    },
    node(x) {
      return m * logLogistic(mu + sigma * x) - 0.5 * x * x - LN_SQRT_2PI;
    },
  };
  const r = new LogConcaveIntegrator(0).integrate(integrand, { curvatureBound: 1 });
  if (!Number.isFinite(r.value)) throw new RangeError(`logitNormalMoment: the integral failed at mu = ${mu}, sigma = ${sigma}: ${r.reason}.`);
  return Math.exp(r.value);
}

/**
 * Quantile of the logit-normal default rate: s(mu + sigma Phi^-1(q)) (monotone in Z).
 *
 * @example logitNormalRateQuantile(0.999, -4.5, 0.5, normalQuantile) // s(-4.5 + 0.5 * 3.0902)
 */
export function logitNormalRateQuantile(zq: number, mu: number, sigma: number): number {
  return logistic(mu + sigma * zq);
}
