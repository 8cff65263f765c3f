/**
 * The inner integral of a pair year (pair-mixing.ts) as a function of one variable, tabulated:
 *
 *   Psi(c) = log Int f_B(c - a' w) phi(w) dw,   f_B(z) = C(n, d) Phi(z)^d Phi(-z)^(n - d),
 *
 * with Psi'(c) = E[h1] and Psi''(c) = E[h2] + Var h1 (h1, h2 the z-derivatives of log f_B;
 * expectations under the normalised integrand). Given A's factor z1, the inner integral of the
 * pair over B's factor z2 = r z1 + sqrt(1 - r^2) w is Psi at c = c_B - a_B r z1 with
 * a' = a_B sqrt(1 - r^2): the one-factor mixture likelihood of B at a shifted threshold. For a
 * fixed r (fixed a'), Psi is a smooth concave function of c alone (Prekopa 1973), so the outer
 * integral needs it only on a line.
 *
 * Method: nodes c_j = anchor + j step, each integrated exactly by the log-concave integrator
 * (its value and its moments give Psi, Psi', Psi'' at the node), computed when first needed, with
 * the inner mode of the nearest node as warm start. Between two nodes Psi is the quintic Hermite
 * polynomial P matching Psi, Psi', Psi'' at both ends; its derivatives stand for Psi' and Psi''.
 * For Psi in C^6 the error is (Stoer & Bulirsch 2002, Theorem 2.1.5.9)
 *
 *   Psi(c) - P(c) = Psi^(6)(xi) / 720 (c - c_j)^3 (c - c_{j+1})^3,   |.| <= max |Psi^(6)| step^6 / 46080,
 *
 * largest at a cell's midpoint. {@link InnerLogIntegralTable.checkNear} measures it there against
 * an exact integral (an a-posteriori check: max |Psi^(6)| is not known in advance), and
 * {@link InnerLogIntegralTable.refine} halves the step (64 times smaller error), keeping every
 * node already integrated.
 *
 * References: Stoer, J. & Bulirsch, R. (2002), Introduction to Numerical Analysis, 3rd ed.,
 * section 2.1.5 (Hermite interpolation and its remainder); Prekopa, A. (1973), Acta Sci. Math.
 * 34:335-343 (marginals of log-concave functions).
 */
import { GaussianPeriodIntegrand, GAUSSIAN_MOMENTS } from './gaussian-mixing';
import { LogConcaveIntegrator } from './log-concave-integral';
import { quinticHermite, type HermiteValue } from './quintic-hermite';

/** Nodes a table can hold (indices -CAPACITY/2 .. CAPACITY/2 - 1 around the anchor). */
const CAPACITY = 1024;
const OFFSET = CAPACITY / 2;

/**
 * Psi(c), Psi'(c), Psi''(c) of one year of segment B at one scale a' (module comment), exactly
 * ({@link exact}) or from a table of exactly integrated nodes ({@link interpolate}).
 *
 * @example
 * const t = new InnerLogIntegralTable();
 * t.setYear(800, 20, logBinomialCoefficient(800, 20)); t.setScale(0.33);
 * const out = new Float64Array(3); t.exact(-2.2, out); t.start(-2.2, 0.05, out);
 * t.interpolate(-2.13, out); // out[0] = Psi(-2.13) within the checked error
 */
