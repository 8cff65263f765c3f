/**
 * The grade model with one common asset correlation (Gordy & Heitfield 2002): grades g = 1..G of
 * one portfolio share the systematic factor of each year; grade g has its own PD p_g and every
 * grade the same rho. Maximum likelihood with a profile-likelihood interval for rho and
 * profile-likelihood intervals for each grade's PD (rho and the other PDs re-maximised, DESIGN.md
 * "Grades").
 *
 * Parameters theta = (k_1, ..., k_G, a): k_g = Phi^-1(p_g), a = sqrt(rho / (1 - rho)) >= 0, so
 * c_g = k_g sqrt(1 + a^2) and a_g = a in grade-likelihood.ts. Gradient and Hessian in theta follow
 * from those in (c_g, a_g) by the chain rule (q = sqrt(1 + a^2), q' = a / q, q'' = 1 / q^3):
 *   l_kg = L_cg q;  l_a = L_a + q' sum_g k_g L_cg;
 *   l_kg,kh = q^2 L_cg,ch;  l_kg,a = q (L_cg,a + q' sum_h k_h L_cg,ch) + q' L_cg;
 *   l_aa = L_aa + 2 q' sum_g k_g L_cg,a + q'^2 sum_gh k_g k_h L_cg,ch + q'' sum_g k_g L_cg,
 * with L_a = sum_g L_ag, L_cg,a = sum_h L_cg,ah, L_aa = sum_gh L_ag,ah.
 *
 * Reference: Gordy, M. B. & Heitfield, E. (2002), "Estimating default correlations from short
 * panels of credit rating performance data", Federal Reserve Board working paper, section 3;
 * Venzon, D. J. & Moolgavkar, S. H. (1988), "A method for computing profile-likelihood-based
 * confidence intervals", Applied Statistics 37:87-94.
 */
import { RHO_GRID, RHO_SEARCH_LIMIT } from './estimators/binomial-mle';
import { GradeLikelihood } from './grade-likelihood';
import { chiSquare1Quantile } from './intervals/profile';
import { invertPositiveDefinite, newtonMaximize, type SmoothValue } from './newton-maximize';
import { normalCdf, normalQuantile } from './normal';
import type { Panel } from './panel';
import { safeguardedNewtonRoot } from './safeguarded-newton';

/** a = sqrt(rho / (1 - rho)) at the search limit of rho. */
export const A_SEARCH_LIMIT = Math.sqrt(RHO_SEARCH_LIMIT / (1 - RHO_SEARCH_LIMIT));

/** rho from a = sqrt(rho / (1 - rho)). */
export function rhoOfA(a: number): number {
  return (a * a) / (1 + a * a);
}

/** a = sqrt(rho / (1 - rho)) from rho in [0, 1). */
export function aOfRho(rho: number): number {
  return Math.sqrt(rho / (1 - rho));
}

/** The common-rho maximum of the grade model. */
export interface CommonRhoFit {
  rho: number;
  /** k_g = Phi^-1(p_g) and p_g per grade. */
  k: number[];
  pds: number[];
  logLik: number;
  /** The maximum is at rho = 0. */
  atBoundary: boolean;
  /** The maximum is at the search limit of rho. */
  atSearchLimit: boolean;
  converged: boolean;
}

/** One point of the profile of the common rho (the PDs re-maximised). */
export interface ProfilePoint {
  rho: number;
  logLik: number;
  k: number[];
  /** d l* / d rho; NaN only when `converged` is false. */
  slope: number;
  converged: boolean;
  evaluations: number;
}

/** A profile-likelihood interval. */
export interface LikelihoodInterval {
  level: number;
  lower: number;
  upper: number;
  converged: boolean;
}

/**
 * The common-rho grade model on one group's panels (same years, every grade with at least one
 * default and one survivor): likelihood in theta = (k, a), its maximum, the profile of rho and the
 * profiles of the grade PDs.
 */
export class CommonRhoGradeModel {
  readonly likelihood: GradeLikelihood;
  readonly grades: number;
  /** Warm starts of the profile in rho: (a, k*) pairs solved so far. */
  private readonly solved: { a: number; k: number[]; dkda: number[] }[] = [];
  private readonly cache = new Map<number, ProfilePoint>();
  private readonly pooledK: number[];
  /** Profile evaluations whose inner maximisation did not converge. */
  failures = 0;

  constructor(panels: readonly Panel[]) {
    this.likelihood = new GradeLikelihood(panels);
    this.grades = panels.length;
    this.pooledK = panels.map((p, g) => {
      const n = p.obligors.reduce((s, v) => s + v, 0);
      const d = p.defaults.reduce((s, v) => s + v, 0);
      if (d === 0 || d === n) {
        throw new RangeError(`CommonRhoGradeModel: grade ${g + 1} has ${d === 0 ? 'no defaults' : 'only defaults'}, so its PD has no maximum inside (0, 1).`);
      }
      return normalQuantile(d / n);
    });
  }

