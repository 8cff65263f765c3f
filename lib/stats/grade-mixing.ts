/**
 * Rating grades that share one systematic factor (Gordy & Heitfield 2002): one year of a group of
 * grades as an integrand of the log-concave integrator (log-concave-integral.ts).
 *
 * Given the standard normal factor x of the year, grade g with n_g obligors and d_g defaults has
 * the conditional PD P_g(x) = Phi(z_g), z_g = c_g - a_g x, where c_g = k_g / sqrt(1 - rho_g),
 * a_g = sqrt(rho_g / (1 - rho_g)), k_g = Phi^-1(p_g). The year's likelihood is one integral over x
 * of the product over grades of Binomial(d_g | n_g, P_g(x)), so the log-integrand is
 *
 *   g(x) = sum_g [ log C(n_g, d_g) + d_g log Phi(z_g) + (n_g - d_g) log Phi(-z_g) ] - x^2 / 2 - log sqrt(2 pi),
 *
 * a sum of concave functions of linear functions of x minus x^2 / 2: strictly concave with
 * g'' <= -1 (curvature bound 1). With one grade it is the Gaussian mixing law's integrand
 * (gaussian-mixing.ts) term by term.
 *
 * Moments (for the derivatives of log L as posterior moments, see GradeLikelihood): in the
 * parameters (c_1, a_1, ..., c_G, a_G) the z-derivatives are dz_g/dc_g = 1 and dz_g/da_g = -x, and
 * every second derivative of z vanishes, so with h1_g = d_g lambda(z_g) - (n_g - d_g) lambda(-z_g)
 * and h2_g = -(d_g w(z_g) + (n_g - d_g) w(-z_g)) (normal-tails.ts) the score functions are
 * f_{2g} = h1_g, f_{2g+1} = -x h1_g and the second derivatives h2_g, -x h2_g, x^2 h2_g. The moment
 * row holds, in this order: u_j = f_j - f_j(mode) for j < P = 2G (centred at the mode so that
 * covariances do not cancel), the products u_i u_j for i <= j, and the 3G second-derivative terms.
 *
 * Reference: Gordy, M. B. & Heitfield, E. (2002), "Estimating default correlations from short
 * panels of credit rating performance data", Federal Reserve Board working paper, section 3 (grades
 * sharing one factor); Vasicek, O. (2002), "The distribution of loan portfolio value", Risk 15(12),
 * eq. (1) (the conditional PD).
 */
import type { LogConcaveIntegrand } from './log-concave-integral';
import { normalQuantile } from './normal';
import { normalTails, TAIL_SLOTS } from './normal-tails';

const LN_SQRT_2PI = 0.9189385332046727418;

/** Number of moment functions for G grades with derivatives (0 without). */
export function gradeMoments(grades: number, withDerivatives: boolean): number {
  if (!withDerivatives) return 0;
  const P = 2 * grades;
  return P + (P * (P + 1)) / 2 + 3 * grades;
}

/**
 * One year of G grades sharing the factor, at per-grade (c_g, a_g), as an integrand over x. Set
 * the parameters with {@link setParameters} and the year with {@link setYear}; reuse the object.
 *
 * @example
 * const f = new GradeYearIntegrand(2);
 * f.setParameters([-2.3, -2.0], [0.35, 0.35], false);
 * f.setYear([1000, 800], [12, 20], [logBinomialCoefficient(1000, 12), logBinomialCoefficient(800, 20)]);
 * new LogConcaveIntegrator(0).integrate(f, { curvatureBound: 1 }).value
 */
export class GradeYearIntegrand implements LogConcaveIntegrand {
  readonly grades: number;
  moments = 0;
  private readonly c: Float64Array;
  private readonly a: Float64Array;
  private readonly n: Float64Array;
  private readonly d: Float64Array;
  private readonly logC: Float64Array;
  private logCSum = 0;
  private withDerivatives = false;
  /** Score functions f_j at the mode (set by prepare). */
  readonly fAtMode: Float64Array;
  private readonly f: Float64Array;
  private readonly h2: Float64Array;
  private readonly tails = new Float64Array(TAIL_SLOTS);

