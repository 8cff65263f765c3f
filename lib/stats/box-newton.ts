/**
 * Newton's method for the maximum of a smooth function of a few variables inside a box
 * (lower_i <= x_i <= upper_i), with exact gradient and Hessian. Used for the AR(1)-factor
 * likelihood (estimators/ar1-mle.ts), whose three parameters each have bounds.
 */

/** What the maximiser asks of the function. */
export interface BoxNewtonProblem {
  /** Value, gradient and Hessian at x (all coordinates, also the fixed ones). */
  evaluate(x: readonly number[]): { value: number; gradient: readonly number[]; hessian: readonly (readonly number[])[] };
  lower: readonly number[];
  upper: readonly number[];
  /** Largest step per coordinate in one iteration (a trust bound where the quadratic model is poor). */
  maxStep: readonly number[];
  /** Coordinates held at their start value (a profile fixes one parameter). */
  fixed?: readonly boolean[];
  /**
   * Coordinates to hold where they are, given which coordinates sit at an active bound (for a
   * parameter that has no effect when another is at its bound, such as the factor's persistence
   * when its weight rho is 0).
   */
  idleAt?: (atBound: readonly boolean[], x: readonly number[]) => readonly boolean[];
}

/** Options of {@link boxNewtonMaximize}. */
export interface BoxNewtonOptions {
  /** Stop when the Newton model promises less than this gain in value (default 1e-10). */
  tolerance?: number;
  /** Iteration limit (default 100). */
  maxIterations?: number;
}

/** Result of {@link boxNewtonMaximize}. */
export interface BoxNewtonResult {
  x: number[];
  value: number;
  gradient: number[];
  hessian: number[][];
  /** The Newton gain fell below the tolerance with a negative definite free Hessian, or every free coordinate sits at a bound it is pushed against. */
  converged: boolean;
  iterations: number;
  evaluations: number;
  /** Coordinates at a bound with the gradient pointing outward (the KKT active set). */
  atBound: boolean[];
}

/**
 * Solves (A) d = b for a symmetric positive definite A by Cholesky; null when A is not positive
 * definite (a pivot at or below 1e-300 relative to the diagonal).
 */
function choleskySolve(A: number[][], b: number[]): number[] | null {
  const m = b.length;
  const L = A.map((row) => row.slice());
  for (let j = 0; j < m; j++) {
    let s = L[j][j];
    for (let q = 0; q < j; q++) s -= L[j][q] * L[j][q];
    if (!(s > 1e-300 * Math.max(1, Math.abs(A[j][j])))) return null;
    L[j][j] = Math.sqrt(s);
    for (let i = j + 1; i < m; i++) {
      let t = L[i][j];
      for (let q = 0; q < j; q++) t -= L[i][q] * L[j][q];
      L[i][j] = t / L[j][j];
    }
  }
  const y = b.slice();
  for (let i = 0; i < m; i++) {
    for (let q = 0; q < i; q++) y[i] -= L[i][q] * y[q];
    y[i] /= L[i][i];
  }
  for (let i = m - 1; i >= 0; i--) {
    for (let q = i + 1; q < m; q++) y[i] -= L[q][i] * y[q];
    y[i] /= L[i][i];
  }
  return y;
}

/**
 * Maximises f over a box by projected Newton steps with an active set.
 *
 * Method: at x, a coordinate at a bound whose partial derivative points out of the box is held
 * there (active), and so are the coordinates idleAt names for that active set; on the free coordinates the Newton direction d solves (-H_ff + lambda I) d = g_f,
 * lambda = 0 when -H_ff is positive definite, else the smallest of 1e-6, 1e-5, ... times its
 * largest diagonal entry that makes it so (Levenberg-Marquardt). The step is shortened to the
 * per-coordinate limits maxStep, projected on the box and halved until the value does not fall
 * (backtracking, Armijo with a zero slope constant). Converged when the predicted gain
 * g_f . d / 2 with lambda = 0 is below the tolerance, when two steps in a row gain less than 10
 * times the tolerance (a flat direction, where steps are cut by maxStep), or when no coordinate is
 * free.
 *
 * Special cases: a start outside the box is projected onto it; bounds with lower > upper, or a
 * value that is not finite at the start, throw RangeError; the limit of iterations or a step that
 * cannot increase the value ends the search with converged = false.
 *
 * @example boxNewtonMaximize({ evaluate: (x) => ({ value: -(x[0] - 1) ** 2, gradient: [-2 * (x[0] - 1)], hessian: [[-2]] }), lower: [0], upper: [0.5], maxStep: [1] }, [0.2]).x // [0.5]
 *
 * Reference: Bertsekas, D. P. (1982), "Projected Newton methods for optimization problems with
 * simple constraints", SIAM J. Control and Optimization 20:221-246; Nocedal, J. & Wright, S. J.
 * (2006), Numerical Optimization, 2nd ed., sections 3.4 (Newton with Hessian modification) and
 * 16.7 (active sets for bounds).
 */
