/**
 * The Gaussian-mixing likelihood of one period as a function of its threshold c at fixed rho,
 *
 *   L_G(c) = Int C(n, d) Phi(z)^d Phi(-z)^(n - d) phi(x) dx,  z = (c - sqrt(rho) x) / sqrt(1 - rho),
 *
 * with its first two c-derivatives, exactly (one log-concave integral per point) or from a table
 * built lazily and verified as it grows. Models that mix the Gaussian law over a threshold that
 * moves (the t copula: c = t_nu^-1(p) sqrt(V / nu)) call it at hundreds of c per period and
 * evaluation; at fixed rho the function does not depend on their other parameters, so one table
 * serves a whole search over them.
 *
 * Derivatives (Gordy & Heitfield 2002, and gaussian-mixing.ts): with h1, h2 the z-derivatives of
 * d log Phi(z) + (n - d) log Phi(-z), d log L_G / dc = E[h1] / sqrt(1 - rho) and
 * d^2 log L_G / dc^2 = (E[h2] + Var h1) / (1 - rho), posterior moments of the integral.
 *
 * Table (Method): nodes c_i = i h0 (h0 = 1/2) computed when first needed; log L_G between two
 * nodes by quintic Hermite interpolation from the values and both derivatives at the ends (error
 * O(h^6)). Before an interval is used, the interpolant is checked at its midpoint against an exact
 * evaluation; when they differ by more than 1e-10 max(1, D) (absolute, log-units; D the drop of the
 * midpoint below the largest value of the table so far, where an error weighs e^-D) or the slopes
 * by more than 1e-7 max(1, D) relative, the interval is halved (down to h0 / 2^16) and each half is checked the same way. So
 * every interval in use is verified at one interior point, cliffs (a zero-default year at high
 * rho) are refined where they are and smooth stretches stay coarse. The log-values are concave in
 * c (Prekopa 1973), so an interpolant that agrees at three points and two slopes per end has no
 * room for a hidden bump of the size of the tolerance between them. A caller that needs less
 * (the likelihood-ratio statistic of a bootstrap replication) may lay a coarser table with looser
 * tolerances ({@link TableAccuracy}); every estimate and interval uses the default.
 *
 * References: Gordy, M. B. & Heitfield, E. (2002), Federal Reserve Board working paper, eq. (4);
 * Burden, R. L. & Faires, J. D. (2011), Numerical Analysis, 9th ed., section 3.4 (Hermite
 * interpolation); Prekopa, A. (1973), Acta Sci. Math. 34:335-343.
 */
import { GaussianPeriodIntegrand, GAUSSIAN_MOMENTS } from './gaussian-mixing';
import { LogConcaveIntegrator } from './log-concave-integral';
import { normalTails, TAIL_SLOTS } from './normal-tails';
import { quinticHermite } from './quintic-hermite';

/** Base spacing of the table in c. */
export const TABLE_SPACING = 1 / 2;
/** Deepest halving of an interval. */
const MAX_LEVEL = 16;
/** Largest absolute disagreement (log-units) of the interpolant with the exact value at a midpoint. */
export const TABLE_TOLERANCE = 1e-10;
/** Largest relative disagreement of the interpolated slope at a midpoint. */
const SLOPE_TOLERANCE = 1e-7;

/**
 * How a table is laid and verified: base spacing in c, and the largest disagreement of value
 * (absolute, log-units, times max(1, drop)) and slope (relative) at each interval's midpoint.
 */
export interface TableAccuracy {
  spacing: number;
  tolerance: number;
  slopeTolerance: number;
}

/** The default: verified to 1e-10 at each midpoint, what every estimate and interval uses. */
export const FULL_TABLE_ACCURACY: Readonly<TableAccuracy> = { spacing: TABLE_SPACING, tolerance: TABLE_TOLERANCE, slopeTolerance: SLOPE_TOLERANCE };

/** One exactly evaluated point: log L_G, D1, D2 at c. */
interface TableNode {
  c: number;
  v: number;
  d1: number;
  d2: number;
}

/** An interval of the table: its ends, and its halves once it was found too coarse. */
interface TableInterval {
  a: TableNode;
  b: TableNode;
  left: TableInterval | null;
  right: TableInterval | null;
}

/**
 * log L_G(c) and its first two c-derivatives for one period at fixed rho (module comment).
 * `exact(c)` integrates; `tabulated(c)` reads the verified table. Both write into `value`, `d1`,
 * `d2`. At rho = 0 both are the closed-form binomial at Phi(c).
 */
export class ThresholdLikelihood {
  value = 0;
  d1 = 0;
  d2 = 0;
  /** Exact evaluations so far (table nodes and checks included). */
  exactEvaluations = 0;
  /** Integrals that missed their tolerance (the values are used). */
  unconverged = 0;
  private n = 1;
  private d = 0;
  private logC = 0;
  private rho = 0;
  private zk = 1;
  private readonly integrand = new GaussianPeriodIntegrand();
  private readonly integrator = new LogConcaveIntegrator(GAUSSIAN_MOMENTS[1]);
  private readonly tails = new Float64Array(TAIL_SLOTS);
  private mode = Number.NaN;
  private leftWidth = 0;
  private rightWidth = 0;
  private readonly intervals = new Map<number, TableInterval>();
  private readonly nodes = new Map<number, TableNode>();
  /** The largest log L_G of the table so far (the tolerance loosens with the drop below it). */
  private top = Number.NEGATIVE_INFINITY;
  private readonly spacing: number;
  private readonly tolerance: number;
  private readonly slopeTolerance: number;