  constructor(grades: number) {
    if (!Number.isInteger(grades) || grades < 1) throw new RangeError(`GradeYearIntegrand: the number of grades must be a whole number >= 1; got ${grades}.`);
    this.grades = grades;
    this.c = new Float64Array(grades);
    this.a = new Float64Array(grades);
    this.n = new Float64Array(grades);
    this.d = new Float64Array(grades);
    this.logC = new Float64Array(grades);
    this.fAtMode = new Float64Array(2 * grades);
    this.f = new Float64Array(2 * grades);
    this.h2 = new Float64Array(grades);
  }

  /** Sets c_g and a_g for every grade and whether the moments for the derivatives are wanted. */
  setParameters(c: ArrayLike<number>, a: ArrayLike<number>, withDerivatives: boolean): void {
    for (let g = 0; g < this.grades; g++) {
      this.c[g] = c[g];
      this.a[g] = a[g];
    }
    this.withDerivatives = withDerivatives;
    this.moments = gradeMoments(this.grades, withDerivatives);
  }

  /** Sets the year: obligors, defaults and log C(n, d) of each grade. */
  setYear(n: ArrayLike<number>, d: ArrayLike<number>, logC: ArrayLike<number>): void {
    let s = 0;
    for (let g = 0; g < this.grades; g++) {
      this.n[g] = n[g];
      this.d[g] = d[g];
      this.logC[g] = logC[g];
      s += logC[g];
    }
    this.logCSum = s;
  }

  /** The factor at which the most informative grade's P_g(x) equals its observed rate, else 0. */
  guess(): number {
    let best = -1;
    for (let g = 0; g < this.grades; g++) {
      if (this.d[g] > 0 && this.d[g] < this.n[g] && this.a[g] > 0 && (best < 0 || this.d[g] > this.d[best])) best = g;
    }
    if (best < 0) return 0;
    const x = (this.c[best] - normalQuantile(this.d[best] / this.n[best])) / this.a[best];
    return Number.isFinite(x) ? x : 0;
  }

  derivatives(x: number, out: Float64Array): void {
    const T = this.tails;
    let g0 = this.logCSum - LN_SQRT_2PI - 0.5 * x * x;
    let g1 = -x;
    let g2 = -1;
    for (let g = 0; g < this.grades; g++) {
      const a = this.a[g];
      normalTails(this.c[g] - a * x, T);
      const d = this.d[g];
      const nd = this.n[g] - d;
      g0 += d * T[0] + nd * T[1];
      g1 -= a * (d * T[2] - nd * T[3]);
      g2 -= a * a * (d * T[4] + nd * T[5]);
    }
    out[0] = g0;
    out[1] = g1;
    out[2] = g2;
  }

  private scores(x: number): number {
    const T = this.tails;
    let value = this.logCSum - LN_SQRT_2PI - 0.5 * x * x;
    for (let g = 0; g < this.grades; g++) {
      normalTails(this.c[g] - this.a[g] * x, T);
      const d = this.d[g];
      const nd = this.n[g] - d;
      value += d * T[0] + nd * T[1];
      const h1 = d * T[2] - nd * T[3];
      this.f[2 * g] = h1;
      this.f[2 * g + 1] = -x * h1;
      this.h2[g] = -(d * T[4] + nd * T[5]);
    }
    return value;
  }

  prepare(mode: number): void {
    if (!this.withDerivatives) return;
    this.scores(mode);
    this.fAtMode.set(this.f);
  }

  node(x: number, row: Float64Array): number {
    if (!this.withDerivatives) {
      const T = this.tails;
      let value = this.logCSum - LN_SQRT_2PI - 0.5 * x * x;
      for (let g = 0; g < this.grades; g++) {
        normalTails(this.c[g] - this.a[g] * x, T);
        value += this.d[g] * T[0] + (this.n[g] - this.d[g]) * T[1];
      }
      return value;
    }
    const value = this.scores(x);
    const P = 2 * this.grades;
    const f = this.f;
    const m = this.fAtMode;
    for (let j = 0; j < P; j++) row[j] = f[j] - m[j];
    let at = P;
    for (let i = 0; i < P; i++) {
      const ui = row[i];
      for (let j = i; j < P; j++) row[at++] = ui * row[j];
    }
    for (let g = 0; g < this.grades; g++) {
      const h2 = this.h2[g];
      row[at++] = h2;
      row[at++] = -x * h2;
      row[at++] = x * x * h2;
    }
    return value;
  }
}
