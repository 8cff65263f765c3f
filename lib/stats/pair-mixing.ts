/**
 * Two segments whose systematic factors are correlated: one year of the pair as a nested
 * log-concave integral (log-concave-integral.ts), for the factor correlation r between segments.
 *
 * Segment A's factor z1 and segment B's factor z2 are standard normal with correlation r. Given
 * them, A's defaults are Binomial(n_A, Phi(c_A - a_A z1)) and B's Binomial(n_B, Phi(c_B - a_B z2))
 * (c = Phi^-1(p) / sqrt(1 - rho), a = sqrt(rho / (1 - rho)), each segment's own (p, rho)). With
 * z2 = r z1 + s w, s = sqrt(1 - r^2), w standard normal independent of z1, the year's likelihood is
 *
 *   L = Int f_A(z1) [ Int f_B(r z1 + s w) phi(w) dw ] phi(z1) dz1,
 *
 * f the conditional binomial likelihoods. The inner integral over w is the Gaussian mixing law of
 * one period (gaussian-mixing.ts) with c' = c_B - a_B r z1 and a' = a_B s, integrated by its own
 * LogConcaveIntegrator; the outer integrand g(z1) = log f_A(z1) + log(inner) - z1^2 / 2 - log
 * sqrt(2 pi) is log-concave (Prekopa 1973: the joint integrand is log-concave in (z1, w), and a
 * marginal of a log-concave function is log-concave), with
 *
 *   g'(z1) = -a_A h1_A - z1 - a_B r E[h1_B],  g''(z1) = a_A^2 h2_A - 1 + a_B^2 r^2 (E[h2_B] + Var h1_B) <= -1,
 *
 * E and Var over the inner integrand (its posterior moments), h1, h2 the z-derivatives of
 * d log Phi(z) + (n - d) log Phi(-z) (normal-tails.ts). Curvature bound 1 for both levels.
 *
 * The r-derivative (for the maximum and the interval) is a posterior moment by Plackett's identity
 * d phi2(x, y; r) / dr = d^2 phi2 / dx dy (Plackett 1954): integrating by parts twice,
 * d log L / dr = E[(log f_A)'(z1) (log f_B)'(z2)] = a_A a_B E[h1_A(z1) E[h1_B | z1]]. The outer
 * moments are u = h1_A - h1_A(mode), v = E[h1_B | z1] - E[h1_B | mode] and u v.
 *
 * References: Plackett, R. L. (1954), "A reduction formula for normal multivariate integrals",
 * Biometrika 41:351-360; Prekopa, A. (1973), Acta Sci. Math. 34:335-343; Gordy, M. B. &
 * Heitfield, E. (2002), Federal Reserve Board working paper, eq. (4) (each segment's likelihood).
 */
import { GaussianPeriodIntegrand, GAUSSIAN_MOMENTS } from './gaussian-mixing';
import { LogConcaveIntegrator, type LogConcaveIntegrand } from './log-concave-integral';
import { normalTails, TAIL_SLOTS } from './normal-tails';

const LN_SQRT_2PI = 0.9189385332046727418;

/** Moment functions of the outer integrand. */
export const PAIR_MOMENTS = 3;

/**
 * One year of a pair of segments with correlated factors, at |r| < 1, as the outer integrand over
 * z1 (module comment). Set the margins with {@link setMargins}, r with {@link setCorrelation} and
 * the year with {@link setYear}. It owns the inner integrator.
 *
 * @example
 * const f = new PairYearIntegrand();
 * f.setMargins(-2.4, 0.35, -2.1, 0.4); f.setCorrelation(0.6);
 * f.setYear(1000, 12, logBinomialCoefficient(1000, 12), 800, 20, logBinomialCoefficient(800, 20));
 * new LogConcaveIntegrator(3).integrate(f, { curvatureBound: 1 }).value
 */
