/**
 * The integral of a log-concave spike: I = Int_lower^upper exp(g(x)) dx for a strictly concave
 * g with known first and second derivatives, and posterior moments E[m_j] = Int m_j exp(g) / I at
 * the same nodes. Every likelihood of Rhobook that integrates a conditional binomial likelihood
 * over a normal factor (the Gaussian mixture of binomialMle, and the models and mixing laws that
 * reuse it: see DEVELOPERS.md, "Adding a model or a mixing law") is one of these.
 *
 * Rule ("mode-bracketed adaptive Gauss-Kronrod"):
 *   1. the mode m of g by safeguarded Newton on g' inside a bracket that always holds it (found
 *      from the start by Newton steps and, when g'' <= -c is known, the bound |m - x| <= |g'(x)| / c;
 *      otherwise by doubling steps), bisection whenever a Newton step leaves the bracket or fails
 *      to halve it; converged when the Newton decrement g'^2 / |g''| (twice the log-gap to the
 *      maximum) is below 1e-12 or the step no longer changes x. A warm start that does not
 *      converge is followed by a fresh start from the integrand's own guess;
 *   2. on each side the point where g has dropped `truncation` (default 40) log-units below g(m),
 *      by Newton from outside on the concave g (monotone), never further than sqrt(2 L / c) from m
 *      when the curvature bound c is known; the mass left out is below e^-40 relative;
 *   3. exp(g - g(m)) integrated with G10/K21 panels (gauss-kronrod.ts), two per side to start,
 *      bisecting the panel with the largest QUADPACK error estimate until the total estimate is
 *      below `relativeTolerance` (default 1e-8) of the integral or `maxPanels` (64) are used.
 * Each side is monotone and smooth, so the rule follows a narrow spike (width ~ 1/sqrt(n) for a
 * cohort of n) and the cliff of a zero-default period alike, where fixed Gauss-Hermite fails.
 *
 * The integrator owns its work arrays, so it is safe to use one per thread or per nesting level
 * (an outer integrand may run an inner integral with another LogConcaveIntegrator); nothing here
 * is module state.
 *
 * References: Piessens, R., de Doncker-Kapenga, E., Uberhuber, C. W. & Kahaner, D. K. (1983),
 * QUADPACK, Springer (qk21, qag: global adaptive bisection); Press, W. H. et al. (2007), Numerical
 * Recipes, 3rd ed., section 9.4 (rtsafe: Newton safeguarded by bisection); Boyd, S. &
 * Vandenberghe, L. (2004), Convex Optimization, section 9.5.1 (the Newton decrement); Gordy, M. B.
 * & Heitfield, E. (2002), eq. (4), for the mixture integrals this serves.
 */
import { GAUSS_WEIGHTS, KRONROD_NODES, KRONROD_POINTS, KRONROD_WEIGHTS, quadpackError } from './gauss-kronrod';

/**
 * What the integrator needs of an integrand exp(g(x)) with g strictly concave.
 *
 * Implementations keep their parameters in fields and allocate nothing per call: these methods
 * are the inner loop of every likelihood evaluation.
 */
export interface LogConcaveIntegrand {
  /** Number of moment functions m_j(x) whose expectations under exp(g) are wanted (0: none). */
  readonly moments: number;
  /** Writes g(x), g'(x), g''(x) to out[0], out[1], out[2]. */
  derivatives(x: number, out: Float64Array): void;
  /** Returns g(x) and, when `moments` > 0, writes m_0(x) .. m_{moments-1}(x) to row. */
  node(x: number, row: Float64Array): number;
  /** Called once with the mode before the nodes are evaluated (for moments centred at the mode). */
  prepare?(mode: number, out: Float64Array): void;
  /** A start for the mode search when no warm start is given or the warm one fails (default 0). */
  guess?(): number;
}

/** Options of {@link LogConcaveIntegrator.integrate}. */
export interface LogConcaveOptions {
  /** Start of the mode search (a warm start: the mode of a nearby integrand). */
  start?: number;
  /** Warm starts of the truncation half-widths left and right of the mode. */
  leftWidth?: number;
  rightWidth?: number;
  /** A c > 0 with g''(x) <= -c for every x, when known (1 for an integrand with a standard normal factor); 0: unknown. */
  curvatureBound?: number;
  /** Integration limits (default the whole line). */
  lower?: number;
  upper?: number;
  /** Log-units below the maximum at which the integrand is cut (default 40). */
  truncation?: number;
  /** Relative tolerance on the QUADPACK error estimate (default 1e-8). */
  relativeTolerance?: number;
}