export class InnerLogIntegralTable {
  private readonly integrand = new GaussianPeriodIntegrand();
  private readonly integrator = new LogConcaveIntegrator(GAUSSIAN_MOMENTS[1]);
  private scale = 1;
  private k = 0;
  private rhoPrime = 0;
  private anchor = 0;
  private step = 0;
  /** Generation stamp of each slot: a slot holds a node of this table when it equals `generation`. */
  private readonly stamp = new Int32Array(CAPACITY);
  private generation = 1;
  private readonly value = new Float64Array(CAPACITY);
  private readonly d1 = new Float64Array(CAPACITY);
  private readonly d2 = new Float64Array(CAPACITY);
  private readonly innerMode = new Float64Array(CAPACITY);
  private readonly innerLeft = new Float64Array(CAPACITY);
  private readonly innerRight = new Float64Array(CAPACITY);
  private lastSlot = -1;
  /** The interpolant at the last point asked, reused so that interpolate allocates nothing. */
  private readonly hermite: HermiteValue = { value: 0, d1: 0, d2: 0 };
  private readonly node = new Float64Array(6);
  private warmMode = Number.NaN;
  private warmLeft = 0;
  private warmRight = 0;
  /** Exact inner integrals computed (nodes and checks). */
  exactIntegrals = 0;
  /** Exact inner integrals that missed their tolerance (their values are used). */
  unconverged = 0;
  /** The reason of the last failed exact integral (its value is NaN). */
  failure: string | null = null;

  /** The year of segment B: obligors, defaults, log C(n, d). Clears the table. */
  setYear(n: number, d: number, logC: number): void {
    this.integrand.setPeriod(n, d, logC);
    this.clear();
  }

  /** The scale a' = a_B sqrt(1 - r^2) > 0 of the inner factor. Clears the table. */
  setScale(scale: number): void {
    this.scale = scale;
    this.rhoPrime = (scale * scale) / (1 + scale * scale);
    this.k = 1 / Math.sqrt(1 + scale * scale);
    this.clear();
  }

  /** Forgets the nodes (a new year or scale); warm starts of the inner mode are kept. */
  clear(): void {
    this.step = 0;
    this.generation++;
    this.lastSlot = -1;
  }

  /** Whether a grid has been laid ({@link start}). */
  get started(): boolean {
    return this.step > 0;
  }

  /** The node spacing in c. */
  get spacing(): number {
    return this.step;
  }

  /**
   * Psi, Psi', Psi'' at c by one exact inner integral, into out[0..2]. A failed integral writes
   * NaN to out[0] and its reason to `failure`.
   */
  exact(c: number, out: Float64Array): void {
    const f = this.integrand;
    f.setParameters(c * this.k, this.rhoPrime, 1);
    const I = this.integrator;
    const res = I.integrate(
      f,
      Number.isFinite(this.warmMode) ? { start: this.warmMode, leftWidth: this.warmLeft, rightWidth: this.warmRight, curvatureBound: 1 } : { curvatureBound: 1 },
    );
    this.exactIntegrals++;
    if (!res.converged) {
      if (!Number.isFinite(res.value)) {
        this.warmMode = Number.NaN;
        this.failure = res.reason ?? 'the inner integral failed';
        out[0] = Number.NaN;
        out[1] = Number.NaN;
        out[2] = Number.NaN;
        return;
      }
      this.unconverged++;
    }
    this.warmMode = res.mode;
    this.warmLeft = res.leftWidth;
    this.warmRight = res.rightWidth;
    const M = I.moments;
    out[0] = res.value;
    out[1] = f.h1AtMode + M[0];
    out[2] = M[2] + Math.max(0, M[1] - M[0] * M[0]);
  }

  /**
   * Lays the grid c_j = anchor + j step (step > 0) with node 0 given (Psi, Psi', Psi'' at the
   * anchor, as {@link exact} wrote them just before: its inner mode is the warm start kept).
   */
  start(anchor: number, step: number, atAnchor: Float64Array): void {
    if (!(step > 0)) throw new RangeError(`InnerLogIntegralTable: the node spacing must be positive; got ${step}.`);
    this.clear();
    this.anchor = anchor;
    this.step = step;
    this.value[OFFSET] = atAnchor[0];
    this.d1[OFFSET] = atAnchor[1];
    this.d2[OFFSET] = atAnchor[2];
    this.innerMode[OFFSET] = this.warmMode;
    this.innerLeft[OFFSET] = this.warmLeft;
    this.innerRight[OFFSET] = this.warmRight;
    this.stamp[OFFSET] = this.generation;
    this.lastSlot = OFFSET;
  }