  /** log-likelihood with gradient and Hessian in theta = (k_1, ..., k_G, a). */
  evaluate(theta: readonly number[]): SmoothValue {
    const G = this.grades;
    const a = theta[G];
    const q = Math.sqrt(1 + a * a);
    const q1 = a / q;
    const q2 = 1 / (q * q * q);
    const c = new Float64Array(G);
    const av = new Float64Array(G).fill(a);
    for (let g = 0; g < G; g++) c[g] = theta[g] * q;
    const r = this.likelihood.evaluate(c, av, true);
    const P2 = 2 * G;
    const H = r.hessian;
    const Lc = (g: number) => r.gradient[2 * g];
    const Lcc = (g: number, h: number) => H[2 * g * P2 + 2 * h];
    let La = 0;
    let Laa = 0;
    const Lca = new Float64Array(G);
    for (let g = 0; g < G; g++) {
      La += r.gradient[2 * g + 1];
      for (let h = 0; h < G; h++) {
        Lca[g] += H[2 * g * P2 + 2 * h + 1];
        Laa += H[(2 * g + 1) * P2 + 2 * h + 1];
      }
    }
    const P = G + 1;
    const gradient = new Float64Array(P);
    const hessian = new Float64Array(P * P);
    let sumKLc = 0;
    let sumKLca = 0;
    let sumKKLcc = 0;
    for (let g = 0; g < G; g++) {
      gradient[g] = Lc(g) * q;
      sumKLc += theta[g] * Lc(g);
      sumKLca += theta[g] * Lca[g];
      let kLcc = 0;
      for (let h = 0; h < G; h++) {
        hessian[g * P + h] = q * q * Lcc(g, h);
        kLcc += theta[h] * Lcc(g, h);
        sumKKLcc += theta[g] * theta[h] * Lcc(g, h);
      }
      const ka = q * (Lca[g] + q1 * kLcc) + q1 * Lc(g);
      hessian[g * P + G] = ka;
      hessian[G * P + g] = ka;
    }
    gradient[G] = La + q1 * sumKLc;
    hessian[G * P + G] = Laa + 2 * q1 * sumKLca + q1 * q1 * sumKKLcc + q2 * sumKLc;
    return { value: r.value, gradient, hessian };
  }

  private startK(a: number): number[] {
    let best: { a: number; k: number[]; dkda: number[] } | null = null;
    for (const s of this.solved) if (!best || Math.abs(s.a - a) < Math.abs(best.a - a)) best = s;
    if (!best) return this.pooledK.slice();
    // Along the tangent of the path k*(a) (implicit function theorem), unless that jumps far.
    const predicted = best.k.map((k, g) => k + best.dkda[g] * (a - best.a));
    return predicted.every((k, g) => Number.isFinite(k) && Math.abs(k - best.k[g]) < 0.5) ? predicted : best.k.slice();
  }