/** Result of {@link LogConcaveIntegrator.integrate}. */
export interface LogConcaveIntegral {
  /** log I; NaN only when `converged` is false and the mode was not found. */
  value: number;
  /** The mode was found and the error estimate met the tolerance. */
  converged: boolean;
  /** Why not, when `converged` is false. */
  reason?: string;
  /** The maximiser of g on [lower, upper] and g there. */
  mode: number;
  gMax: number;
  /** Truncation half-widths used on each side of the mode. */
  leftWidth: number;
  rightWidth: number;
  /** G10/K21 panels of the adaptive stage. */
  panels: number;
  /** Calls of the integrand (derivatives and nodes). */
  evaluations: number;
  /** Newton and bisection steps of the mode search (both starts). */
  modeIterations: number;
  /** QUADPACK error estimate relative to I. */
  relativeError: number;
}

/** Most panels of the adaptive stage. */
export const MAX_PANELS = 64;
/** Most moment functions of one integrand (work arrays grow with it: 64 panels x (1 + moments) doubles). */
export const MAX_MOMENTS = 1024;
/** Default log-units below the maximum at which the integrand is cut. */
export const TRUNCATION_LOG_UNITS = 40;
/** Default relative tolerance of the adaptive stage. */
export const RELATIVE_TOLERANCE = 1e-8;
/** Steps of one mode search before it counts as failed. */
const MODE_ITERATIONS = 200;
/** Newton decrement g'^2 / |g''| below which the mode is found (log-gap 5e-13). */
const DECREMENT_TOLERANCE = 1e-12;

/**
 * Integrates log-concave spikes (see the module comment). Create one per thread or nesting level
 * and reuse it: it keeps its work arrays between calls. After `integrate`, `moments[j]` holds
 * E[m_j] = Int m_j exp(g) / Int exp(g) for the integrand's moment functions.
 *
 * @example
 * const I = new LogConcaveIntegrator(0);
 * const r = I.integrate({ moments: 0, derivatives: (x, o) => { o[0] = -x * x / 2; o[1] = -x; o[2] = -1; }, node: (x) => -x * x / 2 }, { curvatureBound: 1 });
 * r.value // log sqrt(2 pi) = 0.918938533204673
 */
export class LogConcaveIntegrator {
  /** E[m_j] of the last integration. */
  readonly moments: Float64Array;
  private readonly width: number;
  private readonly d = new Float64Array(3);
  private readonly row: Float64Array;
  private readonly fValues = new Float64Array(KRONROD_POINTS);
  private readonly lo = new Float64Array(MAX_PANELS);
  private readonly hi = new Float64Array(MAX_PANELS);
  private readonly err = new Float64Array(MAX_PANELS);
  private readonly acc: Float64Array;
  private evaluations = 0;

  /**
   * @param maxMoments the largest `moments` of any integrand this integrator will see (at most
   * {@link MAX_MOMENTS}: the grade model's Hessian in two parameters per grade needs hundreds).
   */
  constructor(maxMoments: number) {
    if (!Number.isInteger(maxMoments) || maxMoments < 0 || maxMoments > MAX_MOMENTS) {
      throw new RangeError(`LogConcaveIntegrator: maxMoments must be a whole number from 0 to ${MAX_MOMENTS}; got ${maxMoments}.`);
    }
    this.width = 1 + maxMoments;
    this.moments = new Float64Array(Math.max(1, maxMoments));
    this.row = new Float64Array(Math.max(1, maxMoments));
    this.acc = new Float64Array(MAX_PANELS * this.width);
  }

