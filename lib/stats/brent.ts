/**
 * Brent's (1973) one-dimensional methods without derivatives: a minimiser combining golden-section
 * search with successive parabolic interpolation, and a root finder combining bisection, the secant
 * rule and inverse quadratic interpolation.
 *
 * Reference: Brent, R. P. (1973). Algorithms for Minimization without Derivatives. Prentice-Hall.
 * Chapter 4 (procedure `zero`) and chapter 5 (procedure `localmin`).
 */

/** Result of an iterative routine: the value, whether the tolerance was met, the iterations used. */
export interface IterativeResult {
  value: number;
  converged: boolean;
  iterations: number;
}

/** Result of {@link brentMinimize}: the minimiser and the function value there. */
export interface MinimizeResult extends IterativeResult {
  /** f(value). */
  fValue: number;
}

/** Result of {@link brentRoot}: the root and the function value there. */
export interface RootResult extends IterativeResult {
  /** f(value); zero or of the smallest magnitude found. */
  fValue: number;
}

export interface BrentOptions {
  /** Absolute tolerance on the argument (default 1e-10). */
  tolerance?: number;
  /** Iteration limit (default 200). */
  maxIterations?: number;
}

const SQRT_EPS = Math.sqrt(Number.EPSILON);
const GOLDEN = 0.5 * (3 - Math.sqrt(5));

function checkInterval(name: string, a: number, b: number, tolerance: number, maxIterations: number): void {
  if (!Number.isFinite(a) || !Number.isFinite(b) || !(a < b)) {
    throw new RangeError(`${name}: the interval must be finite with a < b; got [${a}, ${b}].`);
  }
  if (!(tolerance > 0)) {
    throw new RangeError(`${name}: tolerance must be positive; got ${tolerance}.`);
  }
  if (!Number.isInteger(maxIterations) || maxIterations < 1) {
    throw new RangeError(`${name}: maxIterations must be a positive integer; got ${maxIterations}.`);
  }
}

function finiteValue(name: string, f: (x: number) => number, x: number): number {
  const y = f(x);
  if (Number.isNaN(y)) {
    throw new RangeError(`${name}: the function returned NaN at x = ${x}; it must be defined on the whole interval.`);
  }
  return y;
}

/**
 * Minimises a function of one variable on a closed interval (Brent's `localmin`).
 *
 * Finds a local minimiser `x* in [a, b]` of `f`; when `f` is unimodal on the interval it is the global
 * minimiser, otherwise a local one (callers that cannot rule out several minima bracket first).
 *
 * Method: golden-section steps guarantee linear convergence; successive parabolic interpolation
 * through the three best points gives superlinear convergence near a smooth minimum. The result is
 * within `3 tol` of a local minimiser, where `tol = sqrt(eps) |x| + tolerance` (Brent 1973, ch. 5).
 * The minimiser may be an end point: the iterates then converge to within `tol` of it.
 *
 * Special cases: a non-finite or empty interval throws RangeError; `f` returning NaN throws
 * RangeError; `+Infinity` is accepted as a (very bad) function value.
 *
 * @example
 * brentMinimize((x) => (x - 2) ** 2, 0, 5).value; // ~2
 *
 * Reference: Brent (1973), Algorithms for Minimization without Derivatives, ch. 5, procedure localmin.
 */