  /** @param accuracy the table's spacing and tolerances (default {@link FULL_TABLE_ACCURACY}). */
  constructor(accuracy: Readonly<TableAccuracy> = FULL_TABLE_ACCURACY) {
    if (!(accuracy.spacing > 0 && accuracy.tolerance > 0 && accuracy.slopeTolerance > 0)) {
      throw new RangeError('ThresholdLikelihood: the table spacing and tolerances must be positive.');
    }
    this.spacing = accuracy.spacing;
    this.tolerance = accuracy.tolerance;
    this.slopeTolerance = accuracy.slopeTolerance;
  }

  /** Sets the period and rho in [0, 1); clears the table when either changes. */
  set(n: number, d: number, logC: number, rho: number): void {
    if (n === this.n && d === this.d && logC === this.logC && rho === this.rho && this.nodes.size > 0) return;
    this.n = n;
    this.d = d;
    this.logC = logC;
    this.rho = rho;
    this.zk = 1 / Math.sqrt(1 - rho);
    this.integrand.setPeriod(n, d, logC);
    this.mode = Number.NaN;
    this.intervals.clear();
    this.nodes.clear();
    this.top = Number.NEGATIVE_INFINITY;
  }

  /** Integrates at c (module comment); fills value, d1, d2 (NaN when the integral failed). */
  exact(c: number): void {
    this.exactEvaluations++;
    if (this.rho === 0) {
      const T = this.tails;
      normalTails(c, T);
      const nd = this.n - this.d;
      this.value = this.logC + this.d * T[0] + nd * T[1];
      this.d1 = this.d * T[2] - nd * T[3];
      this.d2 = -(this.d * T[4] + nd * T[5]);
      return;
    }
    this.integrand.setParameters(c, this.rho, 1);
    const r = this.integrator.integrate(
      this.integrand,
      Number.isFinite(this.mode) ? { start: this.mode, leftWidth: this.leftWidth, rightWidth: this.rightWidth, curvatureBound: 1 } : { curvatureBound: 1 },
    );
    if (!r.converged) {
      if (!Number.isFinite(r.value)) {
        this.mode = Number.NaN;
        this.value = Number.NaN;
        this.d1 = Number.NaN;
        this.d2 = Number.NaN;
        return;
      }
      this.unconverged++;
    }
    this.mode = r.mode;
    this.leftWidth = r.leftWidth;
    this.rightWidth = r.rightWidth;
    const M = this.integrator.moments;
    const zk = this.zk;
    this.value = r.value;
    this.d1 = (this.integrand.h1AtMode + M[0]) * zk;
    this.d2 = (M[2] + Math.max(0, M[1] - M[0] * M[0])) * zk * zk;
  }

  /** Reads the table at c (module comment); fills value, d1, d2. At rho = 0 it is exact. */
  tabulated(c: number): void {
    if (this.rho === 0 || !Number.isFinite(c)) {
      this.exact(c);
      return;
    }
    const h0 = this.spacing;
    const i = Math.floor(c / h0);
    let interval = this.intervals.get(i);
    if (interval === undefined) {
      const made = this.makeInterval(this.node(i * h0, i), this.node((i + 1) * h0, i + 1), 0);
      if (made === null) {
        this.exact(c);
        return;
      }
      this.intervals.set(i, made);
      interval = made;
    }
    while (interval.left !== null && interval.right !== null) {
      interval = c < interval.left.b.c ? interval.left : interval.right;
    }
    this.interpolate(interval.a, interval.b, c);
  }

  private node(c: number, key: number): TableNode {
    const known = this.nodes.get(key);
    if (known !== undefined) return known;
    const made = this.exactNode(c);
    this.nodes.set(key, made);
    return made;
  }

  private exactNode(c: number): TableNode {
    this.exact(c);
    return { c, v: this.value, d1: this.d1, d2: this.d2 };
  }

  /** A verified interval [a, b], halved where the midpoint check fails; null when a node is not finite. */
  private makeInterval(a: TableNode, b: TableNode, level: number): TableInterval | null {
    if (!Number.isFinite(a.v) || !Number.isFinite(b.v)) return null;
    const mid = this.exactNode(0.5 * (a.c + b.c));
    if (!Number.isFinite(mid.v)) return null;
    this.interpolate(a, b, mid.c);
    // Far below the best value seen, an error weighs e^-(drop) in any integral over c: the absolute
    // tolerance grows with the drop (1e-10 at the top, 1e-7 a thousand log-units down).
    if (mid.v > this.top) this.top = mid.v;
    const scale = Math.max(1, this.top - mid.v);
    const close =
      Math.abs(this.value - mid.v) <= this.tolerance * scale && Math.abs(this.d1 - mid.d1) <= this.slopeTolerance * scale * Math.max(1, Math.abs(mid.d1));
    if (close || level >= MAX_LEVEL) {
      if (!close) this.unconverged++;
      return { a, b, left: null, right: null };
    }
    const left = this.makeInterval(a, mid, level + 1);
    const right = this.makeInterval(mid, b, level + 1);
    if (left === null || right === null) return null;
    return { a, b, left, right };
  }

  /** Quintic Hermite interpolation of log L_G and its two derivatives between nodes a and b. */
  private interpolate(a: TableNode, b: TableNode, c: number): void {
    quinticHermite(a.c, a.v, a.d1, a.d2, b.c, b.v, b.d1, b.d2, c, this);
  }
}
