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
import { LogConcaveIntegrator, type LogConcaveIntegral, type LogConcaveOptions } from './log-concave-integral';
import { PeriodWarmStarts } from './period-warm-starts';
import type { IntegrationReport } from './mixture-likelihood';
import { normalQuantile } from './normal';
import { PairYearIntegrand, PAIR_MOMENTS } from './pair-mixing';
import { assertPanel, type Panel } from './panel';

/** Largest interpolation error of a year's inner table (log-units) at the checks by the outer mode. */
export const TABLE_TOLERANCE = 1e-10;
/** Log-units below its maximum at which the outer integrand is cut (mass left out below e^-30 relative). */
const OUTER_TRUNCATION = 30;
/** Halvings of a year's table spacing before the year is integrated exactly. */
const MAX_REFINEMENTS = 3;

/** Evaluations of l(r) remembered. */
const MEMO = 16;

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
  private readonly warm: PeriodWarmStarts;
  /** The integrator's options, refilled per period by optionsInto (no object per integral). */
  private readonly options: LogConcaveOptions = { curvatureBound: 1, truncation: OUTER_TRUNCATION };
  private readonly panels: readonly [Panel, Panel];
  private readonly ends = new Map<number, GradeLikelihood>();
  private readonly tabulate: boolean;
  private readonly memoR = new Float64Array(MEMO).fill(Number.NaN);
  private readonly memoValue = new Float64Array(MEMO);
  private readonly memoSlope = new Float64Array(MEMO);
  private memoNext = 0;
  evaluations = 0;
  /** Period integrals that missed the tolerance of the adaptive rule (their finite values are used). */
  get unconverged(): number {
    return this.warm.unconverged;
  }
  /** Halvings of a year's table spacing, and years integrated exactly after MAX_REFINEMENTS. */
  refinements = 0;
  exactYears = 0;

  constructor(a: Panel, b: Panel, marginA: Margin, marginB: Margin, options: { tabulate?: boolean } = {}) {
    this.tabulate = options.tabulate ?? true;
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
    this.warm = new PeriodWarmStarts(T);
  }

  /** How the integrations went (outer and inner integrals above tolerance). */
  report(): IntegrationReport {
    return { evaluations: this.evaluations, unconverged: this.warm.unconverged + this.integrand.innerUnconverged, worstRelativeError: this.warm.worstRelativeError };
  }

  /** l(r), r in [-1, 1]. */
  logLik(r: number): number {
    if (r === 1 || r === -1) return this.atEnd(r);
    return this.logLikWithSlope(r).value;
  }

  /** l(r) and d l / d r, |r| < 1. The last MEMO values are remembered (a search often asks again). */
  logLikWithSlope(r: number): { value: number; slope: number } {
    for (let i = 0; i < MEMO; i++) {
      if (this.memoR[i] === r) return { value: this.memoValue[i], slope: this.memoSlope[i] };
    }
    const q = this.evaluate(r);
    const i = this.memoNext;
    this.memoR[i] = r;
    this.memoValue[i] = q.value;
    this.memoSlope[i] = q.slope;
    this.memoNext = (i + 1) % MEMO;
    return q;
  }

  /**
   * The curvature d^2 l / d r^2 near r from the slopes remembered at the two points closest to
   * it (a secant), or NaN when fewer than two are known.
   */
  curvatureNear(r: number): number {
    let i = -1;
    let j = -1;
    for (let k = 0; k < MEMO; k++) {
      if (Number.isNaN(this.memoR[k])) continue;
      const d = Math.abs(this.memoR[k] - r);
      if (i < 0 || d < Math.abs(this.memoR[i] - r)) {
        j = i;
        i = k;
      } else if (j < 0 || d < Math.abs(this.memoR[j] - r)) {
        j = k;
      }
    }
    if (i < 0 || j < 0 || this.memoR[i] === this.memoR[j]) return Number.NaN;
    return (this.memoSlope[i] - this.memoSlope[j]) / (this.memoR[i] - this.memoR[j]);
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

  /** One year's outer integral at r (the integrand set up), keeping its mode and widths as the next warm start. */
  private integrateYear(t: number, r: number): LogConcaveIntegral {
    const res = this.integrator.integrate(this.integrand, this.warm.optionsInto(t, this.options));
    this.warm.record(t, res, () => `pair log-likelihood: the integral of year ${t + 1} failed at r = ${r}: ${res.reason}.`);
    return res;
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
      f.useTable(this.tabulate);
      let res = this.integrateYear(t, r);
      // The table's error where the integrand's mass is: halve the spacing as often as the error's
      // h^6 law says is needed to bring it below the tolerance (checking again after), or integrate
      // exactly when that takes more than MAX_REFINEMENTS halvings in all.
      let halvings = 0;
      for (let error = this.tabulate ? f.checkTable(res.mode) : 0; error > TABLE_TOLERANCE; error = f.checkTable(res.mode)) {
        const needed = Math.max(1, Math.ceil(Math.log(error / TABLE_TOLERANCE) / Math.log(64)));
        if (halvings + needed > MAX_REFINEMENTS) {
          f.useTable(false);
          this.exactYears++;
          res = this.integrateYear(t, r);
          break;
        }
        for (let k = 0; k < needed; k++) f.refineTable();
        halvings += needed;
        this.refinements += needed;
        res = this.integrateYear(t, r);
      }
      value += res.value;
      const hA = f.hAAtMode;
      const hB = f.hBAtMode;
      slope += this.aA * this.aB * (hA * hB + hA * M[1] + hB * M[0] + M[2]);
    }
    if (!Number.isFinite(value) || !Number.isFinite(slope)) throw new RangeError(`pair log-likelihood: the value or its slope is not finite at r = ${r}.`);
    return { value, slope };
  }
}
