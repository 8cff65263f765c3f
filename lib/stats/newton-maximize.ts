/**
 * Newton's method for the maximum of a smooth function of several parameters with exact gradient
 * and Hessian, some parameters held fixed and simple bounds on others.
 */

/** Value, gradient and Hessian (row-major, P x P) at a point. */
export interface SmoothValue {
  value: number;
  gradient: ArrayLike<number>;
  hessian: ArrayLike<number>;
}

/** Options of {@link newtonMaximize}. */
export interface NewtonMaximizeOptions {
  /** Which parameters move (default all). */
  free?: readonly boolean[];
  /** Lower and upper bounds per parameter (default unbounded). */
  lower?: readonly number[];
  upper?: readonly number[];
  /** Largest change of any parameter in one step (default 1). */
  maxStep?: number;
  /** Stop when the gain Newton's step predicts is below this (log-likelihood units; default 1e-10). */
  tolerance?: number;
  /** Iteration limit (default 100). */
  maxIterations?: number;
}

/** Result of {@link newtonMaximize}. */
export interface NewtonMaximizeResult {
  theta: number[];
  value: number;
  /** The evaluation at theta (gradient and Hessian there). */
  at: SmoothValue;
  converged: boolean;
  iterations: number;
  evaluations: number;
}

/** Solves (A + lambda I) x = b for a symmetric A (n x n, row-major) by Cholesky; null when not positive definite. */
function choleskySolve(A: Float64Array, n: number, b: Float64Array): Float64Array | null {
  const L = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = A[i * n + j];
      for (let k = 0; k < j; k++) s -= L[i * n + k] * L[j * n + k];
      if (i === j) {
        if (!(s > 0)) return null;
        L[i * n + i] = Math.sqrt(s);
      } else {
        L[i * n + j] = s / L[j * n + j];
      }
    }
  }
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let k = 0; k < i; k++) s -= L[i * n + k] * y[k];
    y[i] = s / L[i * n + i];
  }
  const x = new Float64Array(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i];
    for (let k = i + 1; k < n; k++) s -= L[k * n + i] * x[k];
    x[i] = s / L[i * n + i];
  }
  return x;
}

/**
 * Inverse of a symmetric positive-definite matrix (row-major), or null when it is not positive
 * definite. Used for standard errors and Wald-type starts.
 */
export function invertPositiveDefinite(A: ArrayLike<number>, n: number): Float64Array | null {
  const M = Float64Array.from(A);
  const out = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    const e = new Float64Array(n);
    e[j] = 1;
    const col = choleskySolve(M, n, e);
    if (!col) return null;
    for (let i = 0; i < n; i++) out[i * n + j] = col[i];
  }
  return out;
}

/**
 * Maximises f over its free parameters by Newton's method (exact Hessian), with a
 * Levenberg-Marquardt shift where the Hessian is not negative definite, a step limit, projection
 * onto the bounds and backtracking whenever a step does not increase f.
 *
 * Method: at each iterate the free parameters that sit on a bound with the gradient pointing out
 * of the feasible set are held (an active set); the others take the step s solving
 * (-H + lambda I) s = g (lambda = 0, else increased from 1e-8 |H| by tenfold steps until the
 * shifted matrix is positive definite), cut to `maxStep` and projected on the bounds; the step is
 * halved up to 40 times until f does not decrease (by more than 1e-12 relative). Converged when
 * the predicted gain g.s / 2 is below `tolerance` with lambda = 0 (a Newton step, so the maximum
 * is reached to the square of that step), or when no step increases f and the predicted gain is
 * below 1e-8 relative to |f| (rounding).
 *
 * Special cases: NaN from f throws RangeError; a start outside the bounds is projected on them.
 *
 * @example newtonMaximize((t) => ({ value: -(t[0] - 1) ** 2, gradient: [-2 * (t[0] - 1)], hessian: [-2] }), [0]).theta // [1]
 *
 * Reference: Nocedal, J. & Wright, S. J. (2006), Numerical Optimization, 2nd ed., ch. 3.4 (Newton
 * with Hessian modification) and 16.7 (projected steps on bounds); Levenberg (1944), Marquardt (1963).
 */