  /** Halves the node spacing, keeping the nodes already integrated (node j becomes node 2j). */
  refine(): void {
    const g = this.generation;
    const next = g + 1;
    // Old slot OFFSET + j moves to OFFSET + 2j: walk outward from the anchor on each side so that
    // no node is overwritten before it has moved.
    for (let j = Math.floor((CAPACITY - 1 - OFFSET) / 2); j >= 0; j--) this.move(j, g, next);
    for (let j = -1; OFFSET + 2 * j >= 0; j--) this.move(j, g, next);
    this.generation = next;
    this.step *= 0.5;
    this.lastSlot = -1;
  }

  private move(j: number, from: number, to: number): void {
    const s = OFFSET + j;
    if (this.stamp[s] !== from) return;
    const t = OFFSET + 2 * j;
    this.value[t] = this.value[s];
    this.d1[t] = this.d1[s];
    this.d2[t] = this.d2[s];
    this.innerMode[t] = this.innerMode[s];
    this.innerLeft[t] = this.innerLeft[s];
    this.innerRight[t] = this.innerRight[s];
    this.stamp[t] = to;
  }

  /** Integrates node j when it is not yet in the table; false when j is beyond the table's capacity. */
  private ensure(j: number): boolean {
    const s = OFFSET + j;
    if (s < 0 || s >= CAPACITY) return false;
    if (this.stamp[s] === this.generation) return true;
    // Warm start from a neighbour, else from the last node integrated.
    const near = this.stamp[s - 1] === this.generation ? s - 1 : this.stamp[s + 1] === this.generation ? s + 1 : this.lastSlot;
    if (near >= 0 && this.stamp[near] === this.generation) {
      this.warmMode = this.innerMode[near];
      this.warmLeft = this.innerLeft[near];
      this.warmRight = this.innerRight[near];
    }
    const out = this.node;
    this.exact(this.anchor + j * this.step, out);
    this.value[s] = out[0];
    this.d1[s] = out[1];
    this.d2[s] = out[2];
    this.innerMode[s] = this.warmMode;
    this.innerLeft[s] = this.warmLeft;
    this.innerRight[s] = this.warmRight;
    this.stamp[s] = this.generation;
    this.lastSlot = s;
    return true;
  }

  /**
   * Psi, Psi', Psi'' at c from the table (quintic Hermite between the two nodes around c,
   * integrating them when needed), into out[0..2]; beyond the table's capacity, exactly.
   */
  interpolate(c: number, out: Float64Array): void {
    const u = (c - this.anchor) / this.step;
    const j = Math.floor(u);
    const t = u - j;
    if (t === 0 && this.stamp[OFFSET + j] === this.generation) {
      const s = OFFSET + j;
      out[0] = this.value[s];
      out[1] = this.d1[s];
      out[2] = this.d2[s];
      return;
    }
    if (!this.ensure(j) || !this.ensure(j + 1)) {
      this.exact(c, out);
      return;
    }
    const s = OFFSET + j;
    const c0 = this.anchor + j * this.step;
    const r = quinticHermite(c0, this.value[s], this.d1[s], this.d2[s], c0 + this.step, this.value[s + 1], this.d1[s + 1], this.d2[s + 1], c, this.hermite);
    out[0] = r.value;
    out[1] = r.d1;
    out[2] = r.d2;
  }

  /**
   * The interpolation error near c: the larger |Psi - P| at the midpoints (where the remainder's
   * factor (c - c_j)^3 (c - c_{j+1})^3 is largest) of the cell holding c and of its neighbour
   * nearer to c, by two exact integrals.
   */
  checkNear(c: number): number {
    const u = (c - this.anchor) / this.step;
    const j = Math.floor(u);
    return Math.max(this.checkCell(j), this.checkCell(u - j < 0.5 ? j - 1 : j + 1));
  }

  /** |Psi - P| at the midpoint of cell j (nodes j and j + 1), by one exact integral. */
  private checkCell(j: number): number {
    const mid = this.anchor + (j + 0.5) * this.step;
    const out = this.node;
    this.interpolate(mid, out);
    const approx = out[0];
    this.exact(mid, out);
    return Math.abs(out[0] - approx);
  }
}
