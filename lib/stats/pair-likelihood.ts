/**
 * The likelihood of the factor correlation r between two segments, each segment's (p, rho) held
 * at its own estimate (inference for the margins first, DESIGN.md "Between segments"):
 *
 *   l(r) = sum_t log Int Int f_At(z1) f_Bt(z2) phi2(z1, z2; r) dz1 dz2,
 *
 * f the conditional binomial likelihoods of the year's counts. At r = 0 it is the sum of the two
 * segments' own log-likelihoods.
 *
 * Method: for |r| < 1 the nested integral of pair-mixing.ts (outer over z1 by the log-concave
 * integrator, per-year warm starts; inner over z2 given z1), with d l / d r as a posterior moment
 * (Plackett's identity). At r = +1 (and -1) the two factors coincide (are opposite), and the year
 * is one integral of both segments over one factor: the grade integrand of grade-mixing.ts with
 * (c_B, +a_B) (or -a_B). Accuracy: checked against a fine two-dimensional product rule in SciPy
 * (tests/fixtures/portfolio/make_pairs.py), including cohorts of 10^5.
 *
 * Reference: Plackett, R. L. (1954), Biometrika 41:351-360; Joe, H. (2005), "Asymptotic efficiency
 * of the two-stage estimation method for copula-based models", Journal of Multivariate Analysis
 * 94:401-419 (margins first, then the dependence parameter).
 */
import { GradeLikelihood } from './grade-likelihood';
import { logBinomialCoefficient } from './log-binomial';
import { LogConcaveIntegrator } from './log-concave-integral';
import type { IntegrationReport } from './mixture-likelihood';
import { normalQuantile } from './normal';
import { PairYearIntegrand, PAIR_MOMENTS } from './pair-mixing';
import { assertPanel, type Panel } from './panel';

/** A segment's own estimate, held fixed in the pair likelihood. */
export interface Margin {
  pd: number;
  rho: number;
}

/**
 * Evaluates l(r) and d l / d r for one pair of panels over the same years.
 *
 * @example new PairLikelihood(panelA, panelB, { pd: 0.01, rho: 0.1 }, { pd: 0.02, rho: 0.15 }).logLik(0.5)
 */
export class PairLikelihood {
  readonly years: number;
  private readonly nA: Float64Array;
  private readonly dA: Float64Array;
  private readonly lcA: Float64Array;
  private readonly nB: Float64Array;
  private readonly dB: Float64Array;
  private readonly lcB: Float64Array;
  private readonly cA: number;
  private readonly aA: number;
  private readonly cB: number;
  private readonly aB: number;
  private readonly integrand = new PairYearIntegrand();
  private readonly integrator = new LogConcaveIntegrator(PAIR_MOMENTS);
  private readonly modes: Float64Array;
  private readonly widths: Float64Array;
  private readonly hasMode: Uint8Array;
  private readonly panels: readonly [Panel, Panel];
  private readonly ends = new Map<number, GradeLikelihood>();
  evaluations = 0;
  unconverged = 0;
  private worstRelativeError = 0;

  constructor(a: Panel, b: Panel, marginA: Margin, marginB: Margin) {
    assertPanel(a, 'PairLikelihood (first segment)');
    assertPanel(b, 'PairLikelihood (second segment)');
    if (a.obligors.length !== b.obligors.length) {
      throw new RangeError(`PairLikelihood: the two segments have ${a.obligors.length} and ${b.obligors.length} years; give both the same years.`);
    }
    for (const [name, m] of [['first', marginA], ['second', marginB]] as const) {
      if (!(m.pd > 0 && m.pd < 1) || !(m.rho > 0 && m.rho < 1)) {
        throw new RangeError(`PairLikelihood: the ${name} segment needs 0 < p < 1 and 0 < rho < 1; got p = ${m.pd}, rho = ${m.rho}.`);
      }
    }
    const T = a.obligors.length;
    this.years = T;
    this.panels = [a, b];
    this.nA = Float64Array.from(a.obligors);
    this.dA = Float64Array.from(a.defaults);
    this.nB = Float64Array.from(b.obligors);
    this.dB = Float64Array.from(b.defaults);
    this.lcA = this.nA.map((n, t) => logBinomialCoefficient(n, this.dA[t]));
    this.lcB = this.nB.map((n, t) => logBinomialCoefficient(n, this.dB[t]));
    this.cA = normalQuantile(marginA.pd) / Math.sqrt(1 - marginA.rho);
    this.aA = Math.sqrt(marginA.rho / (1 - marginA.rho));
    this.cB = normalQuantile(marginB.pd) / Math.sqrt(1 - marginB.rho);
    this.aB = Math.sqrt(marginB.rho / (1 - marginB.rho));
    this.modes = new Float64Array(T);
    this.widths = new Float64Array(2 * T);
    this.hasMode = new Uint8Array(T);
  }

  /** How the integrations went (outer and inner integrals above tolerance). */
  report(): IntegrationReport {
    return { evaluations: this.evaluations, unconverged: this.unconverged + this.integrand.innerUnconverged, worstRelativeError: this.worstRelativeError };
  }

  /** l(r), r in [-1, 1]. */
  logLik(r: number): number {
    if (r === 1 || r === -1) return this.atEnd(r);
    return this.evaluate(r).value;
  }

  /** l(r) and d l / d r, |r| < 1. */
  logLikWithSlope(r: number): { value: number; slope: number } {
    return this.evaluate(r);
  }

  private atEnd(r: 1 | -1): number {
    let L = this.ends.get(r);
    if (!L) {
      L = new GradeLikelihood(this.panels);
      this.ends.set(r, L);
    }
    this.evaluations++;
    return L.evaluate([this.cA, this.cB], [this.aA, r * this.aB], false).value;
  }

  private evaluate(r: number): { value: number; slope: number } {
    if (!(r > -1 && r < 1)) throw new RangeError(`PairLikelihood: the factor correlation must be in (-1, 1) here; got ${r}.`);
    this.evaluations++;
    const f = this.integrand;
    f.setMargins(this.cA, this.aA, this.cB, this.aB);
    f.setCorrelation(r);
    const M = this.integrator.moments;
    let value = 0;
    let slope = 0;
    for (let t = 0; t < this.years; t++) {
      f.setYear(this.nA[t], this.dA[t], this.lcA[t], this.nB[t], this.dB[t], this.lcB[t]);
      const res = this.integrator.integrate(
        f,
        this.hasMode[t] === 1
          ? { start: this.modes[t], leftWidth: this.widths[2 * t], rightWidth: this.widths[2 * t + 1], curvatureBound: 1 }
          : { curvatureBound: 1 },
      );
      if (!res.converged) {
        if (!Number.isFinite(res.value)) {
          this.hasMode[t] = 0;
          throw new RangeError(`pair log-likelihood: the integral of year ${t + 1} failed at r = ${r}: ${res.reason}.`);
        }
        this.unconverged++;
        if (res.relativeError > this.worstRelativeError) this.worstRelativeError = res.relativeError;
      }
      this.modes[t] = res.mode;
      this.widths[2 * t] = res.leftWidth;
      this.widths[2 * t + 1] = res.rightWidth;
      this.hasMode[t] = 1;
      value += res.value;
      const hA = f.hAAtMode;
      const hB = f.hBAtMode;
      slope += this.aA * this.aB * (hA * hB + hA * M[1] + hB * M[0] + M[2]);
    }
    if (!Number.isFinite(value) || !Number.isFinite(slope)) throw new RangeError(`pair log-likelihood: the value or its slope is not finite at r = ${r}.`);
    return { value, slope };
  }
}
