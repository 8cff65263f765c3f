/**
 * The grade model with grade-specific correlations under the common factor: grade g has its own
 * PD p_g and its own rho_g, every grade's defaults still driven by the one factor of the year
 * (Gordy & Heitfield 2002). Its maximum is the alternative of the likelihood-ratio test of one
 * common rho (grade-fit.ts).
 */
import { GradeLikelihood } from './grade-likelihood';
import { A_SEARCH_LIMIT, aOfRho, rhoOfA, type CommonRhoFit } from './grade-model';
import { newtonMaximize } from './newton-maximize';
import { normalCdf } from './normal';

/** Result of {@link fitGradeSpecificRho}. */
export interface GradeSpecificFit {
  rhos: number[];
  pds: number[];
  logLik: number;
  converged: boolean;
}

/**
 * Maximum likelihood of the grade-specific model: maximises the group log-likelihood over
 * (c_g, a_g), g = 1..G (grade-likelihood.ts), with 0 <= a_g <= a(0.995), starting from the
 * common-rho maximum (so the value is never below it: the models are nested).
 *
 * Method: Newton's method with the exact Hessian, bounds by an active set (newton-maximize.ts).
 * At a common maximum at rho = 0 the start is rho_g = 0.02 for every grade, off the stationary
 * point a = 0. rho_g = a_g^2 / (1 + a_g^2), p_g = Phi(c_g / sqrt(1 + a_g^2)).
 *
 * Special cases: when Newton's result falls below the common fit's value (it cannot at a true
 * maximum) the common fit is returned with converged = false.
 *
 * @example fitGradeSpecificRho(model.likelihood, model.maximise())
 *
 * Reference: Gordy & Heitfield (2002), section 3 (grade-specific factor loadings).
 */
export function fitGradeSpecificRho(likelihood: GradeLikelihood, common: CommonRhoFit): GradeSpecificFit {
  const G = likelihood.grades;
  const a0 = aOfRho(Math.max(common.rho, 0.02));
  const q = Math.sqrt(1 + a0 * a0);
  const start: number[] = [];
  const lower: number[] = [];
  const upper: number[] = [];
  for (let g = 0; g < G; g++) {
    start.push(common.k[g] * q, a0);
    lower.push(-Infinity, 0);
    upper.push(Infinity, A_SEARCH_LIMIT);
  }
  const c = new Float64Array(G);
  const a = new Float64Array(G);
  const r = newtonMaximize(
    (t) => {
      for (let g = 0; g < G; g++) {
        c[g] = t[2 * g];
        a[g] = t[2 * g + 1];
      }
      return likelihood.evaluate(c, a, true);
    },
    start,
    { lower, upper, maxStep: 1 },
  );
  if (r.value < common.logLik) {
    return { rhos: common.k.map(() => common.rho), pds: common.pds.slice(), logLik: common.logLik, converged: false };
  }
  const rhos: number[] = [];
  const pds: number[] = [];
  for (let g = 0; g < G; g++) {
    const ag = r.theta[2 * g + 1];
    rhos.push(rhoOfA(ag));
    pds.push(normalCdf(r.theta[2 * g] / Math.sqrt(1 + ag * ag)));
  }
  return { rhos, pds, logLik: r.value, converged: r.converged };
}