  /** Integrates exp(g) for the integrand `f`; see {@link LogConcaveIntegral}. Never throws for a finite, concave g. */
  integrate(f: LogConcaveIntegrand, options: LogConcaveOptions = {}): LogConcaveIntegral {
    if (f.moments > this.width - 1) {
      throw new RangeError(`LogConcaveIntegrator: the integrand has ${f.moments} moments but this integrator was made for ${this.width - 1}.`);
    }
    const c = options.curvatureBound ?? 0;
    const lower = options.lower ?? -Infinity;
    const upper = options.upper ?? Infinity;
    if (!(lower < upper)) throw new RangeError(`LogConcaveIntegrator: the lower limit ${lower} must be below the upper limit ${upper}.`);
    const truncation = options.truncation ?? TRUNCATION_LOG_UNITS;
    const tolerance = options.relativeTolerance ?? RELATIVE_TOLERANCE;
    this.evaluations = 0;

    // 1. The mode: warm start, then a fresh one from the integrand's guess.
    let iterations = 0;
    const warm = options.start;
    let found = Number.isFinite(warm) ? this.findMode(f, warm!, c) : NaN;
    iterations += this.lastIterations;
    if (Number.isNaN(found)) {
      const fresh = f.guess ? f.guess() : 0;
      found = this.findMode(f, Number.isFinite(fresh) ? fresh : 0, c);
      iterations += this.lastIterations;
      if (Number.isNaN(found) && fresh !== 0) {
        found = this.findMode(f, 0, c);
        iterations += this.lastIterations;
      }
    }
    const fail = (reason: string, mode = Number.NaN): LogConcaveIntegral => ({
      value: Number.NaN,
      converged: false,
      reason,
      mode,
      gMax: Number.NaN,
      leftWidth: 0,
      rightWidth: 0,
      panels: 0,
      evaluations: this.evaluations,
      modeIterations: iterations,
      relativeError: Number.POSITIVE_INFINITY,
    });
    if (Number.isNaN(found)) {
      return fail(`the mode of the integrand was not found in ${iterations} Newton and bisection steps from a warm and a fresh start`);
    }
    // On a finite range the maximum of a concave g is the mode clamped to the range.
    const mode = found < lower ? lower : found > upper ? upper : found;
    const d = this.d;
    f.derivatives(mode, d);
    this.evaluations++;
    const gMax = d[0];
    if (!Number.isFinite(gMax)) return fail(`the integrand is not finite at its mode ${mode}`, mode);
    if (f.prepare) f.prepare(mode, d);

    // 2. Truncation half-widths.
    const curvature = -d[2];
    const sigma = curvature > 0 ? 1 / Math.sqrt(curvature) : 1;
    // With g'' <= -c the drop of `truncation` below g(mode) is reached within sqrt(2 L / c) of the
    // true maximiser; the mode found may miss it by |g'(mode)| / c (and g(mode) the maximum by
    // g'^2 / (2c)), which matters when the curvature is c itself (a purely normal integrand).
    const slack = c > 0 ? Math.abs(d[1]) / c : 0;
    const maxWidth = c > 0 ? Math.sqrt((2 * (truncation + 0.5 * slack * slack * c)) / c) + slack : Infinity;
    const left = mode > lower ? Math.min(mode - lower, this.halfWidth(f, mode, -1, gMax - truncation, options.leftWidth, sigma, maxWidth, truncation)) : 0;
    const right = mode < upper ? Math.min(upper - mode, this.halfWidth(f, mode, 1, gMax - truncation, options.rightWidth, sigma, maxWidth, truncation)) : 0;
    if (!(left >= 0 && right >= 0) || !(left + right > 0)) {
      return fail(`the truncation points around the mode ${mode} were not found`, mode);
    }

    // 3. Adaptive G10/K21 with global error control.
    const w = this.width;
    const m = f.moments;
    let panels = 0;
    if (left > 0) {
      panels = this.addPanel(f, panels, mode - left, mode - 0.5 * left, gMax, m);
      panels = this.addPanel(f, panels, mode - 0.5 * left, mode, gMax, m);
    }
    if (right > 0) {
      panels = this.addPanel(f, panels, mode, mode + 0.5 * right, gMax, m);
      panels = this.addPanel(f, panels, mode + 0.5 * right, mode + right, gMax, m);
    }
    let sum = 0;
    let error = 0;
    for (;;) {
      sum = 0;
      error = 0;
      let worst = 0;
      for (let i = 0; i < panels; i++) {
        sum += this.acc[i * w];
        error += this.err[i];
        if (this.err[i] > this.err[worst]) worst = i;
      }
      if (error <= tolerance * sum || panels >= MAX_PANELS || !Number.isFinite(sum)) break;
      const a = this.lo[worst];
      const b = this.hi[worst];
      const mid = 0.5 * (a + b);
      if (!(mid > a && mid < b)) break; // the panel cannot be split further in floating point
      panels--;
      this.copyPanel(panels, worst);
      panels = this.addPanel(f, panels, a, mid, gMax, m);
      panels = this.addPanel(f, panels, mid, b, gMax, m);
    }
    for (let j = 0; j < m; j++) {
      let s = 0;
      for (let i = 0; i < panels; i++) s += this.acc[i * w + 1 + j];
      this.moments[j] = s / sum;
    }
    const value = gMax + Math.log(sum);
    const relativeError = error / sum;
    const finite = Number.isFinite(value) && sum > 0;
    const converged = finite && relativeError <= tolerance;
    return {
      value,
      converged,
      ...(converged
        ? {}
        : {
            reason: finite
              ? `the error estimate ${relativeError.toExponential(1)} stayed above the tolerance ${tolerance} with ${panels} panels`
              : `the integral is not finite (mode ${mode}, log-maximum ${gMax})`,
          }),
      mode,
      gMax,
      leftWidth: left,
      rightWidth: right,
      panels,
      evaluations: this.evaluations,
      modeIterations: iterations,
      relativeError,
    };
  }