export class PairYearIntegrand implements LogConcaveIntegrand {
  moments = PAIR_MOMENTS;
  private cA = 0;
  private aA = 0;
  private cB = 0;
  private aB = 0;
  private r = 0;
  private s = 1;
  private nA = 1;
  private dA = 0;
  private logCA = 0;
  private readonly inner = new GaussianPeriodIntegrand();
  private readonly innerIntegrator = new LogConcaveIntegrator(GAUSSIAN_MOMENTS[1]);
  private innerMode = Number.NaN;
  private innerLeft = 0;
  private innerRight = 0;
  private readonly tails = new Float64Array(TAIL_SLOTS);
  /** h1_A and E[h1_B | z1] at the mode (set by prepare). */
  hAAtMode = 0;
  hBAtMode = 0;
  /** Inner integrals that missed their tolerance (the values are used). */
  innerUnconverged = 0;
  // Results of the last inner integral: log value, E[h1_B], Var h1_B, E[h2_B].
  private iValue = 0;
  private iMean = 0;
  private iVar = 0;
  private iH2 = 0;

  /** The two margins: c = Phi^-1(p) / sqrt(1 - rho) and a = sqrt(rho / (1 - rho)) of A and of B. */
  setMargins(cA: number, aA: number, cB: number, aB: number): void {
    this.cA = cA;
    this.aA = aA;
    this.cB = cB;
    this.aB = aB;
  }

  /** The factor correlation, |r| < 1. */
  setCorrelation(r: number): void {
    this.r = r;
    this.s = Math.sqrt((1 - r) * (1 + r));
  }

  /** The year: A's and B's obligors, defaults and log C(n, d). */
  setYear(nA: number, dA: number, logCA: number, nB: number, dB: number, logCB: number): void {
    this.nA = nA;
    this.dA = dA;
    this.logCA = logCA;
    this.inner.setPeriod(nB, dB, logCB);
  }

  /** The inner integral over w at z1 (fills iValue, iMean, iVar, iH2). */
  private integrateInner(z1: number): void {
    const a = this.aB * this.s;
    const c = this.cB - this.aB * this.r * z1;
    const rho = (a * a) / (1 + a * a);
    this.inner.setParameters(c / Math.sqrt(1 + a * a), rho, 1);
    const res = this.innerIntegrator.integrate(
      this.inner,
      Number.isFinite(this.innerMode) ? { start: this.innerMode, leftWidth: this.innerLeft, rightWidth: this.innerRight, curvatureBound: 1 } : { curvatureBound: 1 },
    );
    if (!res.converged) {
      if (!Number.isFinite(res.value)) {
        this.innerMode = Number.NaN;
        // NaN makes the outer integral fail, which the evaluator reports with the year.
        this.iValue = Number.NaN;
        return;
      }
      this.innerUnconverged++;
    }
    this.innerMode = res.mode;
    this.innerLeft = res.leftWidth;
    this.innerRight = res.rightWidth;
    const M = this.innerIntegrator.moments;
    this.iValue = res.value;
    this.iMean = this.inner.h1AtMode + M[0];
    this.iVar = Math.max(0, M[1] - M[0] * M[0]);
    this.iH2 = M[2];
  }

  guess(): number {
    return 0;
  }

  derivatives(x: number, out: Float64Array): void {
    const T = this.tails;
    normalTails(this.cA - this.aA * x, T);
    const dA = this.dA;
    const ndA = this.nA - dA;
    this.integrateInner(x);
    const aBr = this.aB * this.r;
    out[0] = this.logCA - LN_SQRT_2PI + dA * T[0] + ndA * T[1] - 0.5 * x * x + this.iValue;
    out[1] = -this.aA * (dA * T[2] - ndA * T[3]) - x - aBr * this.iMean;
    out[2] = -this.aA * this.aA * (dA * T[4] + ndA * T[5]) - 1 + aBr * aBr * (this.iH2 + this.iVar);
  }

  prepare(mode: number): void {
    const T = this.tails;
    normalTails(this.cA - this.aA * mode, T);
    this.hAAtMode = this.dA * T[2] - (this.nA - this.dA) * T[3];
    this.integrateInner(mode);
    this.hBAtMode = this.iMean;
  }

  node(x: number, row: Float64Array): number {
    const T = this.tails;
    normalTails(this.cA - this.aA * x, T);
    const dA = this.dA;
    const ndA = this.nA - dA;
    this.integrateInner(x);
    const u = dA * T[2] - ndA * T[3] - this.hAAtMode;
    const v = this.iMean - this.hBAtMode;
    row[0] = u;
    row[1] = v;
    row[2] = u * v;
    return this.logCA - LN_SQRT_2PI + dA * T[0] + ndA * T[1] - 0.5 * x * x + this.iValue;
  }
}