export function boxNewtonMaximize(problem: BoxNewtonProblem, start: readonly number[], options: BoxNewtonOptions = {}): BoxNewtonResult {
  const { lower, upper, maxStep } = problem;
  const n = start.length;
  const fixed = problem.fixed ?? new Array<boolean>(n).fill(false);
  for (let i = 0; i < n; i++) {
    if (!(lower[i] <= upper[i])) throw new RangeError(`boxNewtonMaximize: bound ${i} has lower ${lower[i]} above upper ${upper[i]}.`);
  }
  const tolerance = options.tolerance ?? 1e-10;
  const maxIterations = options.maxIterations ?? 100;
  const clamp = (x: number[]) => x.map((v, i) => (fixed[i] ? start[i] : Math.min(upper[i], Math.max(lower[i], v))));
  let x = clamp(start.slice());
  let cur = problem.evaluate(x);
  let evaluations = 1;
  if (!Number.isFinite(cur.value)) throw new RangeError('boxNewtonMaximize: the function is not finite at the start point.');
  let converged = false;
  let iterations = 0;
  let atBound = new Array<boolean>(n).fill(false);
  let stalls = 0;
  for (; iterations < maxIterations; iterations++) {
    const g = cur.gradient;
    atBound = x.map((v, i) => !fixed[i] && ((v <= lower[i] && g[i] <= 0) || (v >= upper[i] && g[i] >= 0)));
    const idle = problem.idleAt ? problem.idleAt(atBound, x) : null;
    const free: number[] = [];
    for (let i = 0; i < n; i++) if (!fixed[i] && !atBound[i] && !(idle && idle[i])) free.push(i);
    if (free.length === 0) {
      converged = true;
      break;
    }
    const gf = free.map((i) => g[i]);
    const negH = free.map((i) => free.map((j) => -cur.hessian[i][j]));
    let d = choleskySolve(negH, gf);
    let lambdaUsed = 0;
    if (d === null) {
      const diag = Math.max(1e-12, ...free.map((_, a) => Math.abs(negH[a][a])));
      for (let lambda = 1e-6 * diag; d === null && lambda < 1e12 * diag; lambda *= 10) {
        d = choleskySolve(negH.map((row, a) => row.map((v, b) => (a === b ? v + lambda : v))), gf);
        lambdaUsed = lambda;
      }
      if (d === null) break;
    }
    let gain = 0;
    for (let a = 0; a < free.length; a++) gain += 0.5 * gf[a] * d[a];
    if (lambdaUsed === 0 && gain < tolerance) {
      converged = true;
      break;
    }
    let t = 1;
    for (let a = 0; a < free.length; a++) t = Math.min(t, maxStep[free[a]] / Math.abs(d[a]));
    let accepted = false;
    let improvement = 0;
    for (let halvings = 0; halvings < 40; halvings++) {
      const trial = x.slice();
      for (let a = 0; a < free.length; a++) trial[free[a]] += t * d[a];
      const xn = clamp(trial);
      const next = problem.evaluate(xn);
      evaluations++;
      if (Number.isFinite(next.value) && next.value >= cur.value - 1e-13 * Math.abs(cur.value)) {
        const moved = xn.some((v, i) => v !== x[i]);
        improvement = next.value - cur.value;
        x = xn;
        cur = next;
        accepted = moved;
        break;
      }
      t *= 0.5;
    }
    if (!accepted) {
      // No step increases the value beyond rounding: converged if the model promised little.
      converged = gain < 1e3 * tolerance;
      break;
    }
    // A flat direction (a tiny curvature, or one that is not concave) where steps no longer
    // pay: two steps in a row gaining less than 10 times the tolerance end the search.
    stalls = improvement < 10 * tolerance ? stalls + 1 : 0;
    if (stalls >= 2) {
      converged = true;
      break;
    }
  }
  return {
    x,
    value: cur.value,
    gradient: cur.gradient.slice(),
    hessian: cur.hessian.map((row) => row.slice()),
    converged,
    iterations,
    evaluations,
    atBound,
  };
}
