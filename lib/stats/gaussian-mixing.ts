/**
 * The Gaussian mixing law (Vasicek one-factor model, Gaussian copula) of one period, as an
 * integrand of the log-concave integrator (log-concave-integral.ts).
 *
 * Given the standard normal factor x, the default count of a period with n obligors is
 * Binomial(n, P(x)) with the conditional PD
 *
 *   P(x) = Phi(z(x)),  z(x) = (k - sqrt(rho) x) / sqrt(1 - rho) = c - a x,
 *   c = k / sqrt(1 - rho),  a = sqrt(rho / (1 - rho)),  k = Phi^-1(p),
 *
 * so the log of the integrand of the period's likelihood is
 *
 *   g(x) = log C(n, d) + d log Phi(z) + (n - d) log Phi(-z) - x^2 / 2 - log sqrt(2 pi),
 *
 * strictly concave with g'' <= -1 (log Phi is concave and z is linear in x): curvature bound 1.
 * The moment functions give the derivatives of log L in (k, rho) as posterior moments (see
 * MixtureLikelihood): with h1 = d lambda(z) - (n - d) lambda(-z) and h2 = -(d w(z) + (n - d) w(-z))
 * the first two z-derivatives of G(z) = d log Phi(z) + (n - d) log Phi(-z),
 *   order 1: m = [u, u^2, h2] with u = h1 - h1(mode);
 *   order 2: also [v, v^2, u v, G_k,rho, G_rho,rho] with v = G_rho - G_rho(mode),
 * centred at the mode so that the variances computed from them do not cancel.
 *
 * Reference: Vasicek, O. (2002), "The distribution of loan portfolio value", Risk 15(12), eq. (1)
 * (the conditional PD); Gordy, M. B. & Heitfield, E. (2002), "Estimating default correlations
 * from short panels of credit rating performance data", Federal Reserve Board working paper,
 * eq. (4) (the likelihood).
 */
import type { LogConcaveIntegrand } from './log-concave-integral';
import { normalQuantile } from './normal';
import { normalTails, TAIL_SLOTS } from './normal-tails';

const LN_SQRT_2PI = 0.9189385332046727418;

/** Derivative order of the moments: 0 none, 1 for the k-derivatives, 2 for gradient and Hessian in (k, rho). */
export type DerivativeOrder = 0 | 1 | 2;

/** Number of moment functions at each derivative order. */
export const GAUSSIAN_MOMENTS: Readonly<Record<DerivativeOrder, number>> = { 0: 0, 1: 3, 2: 8 };

/**
 * One period of the Gaussian binomial mixture at one (k, rho), rho in (0, 1), as an integrand over
 * the factor x. Set the parameters with {@link setParameters} and the period with
 * {@link setPeriod}; reuse the object (it allocates nothing per call).
 *
 * @example
 * const f = new GaussianPeriodIntegrand();
 * f.setParameters(normalQuantile(0.01), 0.12, 0);
 * f.setPeriod(200000, 2000, logBinomialCoefficient(200000, 2000));
 * new LogConcaveIntegrator(8).integrate(f, { curvatureBound: 1 }).value // -8.590523837...
 */
export class GaussianPeriodIntegrand implements LogConcaveIntegrand {
  moments = 0;
  private n = 1;
  private d = 0;
  private nd = 1;
  private logC = 0;
  private c = 0;
  private a = 1;
  private order: DerivativeOrder = 0;
  // dz/drho = -x zx + z zz; d2z/drho2 = x zxx + (dz/drho) zz + z zz2; dz/dk = zk; d2z/dk drho = zkr.
  private zx = 0;
  private zz = 0;
  private zxx = 0;
  private zz2 = 0;
  /** dz/dk = 1 / sqrt(1 - rho). */
  zk = 1;
  private zkr = 0;
  /** h1 and G_rho at the mode (set by prepare). */
  h1AtMode = 0;
  grAtMode = 0;
  private readonly tails = new Float64Array(TAIL_SLOTS);

  /** Sets (k, rho), 0 < rho < 1, and the derivative order of the moments. */
  setParameters(k: number, rho: number, order: DerivativeOrder): void {
    const s = Math.sqrt(rho);
    const s1 = Math.sqrt(1 - rho);
    this.c = k / s1;
    this.a = s / s1;
    this.order = order;
    this.moments = GAUSSIAN_MOMENTS[order];
    this.zx = 1 / (2 * s * s1);
    this.zz = 1 / (2 * (1 - rho));
    this.zxx = (1 - 2 * rho) / (4 * rho * (1 - rho) * s * s1);
    this.zz2 = 1 / (2 * (1 - rho) * (1 - rho));
    this.zk = 1 / s1;
    this.zkr = this.zk * this.zz;
  }

  /** Sets the period: n obligors, d defaults, logC = log C(n, d). */
  setPeriod(n: number, d: number, logC: number): void {
    this.n = n;
    this.d = d;
    this.nd = n - d;
    this.logC = logC;
  }

  /** The factor at which P(x) equals the observed rate (a fresh start for the mode), else 0. */
  guess(): number {
    if (this.d > 0 && this.d < this.n) {
      const x = (this.c - normalQuantile(this.d / this.n)) / this.a;
      if (Number.isFinite(x)) return x;
    }
    return 0;
  }

  derivatives(x: number, out: Float64Array): void {
    const T = this.tails;
    const z = this.c - this.a * x;
    normalTails(z, T);
    const d = this.d;
    const nd = this.nd;
    out[0] = this.logC - LN_SQRT_2PI + d * T[0] + nd * T[1] - 0.5 * x * x;
    out[1] = -this.a * (d * T[2] - nd * T[3]) - x;
    out[2] = -this.a * this.a * (d * T[4] + nd * T[5]) - 1;
  }

  prepare(mode: number): void {
    const T = this.tails;
    const z = this.c - this.a * mode;
    normalTails(z, T);
    const h1 = this.d * T[2] - this.nd * T[3];
    this.h1AtMode = h1;
    this.grAtMode = h1 * (-mode * this.zx + z * this.zz);
  }

  node(x: number, row: Float64Array): number {
    const T = this.tails;
    const z = this.c - this.a * x;
    normalTails(z, T);
    const d = this.d;
    const nd = this.nd;
    const order = this.order;
    if (order > 0) {
      const h1 = d * T[2] - nd * T[3];
      const h2 = -(d * T[4] + nd * T[5]);
      const u = h1 - this.h1AtMode;
      row[0] = u;
      row[1] = u * u;
      row[2] = h2;
      if (order > 1) {
        const zr = -x * this.zx + z * this.zz;
        const zrr = x * this.zxx + zr * this.zz + z * this.zz2;
        const v = h1 * zr - this.grAtMode;
        row[3] = v;
        row[4] = v * v;
        row[5] = u * v;
        row[6] = h2 * zr * this.zk + h1 * this.zkr;
        row[7] = h2 * zr * zr + h1 * zrr;
      }
    }
    return this.logC - LN_SQRT_2PI + d * T[0] + nd * T[1] - 0.5 * x * x;
  }
}
