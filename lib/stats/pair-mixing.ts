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
import type { LogConcaveIntegrand } from './log-concave-integral';
import { normalTails, TAIL_SLOTS } from './normal-tails';
import { InnerLogIntegralTable } from './pair-inner-table';

const LN_SQRT_2PI = 0.9189385332046727418;

/** Moment functions of the outer integrand. */
export const PAIR_MOMENTS = 3;

/** Node spacing of the inner table, in standard deviations of the outer integrand at its first point. */
export const TABLE_SPACING = 2;
/** Smallest node spacing in c, as a fraction of the inner scale a' (the whole outer range fits one cell when r is near 0). */
const MIN_SPACING = 0.02;

/**
 * One year of a pair of segments with correlated factors, at |r| < 1, as the outer integrand over
 * z1 (module comment). Set the margins with {@link setMargins}, r with {@link setCorrelation} and
 * the year with {@link setYear}. It owns the inner integrals: exact ones, or (after
 * {@link useTable}) a table of them along the line c = c_B - a_B r z1 (pair-inner-table.ts),
 * laid at the first point the outer integrator asks for with a spacing of {@link TABLE_SPACING}
 * standard deviations of the outer integrand there, and checked after the integral by
 * {@link checkTable}.
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
  private readonly inner = new InnerLogIntegralTable();
  private tabulate = false;
  private readonly tails = new Float64Array(TAIL_SLOTS);
  /** h1_A and E[h1_B | z1] at the mode (set by prepare). */
  hAAtMode = 0;
  hBAtMode = 0;
  // Psi, Psi', Psi'' of the inner integral at the last z1 (pair-inner-table.ts).
  private readonly psi = new Float64Array(3);

  /** The two margins: c = Phi^-1(p) / sqrt(1 - rho) and a = sqrt(rho / (1 - rho)) of A and of B. */
  setMargins(cA: number, aA: number, cB: number, aB: number): void {
    this.cA = cA;
    this.aA = aA;
    this.cB = cB;
    this.aB = aB;
  }

  /** The factor correlation, |r| < 1 (after {@link setMargins}). */
  setCorrelation(r: number): void {
    this.r = r;
    this.s = Math.sqrt((1 - r) * (1 + r));
    this.inner.setScale(this.aB * this.s);
  }

  /** The year: A's and B's obligors, defaults and log C(n, d). */
  setYear(nA: number, dA: number, logCA: number, nB: number, dB: number, logCB: number): void {
    this.nA = nA;
    this.dA = dA;
    this.logCA = logCA;
    this.inner.setYear(nB, dB, logCB);
  }

  /** Whether the inner integrals come from a table (true) or are each computed exactly; clears the table. */
  useTable(on: boolean): void {
    this.tabulate = on;
    this.inner.clear();
  }

  /** Inner integrals computed exactly, that missed their tolerance, and the last failure. */
  get innerExact(): number {
    return this.inner.exactIntegrals;
  }
  get innerUnconverged(): number {
    return this.inner.unconverged;
  }

  /**
   * The table's interpolation error near z1 (the outer mode): the larger at the midpoints of the
   * cell holding z1 and of its neighbour nearer to z1 (two exact integrals).
   */
  checkTable(z1: number): number {
    return this.inner.checkNear(this.cB - this.aB * this.r * z1);
  }

  /** Halves the table's node spacing (the nodes integrated so far are kept). */
  refineTable(): void {
    this.inner.refine();
  }

  /** The inner integral at z1 into psi; curvA = -(d^2/dz1^2) log f_A(z1) lays the table's grid at the first call. */
  private integrateInner(z1: number, curvA: number): void {
    const c = this.cB - this.aB * this.r * z1;
    const psi = this.psi;
    if (!this.tabulate) {
      this.inner.exact(c, psi);
      return;
    }
    if (this.inner.started) {
      this.inner.interpolate(c, psi);
      return;
    }
    this.inner.exact(c, psi);
    if (!Number.isFinite(psi[0])) return;
    const slope = this.aB * Math.abs(this.r);
    const curvature = curvA + 1 - slope * slope * psi[2];
    const sd = 1 / Math.sqrt(Math.max(1, curvature));
    this.inner.start(c, Math.max(TABLE_SPACING * sd * slope, MIN_SPACING * this.aB * this.s), psi);
  }

  guess(): number {
    return 0;
  }

  derivatives(x: number, out: Float64Array): void {
    const T = this.tails;
    normalTails(this.cA - this.aA * x, T);
    const dA = this.dA;
    const ndA = this.nA - dA;
    const aA = this.aA;
    const curvA = aA * aA * (dA * T[4] + ndA * T[5]);
    this.integrateInner(x, curvA);
    const psi = this.psi;
    const aBr = this.aB * this.r;
    out[0] = this.logCA - LN_SQRT_2PI + dA * T[0] + ndA * T[1] - 0.5 * x * x + psi[0];
    out[1] = -aA * (dA * T[2] - ndA * T[3]) - x - aBr * psi[1];
    out[2] = -curvA - 1 + aBr * aBr * psi[2];
  }

  prepare(mode: number): void {
    const T = this.tails;
    normalTails(this.cA - this.aA * mode, T);
    this.hAAtMode = this.dA * T[2] - (this.nA - this.dA) * T[3];
    this.integrateInner(mode, this.aA * this.aA * (this.dA * T[4] + (this.nA - this.dA) * T[5]));
    this.hBAtMode = this.psi[1];
  }

  node(x: number, row: Float64Array): number {
    const T = this.tails;
    normalTails(this.cA - this.aA * x, T);
    const dA = this.dA;
    const ndA = this.nA - dA;
    this.integrateInner(x, this.aA * this.aA * (dA * T[4] + ndA * T[5]));
    const psi = this.psi;
    const u = dA * T[2] - ndA * T[3] - this.hAAtMode;
    const v = psi[1] - this.hBAtMode;
    row[0] = u;
    row[1] = v;
    row[2] = u * v;
    return this.logCA - LN_SQRT_2PI + dA * T[0] + ndA * T[1] - 0.5 * x * x + psi[0];
  }
}
