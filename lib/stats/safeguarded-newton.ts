/**
 * Safeguarded Newton's method for a root of a function of one variable inside a bracket.
 *
 * Reference: Press, W. H., Teukolsky, S. A., Vetterling, W. T. & Flannery, B. P. (2007),
 * Numerical Recipes, 3rd ed., section 9.4 ("Newton-Raphson method using derivative", the
 * bracketed hybrid with bisection); Dennis, J. E. & Schnabel, R. B. (1983), Numerical Methods for
 * Unconstrained Optimization and Nonlinear Equations, section 2.5 (safeguarded methods).
 */
import type { IterativeResult } from './brent';

/** A function value and its derivative. */
export interface ValueAndSlope {
  f: number;
  df: number;
}

/** Result of {@link safeguardedNewtonRoot}. */
export interface NewtonRootResult extends IterativeResult {
  /** f at `value` (the last point evaluated, or a bracket end). */
  fValue: number;
  /** Function evaluations used. */
  evaluations: number;
}

export interface NewtonRootOptions {
  /** Absolute tolerance on x (default 1e-10). */
  tolerance?: number;
  /** Iteration limit (default 100). */
  maxIterations?: number;
  /** First point to evaluate, in [lower, upper] (default: the midpoint of the bracket). */
  start?: number;
}

/**
 * Finds a zero of f in [lower, upper], where f(lower) and f(upper) have opposite signs, using f'.
 *
 * Method: keeps a bracket [a, b] with a sign change. From the current point x it proposes the
 * Newton step x - f(x)/f'(x); the step is replaced by bisection of the bracket when it leaves the
 * open bracket, when f' is zero or not finite, or when it is not at least halving the step of two
 * iterations ago (so convergence is never slower than bisection, and quadratic near a simple root
 * with an accurate derivative). Stops when the proposed step is below the tolerance (the root is
 * then within ~tolerance of the returned point when f' is accurate to a few digits) or the bracket
 * is shorter than twice the tolerance. The returned value is always a point where f was evaluated
 * (or a bracket end), so callers can reuse what they computed there.
 *
 * Special cases: f(lower) = 0 or f(upper) = 0 returns that end; no sign change, a bad interval,
 * or NaN from f throws RangeError.
 *
 * @example
 * safeguardedNewtonRoot((x) => ({ f: x * x - 2, df: 2 * x }), 0, 2, -2, 2).value; // ~1.41421356
 *
 * Reference: Press et al. (2007), Numerical Recipes, 3rd ed., section 9.4 (rtsafe).
 */
export function safeguardedNewtonRoot(
  fn: (x: number) => ValueAndSlope,
  lower: number,
  upper: number,
  fLower: number,
  fUpper: number,
  options: NewtonRootOptions = {},
): NewtonRootResult {
  const tol = options.tolerance ?? 1e-10;
  const maxIterations = options.maxIterations ?? 100;
  if (!Number.isFinite(lower) || !Number.isFinite(upper) || !(lower < upper)) {
    throw new RangeError(`safeguardedNewtonRoot: the interval must be finite with lower < upper; got [${lower}, ${upper}].`);
  }
  if (!(tol > 0)) throw new RangeError(`safeguardedNewtonRoot: tolerance must be positive; got ${tol}.`);
  if (Number.isNaN(fLower) || Number.isNaN(fUpper)) {
    throw new RangeError('safeguardedNewtonRoot: f is NaN at an end of the interval; it must be defined on the whole interval.');
  }
  if (fLower === 0) return { value: lower, fValue: 0, converged: true, iterations: 0, evaluations: 0 };
  if (fUpper === 0) return { value: upper, fValue: 0, converged: true, iterations: 0, evaluations: 0 };
  if ((fLower > 0) === (fUpper > 0)) {
    throw new RangeError(
      `safeguardedNewtonRoot: f has the same sign at both ends of [${lower}, ${upper}] (f = ${fLower} and ${fUpper}); bracket a sign change first.`,
    );
  }
  // a: the end where f < 0; b: the end where f > 0 (a may be above b).
  let a = fLower < 0 ? lower : upper;
  let b = fLower < 0 ? upper : lower;
  let fa = fLower < 0 ? fLower : fUpper;
  let fb = fLower < 0 ? fUpper : fLower;
  let x = options.start ?? 0.5 * (lower + upper);
  if (!(x >= lower && x <= upper)) x = 0.5 * (lower + upper);
  let evaluations = 0;
  const evaluate = (at: number): ValueAndSlope => {
    evaluations++;
    const r = fn(at);
    if (Number.isNaN(r.f)) {
      throw new RangeError(`safeguardedNewtonRoot: f returned NaN at x = ${at}; it must be defined on the whole interval.`);
    }
    return r;
  };
  let cur = evaluate(x);
  let stepOld = Math.abs(upper - lower);
  let step = stepOld;
  for (let iteration = 1; iteration <= maxIterations; iteration++) {
    if (cur.f === 0) return { value: x, fValue: 0, converged: true, iterations: iteration - 1, evaluations };
    if (cur.f < 0) {
      a = x;
      fa = cur.f;
    } else {
      b = x;
      fb = cur.f;
    }
    const lo = Math.min(a, b);
    const hi = Math.max(a, b);
    let next = x - cur.f / cur.df;
    const newtonOk = Number.isFinite(next) && next > lo && next < hi && Math.abs(next - x) < 0.5 * stepOld;
    stepOld = step;
    if (!newtonOk) next = 0.5 * (lo + hi);
    step = Math.abs(next - x);
    if (newtonOk && step < tol) return { value: x, fValue: cur.f, converged: true, iterations: iteration, evaluations };
    if (hi - lo < 2 * tol) {
      // The bracket has closed: report the end with the smaller |f| (both within 2 tol of the root).
      const atA = Math.abs(fa) <= Math.abs(fb);
      return { value: atA ? a : b, fValue: atA ? fa : fb, converged: true, iterations: iteration, evaluations };
    }
    x = next;
    cur = evaluate(x);
  }
  return { value: x, fValue: cur.f, converged: false, iterations: maxIterations, evaluations };
}
