/**
 * The likelihood of a group of rating grades whose defaults share one systematic factor per year
 * (Gordy & Heitfield 2002), with its gradient and Hessian in the per-grade parameters
 * (c_g, a_g): the evaluator the grade model (grade-model.ts) maximises and profiles.
 *
 *   l = sum_t log Int prod_g C(n_gt, d_gt) Phi(z_g)^d_gt Phi(-z_g)^(n_gt - d_gt) phi(x) dx,
 *   z_g = c_g - a_g x,  c_g = Phi^-1(p_g) / sqrt(1 - rho_g),  a_g = sqrt(rho_g / (1 - rho_g)).
 *
 * Method: each year's integral is the grade integrand (grade-mixing.ts) integrated by the
 * mode-bracketed adaptive Gauss-Kronrod rule (log-concave-integral.ts), with per-year warm starts.
 * Derivatives are posterior moments at the same nodes: d l = sum_t E[dS], d^2 l = sum_t (E[d^2 S] +
 * Cov(dS, dS)), S the year's log-integrand (exact, as for the single segment in
 * mixture-likelihood.ts). With one grade the value is the binomial-mixture likelihood of
 * mixture-likelihood.ts at rho = a^2 / (1 + a^2), k = c / sqrt(1 + a^2).
 *
 * a_g = 0 is rho_g = 0 (the integrand is then the normal density times constants); a_g is any
 * real here (the likelihood depends on the signs of the a_g only jointly with x): the grade model
 * keeps them at or above 0.
 *
 * Reference: Gordy, M. B. & Heitfield, E. (2002), "Estimating default correlations from short
 * panels of credit rating performance data", Federal Reserve Board working paper, section 3.
 */
import { GradeYearIntegrand, gradeMoments } from './grade-mixing';
import type { IntegrationReport } from './mixture-likelihood';
import { logBinomialCoefficient } from './log-binomial';
import { LogConcaveIntegrator, type LogConcaveOptions } from './log-concave-integral';
import { PeriodWarmStarts } from './period-warm-starts';
import { assertPanel, type Panel } from './panel';

/** Value, gradient and Hessian (row-major, P x P, P = 2G in the order c_1, a_1, ..., c_G, a_G). */
export interface GradeLogLik {
  value: number;
  gradient: Float64Array;
  hessian: Float64Array;
}

/**
 * Evaluates the group log-likelihood at many parameter values, keeping per-year warm starts.
 * The grades' panels must cover the same years in the same order (the grade model checks that
 * and names the missing years).
 *
 * @example
 * const L = new GradeLikelihood([{ obligors: [1000, 1000], defaults: [5, 9] }, { obligors: [500, 520], defaults: [8, 15] }]);
 * L.evaluate([-2.4, -2.1], [0.3, 0.3], false).value
 */
export class GradeLikelihood {
  readonly grades: number;
  readonly years: number;
  /** obligors[t * G + g], defaults[t * G + g]. */
  readonly obligors: Float64Array;
  readonly defaults: Float64Array;
  private readonly logChoose: Float64Array;
  private readonly warm: PeriodWarmStarts;
  /** The integrator's options, refilled per period by optionsInto (no object per integral). */
  private readonly options: LogConcaveOptions = { curvatureBound: 1 };
  private readonly integrand: GradeYearIntegrand;
  private readonly integrator: LogConcaveIntegrator;
  evaluations = 0;
  /** Period integrals that missed the tolerance of the adaptive rule (their finite values are used). */
  get unconverged(): number {
    return this.warm.unconverged;
  }

  constructor(panels: readonly Panel[]) {
    if (!Array.isArray(panels) || panels.length === 0) throw new RangeError('GradeLikelihood: give at least one grade.');
    panels.forEach((p, g) => assertPanel(p, `GradeLikelihood (grade ${g + 1})`));
    const T = panels[0].obligors.length;
    panels.forEach((p, g) => {
      if (p.obligors.length !== T) {
        throw new RangeError(`GradeLikelihood: grade ${g + 1} has ${p.obligors.length} years but grade 1 has ${T}; every grade needs the same years.`);
      }
    });
    const G = panels.length;
    this.grades = G;
    this.years = T;
    this.obligors = new Float64Array(T * G);
    this.defaults = new Float64Array(T * G);
    this.logChoose = new Float64Array(T * G);
    for (let t = 0; t < T; t++) {
      for (let g = 0; g < G; g++) {
        const n = panels[g].obligors[t];
        const d = panels[g].defaults[t];
        this.obligors[t * G + g] = n;
        this.defaults[t * G + g] = d;
        this.logChoose[t * G + g] = logBinomialCoefficient(n, d);
      }
    }
    this.warm = new PeriodWarmStarts(T);
    this.integrand = new GradeYearIntegrand(G);
    this.integrator = new LogConcaveIntegrator(gradeMoments(G, true));
  }

  /** How the integrations went: evaluations, integrals above tolerance, worst error estimate. */
  report(): IntegrationReport {
    return { evaluations: this.evaluations, unconverged: this.warm.unconverged, worstRelativeError: this.warm.worstRelativeError };
  }

  /**
   * log-likelihood at (c, a) and, when `withDerivatives`, its gradient and Hessian in
   * (c_1, a_1, ..., c_G, a_G). Throws RangeError naming the year when an integral fails.
   */
  evaluate(c: ArrayLike<number>, a: ArrayLike<number>, withDerivatives: boolean): GradeLogLik {
    const G = this.grades;
    for (let g = 0; g < G; g++) {
      if (!Number.isFinite(c[g]) || !Number.isFinite(a[g])) {
        throw new RangeError(`grade log-likelihood: the parameters of grade ${g + 1} must be finite; got c = ${c[g]}, a = ${a[g]}.`);
      }
    }
    this.evaluations++;
    const P = 2 * G;
    const gradient = new Float64Array(withDerivatives ? P : 0);
    const hessian = new Float64Array(withDerivatives ? P * P : 0);
    const f = this.integrand;
    f.setParameters(c, a, withDerivatives);
    const M = this.integrator.moments;
    let value = 0;
    for (let t = 0; t < this.years; t++) {
      const o = t * G;
      f.setYear(this.obligors.subarray(o, o + G), this.defaults.subarray(o, o + G), this.logChoose.subarray(o, o + G));
      const r = this.integrator.integrate(f, this.warm.optionsInto(t, this.options));
      this.warm.record(t, r, () => `grade log-likelihood: the integral of year ${t + 1} failed: ${r.reason}.`);
      value += r.value;
      if (!withDerivatives) continue;
      const fm = f.fAtMode;
      for (let j = 0; j < P; j++) gradient[j] += fm[j] + M[j];
      let at = P;
      for (let i = 0; i < P; i++) {
        for (let j = i; j < P; j++) {
          const cov = M[at++] - M[i] * M[j];
          hessian[i * P + j] += cov;
          if (j !== i) hessian[j * P + i] += cov;
        }
      }
      for (let g = 0; g < G; g++) {
        const cc = M[at++];
        const ca = M[at++];
        const aa = M[at++];
        const ic = 2 * g;
        const ia = 2 * g + 1;
        hessian[ic * P + ic] += cc;
        hessian[ic * P + ia] += ca;
        hessian[ia * P + ic] += ca;
        hessian[ia * P + ia] += aa;
      }
    }
    if (!Number.isFinite(value)) throw new RangeError('grade log-likelihood: the value is not finite.');
    return { value, gradient, hessian };
  }
}