  private lastIterations = 0;

  /**
   * Mode of a concave g from x0: safeguarded Newton on g' in a bracket [lo, hi] with g'(lo) > 0 >
   * g'(hi). Returns NaN when it does not converge (the caller then starts afresh).
   */
  private findMode(f: LogConcaveIntegrand, x0: number, c: number): number {
    const d = this.d;
    let x = x0;
    let lo = -Infinity;
    let hi = Infinity;
    let lastStep = Infinity;
    for (let iteration = 1; iteration <= MODE_ITERATIONS; iteration++) {
      this.lastIterations = iteration;
      f.derivatives(x, d);
      this.evaluations++;
      const g1 = d[1];
      const g2 = d[2];
      if (!Number.isFinite(g1) || Number.isNaN(g2)) return Number.NaN;
      if (g1 === 0) return x;
      if (g1 > 0) {
        lo = x;
        // g'' <= -c: g' reaches 0 within g'(x) / c to the right.
        if (c > 0 && hi === Infinity) hi = x + g1 / c;
      } else {
        hi = x;
        if (c > 0 && lo === -Infinity) lo = x + g1 / c;
      }
      const newton = g2 < 0 ? x - g1 / g2 : Number.NaN;
      if (g2 < 0 && (g1 * g1) / -g2 < DECREMENT_TOLERANCE) {
        return newton > lo && newton < hi ? newton : x;
      }
      let next: number;
      const bracketed = Number.isFinite(lo) && Number.isFinite(hi);
      // Newton when it stays inside the bracket and at least halves the last step (rtsafe).
      if (newton > lo && newton < hi && Math.abs(newton - x) <= 0.5 * Math.abs(lastStep)) {
        next = newton;
      } else if (newton > lo && newton < hi && !bracketed) {
        next = newton;
      } else if (bracketed) {
        next = 0.5 * (lo + hi);
      } else {
        // One side open and no curvature bound: walk outward with doubling steps.
        const step = Number.isFinite(lastStep) ? 2 * Math.abs(lastStep) : 1;
        next = x + (g1 > 0 ? step : -step);
      }
      if (next === x || (bracketed && hi - lo <= 4 * Number.EPSILON * Math.max(1, Math.abs(x)))) return x;
      lastStep = next - x;
      x = next;
    }
    return Number.NaN;
  }

  /**
   * Distance u from the mode (on side -1 or +1) where g(mode + side u) has dropped to `target`,
   * within 2 log-units beyond it. Newton's step on the concave g, from the warm width or the
   * Gaussian guess, inside a bracket [inside, outside] of the target; when a step from outside
   * does not halve the bracket (Newton creeps along a cliff, as on the side of a zero-default
   * period at high rho where g falls double-exponentially) the bracket is bisected instead (by
   * eighths while no inside point other than the mode is known). Returns NaN when no point beyond
   * the target was found.
   */
  private halfWidth(
    f: LogConcaveIntegrand,
    mode: number,
    side: number,
    target: number,
    warm: number | undefined,
    sigma: number,
    maxWidth: number,
    truncation: number,
  ): number {
    const d = this.d;
    const guess = Math.sqrt(2 * truncation) * sigma;
    let u = warm !== undefined && warm > 0 && Number.isFinite(warm) ? warm : guess;
    if (u > maxWidth) u = maxWidth;
    if (!(u > 0)) u = 1;
    let inside = 0;
    let outside = Infinity;
    for (let iteration = 0; iteration < 100; iteration++) {
      f.derivatives(mode + side * u, d);
      this.evaluations++;
      const excess = d[0] - target;
      const slope = side * d[1]; // d g / d u, negative beyond the mode
      // On the target within 1e-6 log-units counts as reached (Newton from inside lands there).
      if (excess <= 1e-6 && excess > -2) return u;
      if (Number.isNaN(excess)) return Number.NaN;
      if (excess > 1e-6) {
        // At the bound the drop is at least `truncation` in exact arithmetic; more is not concave.
        if (u >= maxWidth) return Number.NaN;
        inside = u;
      } else {
        outside = u;
      }
      let next = slope < 0 ? u - excess / slope : Number.NaN;
      if (outside < Infinity) {
        const halves = excess > 0 || next <= inside + 0.5 * (outside - inside);
        if (!(next > inside && next < outside) || !halves) next = inside > 0 ? 0.5 * (inside + outside) : 0.125 * outside;
      } else {
        if (!(next > u)) next = 2 * u;
        if (next > maxWidth) next = maxWidth;
      }
      if (next === u) break;
      u = next;
    }
    // A point beyond the target is a valid cut, only a wider one.
    return outside < Infinity ? outside : Number.NaN;
  }