  /**
   * max over the PDs at a fixed rho: the profile l*(rho), with the maximising k and the slope
   * d l* / d rho (envelope theorem: l_a at k* times da/drho = 1 / (2 a (1 - rho)^2); at rho = 0 the
   * slope in a is 0 by symmetry and the reported slope is l_aa / 2, the limit).
   *
   * Method: Newton in k with the exact Hessian (l is concave in k: Prekopa 1973), from the tangent
   * of the nearest solved point, step limit 1, halving when a step does not increase l. Converged
   * when the Newton step is below 1e-7 in every k; the value is then the Newton-extrapolated
   * maximum l - g.s / 2 and the slope l_a + H_ak s (errors of order step^3 and step^2), so a warm
   * point usually costs one or two evaluations.
   */
  profileAt(rho: number): ProfilePoint {
    if (!(rho >= 0 && rho <= RHO_SEARCH_LIMIT)) throw new RangeError(`CommonRhoGradeModel: rho must be in [0, ${RHO_SEARCH_LIMIT}]; got ${rho}.`);
    const cached = this.cache.get(rho);
    if (cached) return cached;
    const a = aOfRho(rho);
    const G = this.grades;
    const P = G + 1;
    let k = this.startK(a);
    let cur = this.evaluate([...k, a]);
    let evaluations = 1;
    for (let iteration = 1; iteration <= 60; iteration++) {
      const Hkk = new Float64Array(G * G);
      const g = new Float64Array(G);
      for (let i = 0; i < G; i++) {
        g[i] = cur.gradient[i];
        for (let j = 0; j < G; j++) Hkk[i * G + j] = -cur.hessian[i * P + j];
      }
      const inverse = invertPositiveDefinite(Hkk, G);
      if (!inverse) break;
      const step = new Float64Array(G);
      let longest = 0;
      for (let i = 0; i < G; i++) {
        for (let j = 0; j < G; j++) step[i] += inverse[i * G + j] * g[j];
        longest = Math.max(longest, Math.abs(step[i]));
      }
      if (longest <= 1e-7) {
        let gain = 0;
        let slopeA = cur.gradient[G];
        for (let i = 0; i < G; i++) {
          gain += g[i] * step[i];
          slopeA += cur.hessian[G * P + i] * step[i];
        }
        // dk*/da = (-H_kk)^-1 H_ka
        const dkda = new Array<number>(G).fill(0);
        for (let i = 0; i < G; i++) for (let j = 0; j < G; j++) dkda[i] += inverse[i * G + j] * cur.hessian[j * P + G];
        const kStar = k.map((v, i) => v + step[i]);
        // l_aa of the profile at a = 0: H_aa - H_ak (H_kk)^-1 H_ka (its a-slope vanishes there).
        let slopeRho: number;
        if (a === 0) {
          let c = cur.hessian[G * P + G];
          for (let i = 0; i < G; i++) c += cur.hessian[G * P + i] * dkda[i];
          slopeRho = c / 2;
        } else {
          slopeRho = slopeA / (2 * a * (1 - rho) * (1 - rho));
        }
        this.solved.push({ a, k: kStar, dkda });
        const point: ProfilePoint = { rho, logLik: cur.value + 0.5 * gain, k: kStar, slope: slopeRho, converged: true, evaluations };
        this.cache.set(rho, point);
        return point;
      }
      const factor = longest > 1 ? 1 / longest : 1;
      let next = k.map((v, i) => v + factor * step[i]);
      let trial = this.evaluate([...next, a]);
      evaluations++;
      let halvings = 0;
      while (!(trial.value >= cur.value - 1e-12 * Math.abs(cur.value)) && halvings < 40) {
        halvings++;
        next = k.map((v, i) => v + factor * 0.5 ** halvings * step[i]);
        trial = this.evaluate([...next, a]);
        evaluations++;
      }
      if (halvings === 40) break;
      k = next;
      cur = trial;
    }
    this.failures++;
    return { rho, logLik: cur.value, k, slope: Number.NaN, converged: false, evaluations };
  }

  /**
   * The common-rho maximum: the profile on the grid RHO_GRID (the same as binomialMle's), then
   * Newton in all of theta from the best grid point (a kept in [0, a(0.995)]); the estimate is
   * rho = 0 when no interior point beats the profile there.
   */
  maximise(): CommonRhoFit {
    const G = this.grades;
    const grid = RHO_GRID.map((rho) => this.profileAt(rho));
    let best = grid[0];
    for (const p of grid) if (p.logLik > best.logLik) best = p;
    const atZero = grid[0];
    const startA = aOfRho(Math.max(best.rho, 0.02));
    const lower = new Array<number>(G + 1).fill(-Infinity);
    const upper = new Array<number>(G + 1).fill(Infinity);
    lower[G] = 0;
    upper[G] = A_SEARCH_LIMIT;
    const full = newtonMaximize((t) => this.evaluate(t), [...best.k, startA], { lower, upper, maxStep: 1 });
    let theta = full.theta;
    let logLik = full.value;
    let converged = full.converged && this.failures === 0;
    if (best.logLik > logLik) {
      theta = [...best.k, aOfRho(best.rho)];
      logLik = best.logLik;
      converged = false;
    }
    let atBoundary = false;
    if (atZero.logLik >= logLik) {
      theta = [...atZero.k, 0];
      logLik = atZero.logLik;
      atBoundary = true;
      converged = atZero.converged;
    }
    const rho = rhoOfA(theta[G]);
    const k = theta.slice(0, G);
    return {
      rho: atBoundary ? 0 : rho,
      k,
      pds: k.map(normalCdf),
      logLik,
      atBoundary,
      atSearchLimit: theta[G] >= A_SEARCH_LIMIT * (1 - 1e-9),
      converged,
    };
  }

