/**
 * The probability integral transform (PIT) of a default count under the fitted binomial
 * mixture: the granular PIT of the fit review, in its mid-point form for a discrete variable.
 */
import { logBinomialCoefficient } from './log-binomial';
import { LogConcaveIntegrator, type LogConcaveIntegrand } from './log-concave-integral';
import { MixtureLikelihood } from './mixture-likelihood';
import { normalQuantile } from './normal';
import { normalTails, TAIL_SLOTS } from './normal-tails';

const LN_SQRT_2PI = 0.9189385332046727418;

/**
 * Integrand of P(D <= d - 1) in y = Phi^-1(b) (see {@link countMidPit}):
 * g(y) = log d + log C(n, d) + (d - 1) log Phi(y) + (n - d) log Phi(-y) - y^2/2 - log sqrt(2 pi)
 *        + log Phi((sqrt(1 - rho) y - k) / sqrt(rho))   (the last term only for rho > 0).
 * Every term is concave and the normal one has curvature -1, so g'' <= -1.
 */
class LowerTailIntegrand implements LogConcaveIntegrand {
  readonly moments = 0;
  private readonly t = new Float64Array(TAIL_SLOTS);
  private readonly w = new Float64Array(TAIL_SLOTS);
  constructor(
    private readonly n: number,
    private readonly d: number,
    private readonly k: number,
    private readonly rho: number,
    private readonly constant: number,
  ) {}

  guess(): number {
    return normalQuantile(this.d / (this.n + 1));
  }

  derivatives(y: number, out: Float64Array): void {
    const T = this.t;
    normalTails(y, T);
    const dm1 = this.d - 1;
    const nd = this.n - this.d;
    let g = this.constant + dm1 * T[0] + nd * T[1] - 0.5 * y * y;
    let g1 = dm1 * T[2] - nd * T[3] - y;
    let g2 = -dm1 * T[4] - nd * T[5] - 1;
    if (this.rho > 0) {
      const s = Math.sqrt(this.rho);
      const alpha = Math.sqrt(1 - this.rho) / s;
      const W = this.w;
      normalTails(alpha * y - this.k / s, W);
      g += W[0];
      g1 += alpha * W[2];
      g2 -= alpha * alpha * W[4];
    }
    out[0] = g;
    out[1] = g1;
    out[2] = g2;
  }

  node(y: number): number {
    this.derivatives(y, this.scratch);
    return this.scratch[0];
  }

  private readonly scratch = new Float64Array(3);
}

/**
 * Mid-point probability integral transform of d defaults among n obligors under the binomial
 * mixture (Vasicek one-factor model) at (p, rho):
 *
 *   u = P(D < d) + P(D = d) / 2,   D | x ~ Binomial(n, P(x)),  x ~ N(0, 1),
 *   P(x) = Phi((Phi^-1(p) - sqrt(rho) x) / sqrt(1 - rho)).
 *
 * Under the model u has mean 1/2 and is close to uniform for large n; for a zero-default year of a
 * small cohort it is P(D = 0) / 2, not 0 as the infinitely granular Vasicek CDF would give.
 *
 * Method: P(D = d) by the mixture likelihood (mixture-likelihood.ts). P(D <= d - 1) by the
 * order-statistic identity P(Binomial(n, pi) <= d - 1) = P(B > pi), B ~ Beta(d, n - d + 1), which
 * gives P(D <= d - 1) = E[F(B)] with F the Vasicek default-rate CDF; in y = Phi^-1(b) its integrand
 * d C(n, d) Phi(y)^(d-1) Phi(-y)^(n-d) phi(y) Phi((sqrt(1 - rho) y - k) / sqrt(rho)) is
 * log-concave, so the integral is one call of the log-concave integrator (relative tolerance
 * 1e-8). At rho = 0 F is a step at y = k and the integral runs over y > k (the binomial CDF).
 *
 * Special cases: d = 0 gives P(D = 0) / 2. p outside (0, 1), rho outside [0, 1) or counts that are
 * not whole numbers with 0 <= d <= n throw RangeError; an integral that does not converge throws
 * RangeError with the reason.
 *
 * @example countMidPit(500, 0, 0.005, 0.1) // P(D = 0) / 2 = 0.0603...
 *
 * Reference: Czado, C., Gneiting, T. & Held, L. (2009), "Predictive model assessment for count
 * data", Biometrics 65:1254-1261 (the randomised and mid-point PIT of a discrete variable);
 * Heinen, A. & Rengifo, E. (2007), J. Empirical Finance 14:564-583 (mid-PIT); Johnson, N. L.,
 * Kemp, A. W. & Kotz, S. (2005), Univariate Discrete Distributions, eq. 3.9 (binomial CDF as an
 * incomplete beta function).
 */
export function countMidPit(n: number, d: number, p: number, rho: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`countMidPit: p must be strictly between 0 and 1; got ${p}.`);
  if (!(rho >= 0 && rho < 1)) throw new RangeError(`countMidPit: rho must be in [0, 1); got ${rho}.`);
  const likelihood = new MixtureLikelihood({ obligors: [n], defaults: [d] }); // checks the counts
  const k = normalQuantile(p);
  const atD = Math.exp(likelihood.logLik(k, rho));
  return lowerTail(n, d, k, rho, new LogConcaveIntegrator(0)) + 0.5 * atD;
}

/** P(D <= d - 1) of the mixture (0 for d = 0); see countMidPit. */
function lowerTail(n: number, d: number, k: number, rho: number, integrator: LogConcaveIntegrator): number {
  if (d === 0) return 0;
  const constant = Math.log(d) + logBinomialCoefficient(n, d) - LN_SQRT_2PI;
  const f = new LowerTailIntegrand(n, d, k, rho, constant);
  const r = integrator.integrate(f, rho === 0 ? { curvatureBound: 1, lower: k } : { curvatureBound: 1 });
  if (!r.converged) {
    throw new RangeError(`countMidPit: the probability of fewer than ${d} defaults among ${n} did not converge: ${r.reason}.`);
  }
  return Math.min(1, Math.exp(r.value));
}

/**
 * Mid-point PIT of every period of a panel under the binomial mixture at (p, rho): countMidPit for
 * each (n_t, d_t), sharing one evaluator and integrator.
 *
 * @example panelMidPit({ obligors: [500, 500], defaults: [0, 4] }, 0.005, 0.1) // [0.060..., 0.86...]
 *
 * Reference: Czado, Gneiting & Held (2009).
 */
export function panelMidPit(panel: { obligors: readonly number[]; defaults: readonly number[] }, p: number, rho: number): number[] {
  if (!(p > 0 && p < 1)) throw new RangeError(`panelMidPit: p must be strictly between 0 and 1; got ${p}.`);
  if (!(rho >= 0 && rho < 1)) throw new RangeError(`panelMidPit: rho must be in [0, 1); got ${rho}.`);
  const k = normalQuantile(p);
  const integrator = new LogConcaveIntegrator(0);
  return panel.obligors.map((n, t) => {
    const d = panel.defaults[t];
    const atD = Math.exp(new MixtureLikelihood({ obligors: [n], defaults: [d] }).logLik(k, rho));
    return lowerTail(n, d, k, rho, integrator) + 0.5 * atD;
  });
}