  /** The G10/K21 rule on [a, b] for exp(g - gMax) and its moments, into slot i. */
  private addPanel(f: LogConcaveIntegrand, i: number, a: number, b: number, gMax: number, m: number): number {
    const half = 0.5 * (b - a);
    const centre = 0.5 * (b + a);
    const w = this.width;
    const base = i * w;
    const acc = this.acc;
    const row = this.row;
    const fv = this.fValues;
    for (let j = 0; j < w; j++) acc[base + j] = 0;
    let resK = 0;
    let resG = 0;
    for (let j = 0; j < KRONROD_POINTS; j++) {
      const x = centre + half * KRONROD_NODES[j];
      const value = Math.exp(f.node(x, row) - gMax);
      fv[j] = value;
      const wk = KRONROD_WEIGHTS[j];
      resK += wk * value;
      resG += GAUSS_WEIGHTS[j] * value;
      if (m > 0) {
        const wf = wk * value;
        for (let q = 0; q < m; q++) acc[base + 1 + q] += wf * row[q];
      }
    }
    this.evaluations += KRONROD_POINTS;
    const mean = 0.5 * resK;
    let resAsc = 0;
    for (let j = 0; j < KRONROD_POINTS; j++) resAsc += KRONROD_WEIGHTS[j] * Math.abs(fv[j] - mean);
    this.lo[i] = a;
    this.hi[i] = b;
    this.err[i] = quadpackError(resK * half, resG * half, resAsc * half);
    acc[base] = resK * half;
    for (let q = 0; q < m; q++) acc[base + 1 + q] *= half;
    return i + 1;
  }

  private copyPanel(from: number, to: number): void {
    this.lo[to] = this.lo[from];
    this.hi[to] = this.hi[from];
    this.err[to] = this.err[from];
    const w = this.width;
    for (let j = 0; j < w; j++) this.acc[to * w + j] = this.acc[from * w + j];
  }
}

/**
 * log Int exp(g(x)) dx for a strictly concave g given with its first two derivatives: the
 * one-call form of {@link LogConcaveIntegrator} for integrands without moments.
 *
 * Method: mode-bracketed adaptive Gauss-Kronrod (module comment); relative error of the integral
 * below `relativeTolerance` (default 1e-8) by QUADPACK's pessimistic estimate, ~1e-12 in practice.
 *
 * Special cases: a g that is not concave may give a wrong answer with converged = true; a g that
 * is not finite at its mode, or whose mode is not found, gives converged = false with a reason and
 * value NaN (never a silent number).
 *
 * @example logConcaveIntegral((x) => [-x * x / 2, -x, -1], { curvatureBound: 1 }).value // 0.9189385332046727
 *
 * Reference: Piessens et al. (1983), QUADPACK (qk21, qag).
 */
export function logConcaveIntegral(
  g: (x: number) => readonly [number, number, number],
  options: LogConcaveOptions = {},
): LogConcaveIntegral {
  const integrand: LogConcaveIntegrand = {
    moments: 0,
    derivatives(x, out) {
      const v = g(x);
      out[0] = v[0];
      out[1] = v[1];
      out[2] = v[2];
    },
    node(x) {
      return g(x)[0];
    },
  };
  return new LogConcaveIntegrator(0).integrate(integrand, options);
}