  /**
   * Profile-likelihood interval of the common rho: { rho : l*(rho) >= l_max - chi2_1(level) / 2 }.
   * Each end is the root of l*(rho) - cut-off by Brent's method between the estimate and a point
   * below the cut-off (0 for the lower end; for the upper end the first of the grid points above
   * the estimate, else the search limit, whose end is then reported as the limit).
   */
  rhoInterval(fit: CommonRhoFit, level: number): LikelihoodInterval & { upperAtSearchLimit: boolean } {
    const cut = fit.logLik - chiSquare1Quantile(level) / 2;
    const f = (rho: number) => {
      const q = this.profileAt(rho);
      return { f: q.logLik - cut, df: q.slope };
    };
    let converged = true;
    let lower = 0;
    const atZero = f(0);
    if (fit.rho > 0 && atZero.f < 0) {
      const r = safeguardedNewtonRoot(f, 0, fit.rho, atZero.f, fit.logLik - cut, { tolerance: 1e-8, start: fit.rho / 2 });
      lower = r.value;
      converged &&= r.converged;
    }
    let upper = RHO_SEARCH_LIMIT;
    let upperAtSearchLimit = true;
    // Outward from the estimate by doubling the distance on the logit scale, to a point below the cut-off.
    const logit = (r: number) => Math.log(r / (1 - r));
    let a = fit.rho;
    let fa = fit.logLik - cut;
    let b = fit.rho > 0 ? 1 / (1 + Math.exp(-(logit(fit.rho) + 0.5))) : 0.02;
    for (let steps = 0; steps < 40; steps++) {
      b = Math.min(b, RHO_SEARCH_LIMIT);
      const q = f(b);
      if (q.f < 0) {
        const r = safeguardedNewtonRoot(f, a, b, fa, q.f, { tolerance: 1e-8, start: a + (b - a) * (fa / (fa - q.f)) });
        upper = r.value;
        upperAtSearchLimit = false;
        converged &&= r.converged;
        break;
      }
      if (b >= RHO_SEARCH_LIMIT) break;
      a = b;
      fa = q.f;
      b = 1 / (1 + Math.exp(-(logit(b) + 2 * Math.max(0.25, logit(b) - (fit.rho > 0 ? logit(fit.rho) : logit(0.01))))));
    }
    return { level, lower, upper, upperAtSearchLimit, converged: converged && this.failures === 0 };
  }

  /**
   * Profile-likelihood interval of grade g's PD under the common-rho model: fix k_g, re-maximise
   * rho and the other grades' k; each end is the root of that profile minus the cut-off, by
   * safeguarded Newton with the profile's slope l_kg at the inner maximum (envelope theorem) as
   * derivative, bracketed from the Wald end on the k scale outward.
   */
  pdInterval(fit: CommonRhoFit, g: number, level: number): LikelihoodInterval {
    const G = this.grades;
    const cut = fit.logLik - chiSquare1Quantile(level) / 2;
    const lower = new Array<number>(G + 1).fill(-Infinity);
    const upper = new Array<number>(G + 1).fill(Infinity);
    lower[G] = 0;
    upper[G] = A_SEARCH_LIMIT;
    const free = new Array<boolean>(G + 1).fill(true);
    free[g] = false;
    const thetaHat = [...fit.k, aOfRho(fit.rho)];
    let warm = thetaHat.slice();
    let failed = false;
    const profile = (kg: number) => {
      const start = warm.slice();
      start[g] = kg;
      if (start[G] === 0) start[G] = aOfRho(0.02); // off the stationary point a = 0
      const r = newtonMaximize((t) => this.evaluate(t), start, { free, lower, upper, maxStep: 1 });
      if (!r.converged) failed = true;
      warm = r.theta;
      return { f: r.value - cut, df: r.at.gradient[g] };
    };
    // Wald half-width on the k scale from the full information at the estimate.
    const at = this.evaluate(thetaHat);
    const info = new Float64Array((G + 1) * (G + 1));
    for (let i = 0; i < info.length; i++) info[i] = -at.hessian[i];
    const inverse = fit.atBoundary ? invertPositiveDefinite(info.filter((_, i) => i % (G + 1) < G && Math.floor(i / (G + 1)) < G), G) : invertPositiveDefinite(info, G + 1);
    const size = fit.atBoundary ? G : G + 1;
    const se = inverse && inverse[g * size + g] > 0 ? Math.sqrt(inverse[g * size + g]) : 0.1;
    const half = Math.sqrt(chiSquare1Quantile(level)) * se;
    const end = (side: number): number => {
      warm = thetaHat.slice();
      let inside = fit.k[g];
      let fInside = fit.logLik - cut;
      let outside = fit.k[g] + side * half;
      let q = profile(outside);
      for (let steps = 0; q.f >= 0 && steps < 30; steps++) {
        inside = outside;
        fInside = q.f;
        outside = fit.k[g] + side * half * 2 ** (steps + 1);
        q = profile(outside);
      }
      if (q.f >= 0) {
        failed = true;
        return outside;
      }
      const [lo, hi, fLo, fHi] = side < 0 ? [outside, inside, q.f, fInside] : [inside, outside, fInside, q.f];
      const r = safeguardedNewtonRoot(profile, lo, hi, fLo, fHi, { tolerance: 1e-9, start: outside });
      if (!r.converged) failed = true;
      return r.value;
    };
    const kLower = end(-1);
    const kUpper = end(1);
    return { level, lower: normalCdf(kLower), upper: normalCdf(kUpper), converged: !failed };
  }
}