export function newtonMaximize(
  fn: (theta: readonly number[]) => SmoothValue,
  start: readonly number[],
  options: NewtonMaximizeOptions = {},
): NewtonMaximizeResult {
  const P = start.length;
  const free = options.free ?? new Array<boolean>(P).fill(true);
  const lower = options.lower ?? new Array<number>(P).fill(-Infinity);
  const upper = options.upper ?? new Array<number>(P).fill(Infinity);
  const maxStep = options.maxStep ?? 1;
  const tolerance = options.tolerance ?? 1e-10;
  const maxIterations = options.maxIterations ?? 100;
  const clamp = (v: number, i: number) => Math.min(upper[i], Math.max(lower[i], v));
  let theta = start.map(clamp);
  let evaluations = 1;
  const evaluate = (t: readonly number[]) => {
    const r = fn(t);
    if (Number.isNaN(r.value)) throw new RangeError(`newtonMaximize: the function is NaN at [${t.join(', ')}].`);
    return r;
  };
  let cur = evaluate(theta);
  for (let iteration = 1; iteration <= maxIterations; iteration++) {
    const idx: number[] = [];
    for (let i = 0; i < P; i++) {
      if (!free[i]) continue;
      const g = cur.gradient[i];
      if ((theta[i] <= lower[i] && g <= 0) || (theta[i] >= upper[i] && g >= 0)) continue;
      idx.push(i);
    }
    const n = idx.length;
    if (n === 0) return { theta, value: cur.value, at: cur, converged: true, iterations: iteration - 1, evaluations };
    const A = new Float64Array(n * n);
    const b = new Float64Array(n);
    let scale = 0;
    for (let r = 0; r < n; r++) {
      b[r] = cur.gradient[idx[r]];
      for (let c = 0; c < n; c++) A[r * n + c] = -cur.hessian[idx[r] * P + idx[c]];
      scale = Math.max(scale, Math.abs(A[r * n + r]));
    }
    let lambda = 0;
    let s = choleskySolve(A, n, b);
    while (!s) {
      lambda = lambda === 0 ? 1e-8 * Math.max(scale, 1) : lambda * 10;
      if (!Number.isFinite(lambda) || lambda > 1e12 * Math.max(scale, 1)) break;
      const shifted = Float64Array.from(A);
      for (let r = 0; r < n; r++) shifted[r * n + r] += lambda;
      s = choleskySolve(shifted, n, b);
    }
    if (!s) return { theta, value: cur.value, at: cur, converged: false, iterations: iteration, evaluations };
    let gain = 0;
    for (let r = 0; r < n; r++) gain += b[r] * s[r];
    gain *= 0.5;
    if (lambda === 0 && gain < tolerance) return { theta, value: cur.value, at: cur, converged: true, iterations: iteration - 1, evaluations };
    let longest = 0;
    for (let r = 0; r < n; r++) longest = Math.max(longest, Math.abs(s[r]));
    let factor = longest > maxStep ? maxStep / longest : 1;
    let accepted = false;
    for (let halvings = 0; halvings <= 40; halvings++) {
      const next = theta.slice();
      for (let r = 0; r < n; r++) next[idx[r]] = clamp(theta[idx[r]] + factor * s[r], idx[r]);
      const trial = evaluate(next);
      evaluations++;
      if (trial.value >= cur.value - 1e-12 * Math.abs(cur.value)) {
        theta = next;
        cur = trial;
        accepted = true;
        break;
      }
      factor *= 0.5;
    }
    if (!accepted) {
      const converged = gain <= 1e-8 * Math.max(1, Math.abs(cur.value));
      return { theta, value: cur.value, at: cur, converged, iterations: iteration, evaluations };
    }
  }
  return { theta, value: cur.value, at: cur, converged: false, iterations: maxIterations, evaluations };
}