export function brentMinimize(
  f: (x: number) => number,
  lower: number,
  upper: number,
  options: BrentOptions = {},
): MinimizeResult {
  const t = options.tolerance ?? 1e-10;
  const maxIterations = options.maxIterations ?? 200;
  checkInterval('brentMinimize', lower, upper, t, maxIterations);
  let a = lower;
  let b = upper;
  let x = a + GOLDEN * (b - a);
  let w = x;
  let v = x;
  let fx = finiteValue('brentMinimize', f, x);
  let fw = fx;
  let fv = fx;
  let d = 0;
  let e = 0;
  for (let iteration = 1; iteration <= maxIterations; iteration++) {
    const m = 0.5 * (a + b);
    const tol = SQRT_EPS * Math.abs(x) + t;
    const t2 = 2 * tol;
    if (Math.abs(x - m) <= t2 - 0.5 * (b - a)) {
      return { value: x, fValue: fx, converged: true, iterations: iteration - 1 };
    }
    let p = 0;
    let q = 0;
    let r = 0;
    if (Math.abs(e) > tol) {
      // Fit a parabola through x, w, v.
      r = (x - w) * (fx - fv);
      q = (x - v) * (fx - fw);
      p = (x - v) * q - (x - w) * r;
      q = 2 * (q - r);
      if (q > 0) p = -p;
      else q = -q;
      r = e;
      e = d;
    }
    if (Math.abs(p) < Math.abs(0.5 * q * r) && p > q * (a - x) && p < q * (b - x)) {
      // Parabolic interpolation step; keep f from being evaluated too close to a or b.
      d = p / q;
      const u = x + d;
      if (u - a < t2 || b - u < t2) d = x < m ? tol : -tol;
    } else {
      // Golden-section step into the larger of the two segments.
      e = (x < m ? b : a) - x;
      d = GOLDEN * e;
    }
    const u = x + (Math.abs(d) >= tol ? d : d > 0 ? tol : -tol);
    const fu = finiteValue('brentMinimize', f, u);
    if (fu <= fx) {
      if (u < x) b = x;
      else a = x;
      v = w;
      fv = fw;
      w = x;
      fw = fx;
      x = u;
      fx = fu;
    } else {
      if (u < x) a = u;
      else b = u;
      if (fu <= fw || w === x) {
        v = w;
        fv = fw;
        w = u;
        fw = fu;
      } else if (fu <= fv || v === x || v === w) {
        v = u;
        fv = fu;
      }
    }
  }
  return { value: x, fValue: fx, converged: false, iterations: maxIterations };
}

/**
 * Finds a zero of a continuous function on an interval where it changes sign (Brent's `zero`).
 *
 * Returns `x` with `f(x) = 0` to within `2 eps |x| + tolerance`, given `f(a) f(b) <= 0`.
 *
 * Method: keeps a bracketing interval and takes an inverse-quadratic-interpolation or secant step
 * when it is safe and shrinks the bracket fast enough, a bisection step otherwise; so it never
 * converges more slowly than bisection and usually superlinearly (Brent 1973, ch. 4).
 *
 * Special cases: `f(a) = 0` or `f(b) = 0` returns that end point after one evaluation each; no sign
 * change throws RangeError (the caller must bracket); NaN from `f` throws RangeError.
 *
 * @example
 * brentRoot((x) => x * x - 2, 0, 2).value; // ~1.4142135623730951
 *
 * Reference: Brent (1973), Algorithms for Minimization without Derivatives, ch. 4, procedure zero.
 */
export function brentRoot(
  f: (x: number) => number,
  lower: number,
  upper: number,
  options: BrentOptions = {},
): RootResult {
  const t = options.tolerance ?? 1e-12;
  const maxIterations = options.maxIterations ?? 200;
  checkInterval('brentRoot', lower, upper, t, maxIterations);
  let a = lower;
  let b = upper;
  let fa = finiteValue('brentRoot', f, a);
  let fb = finiteValue('brentRoot', f, b);
  if (fa === 0) return { value: a, fValue: 0, converged: true, iterations: 0 };
  if (fb === 0) return { value: b, fValue: 0, converged: true, iterations: 0 };
  if ((fa > 0 && fb > 0) || (fa < 0 && fb < 0)) {
    throw new RangeError(
      `brentRoot: f has the same sign at both ends of [${lower}, ${upper}] (f = ${fa} and ${fb}); bracket a sign change first.`,
    );
  }
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let iteration = 1; iteration <= maxIterations; iteration++) {
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol = 2 * Number.EPSILON * Math.abs(b) + t;
    const m = 0.5 * (c - b);
    if (Math.abs(m) <= tol || fb === 0) {
      return { value: b, fValue: fb, converged: true, iterations: iteration - 1 };
    }
    if (Math.abs(e) < tol || Math.abs(fa) <= Math.abs(fb)) {
      d = m;
      e = m;
    } else {
      let s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        // Secant (linear interpolation).
        p = 2 * m * s;
        q = 1 - s;
      } else {
        // Inverse quadratic interpolation.
        const qa = fa / fc;
        const r = fb / fc;
        p = s * (2 * m * qa * (qa - r) - (b - a) * (r - 1));
        q = (qa - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      s = e;
      e = d;
      if (2 * p < 3 * m * q - Math.abs(tol * q) && p < Math.abs(0.5 * s * q)) {
        d = p / q;
      } else {
        d = m;
        e = m;
      }
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol ? d : m > 0 ? tol : -tol;
    fb = finiteValue('brentRoot', f, b);
    if ((fb > 0 && fc > 0) || (fb <= 0 && fc <= 0)) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
  }
  return { value: b, fValue: fb, converged: false, iterations: maxIterations };
}
