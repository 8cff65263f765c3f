/**
 * Whether a matrix is a valid correlation matrix, and the largest uniform add-on to its
 * off-diagonal entries that keeps it one.
 */
import { symmetricEigen } from './nearest-correlation';

/** Smallest eigenvalue still taken as 0 (rounding of a PSD matrix; Higham's projection leaves about -1e-12). Common practice. */
export const PSD_TOLERANCE = 1e-10;

/** Result of {@link checkCorrelationMatrix}: valid, or the first problem in a sentence. */
export type CorrelationMatrixCheck =
  | { valid: true; smallestEigenvalue: number }
  | { valid: false; smallestEigenvalue: number | null; problem: string };

/**
 * Checks that a matrix is a correlation matrix: square, finite, symmetric, unit diagonal, every
 * entry in [-1, 1], and positive semi-definite.
 *
 * C is a correlation matrix iff C = C^T, C_ii = 1, and lambda_min(C) >= 0.
 *
 * Method: the structural conditions entry by entry (diagonal to 1e-12, symmetry to 1e-12), then
 * the eigenvalues by cyclic Jacobi (symmetricEigen, Golub & Van Loan 2013, 8.5.3); positive
 * semi-definite when the smallest is at least -PSD_TOLERANCE.
 *
 * Special cases: an empty matrix is refused; a 1 x 1 matrix [[1]] is valid. `names` (one per
 * row) name the rows and entries in the sentences; otherwise rows are numbered from 1.
 *
 * @example checkCorrelationMatrix([[1, 0.5], [0.5, 1]]) // { valid: true, smallestEigenvalue: 0.5 }
 * @example checkCorrelationMatrix([[1, 0.9, -0.9], [0.9, 1, 0.9], [-0.9, 0.9, 1]]).valid // false
 *
 * Reference: Higham, N. J. (2002), IMA Journal of Numerical Analysis 22:329-343, section 1 (the
 * set of correlation matrices).
 */
export function checkCorrelationMatrix(matrix: readonly (readonly number[])[], names?: readonly string[]): CorrelationMatrixCheck {
  const n = matrix.length;
  const row = (i: number) => (names?.[i] !== undefined ? `“${names[i]}”` : `row ${i + 1}`);
  const entry = (i: number, j: number) => (names?.[i] !== undefined && names?.[j] !== undefined ? `${names[i]}–${names[j]}` : `(${i + 1}, ${j + 1})`);
  const refuse = (problem: string, smallestEigenvalue: number | null = null): CorrelationMatrixCheck => ({ valid: false, smallestEigenvalue, problem });
  if (n === 0) return refuse('The matrix is empty: a correlation matrix has at least one row.');
  for (let i = 0; i < n; i++) {
    if (matrix[i].length !== n) return refuse(`The matrix is not square: ${row(i)} has ${matrix[i].length} entries, not ${n}.`);
  }
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const v = matrix[i][j];
      if (!Number.isFinite(v)) return refuse(`The entry ${entry(i, j)} is ${v}: every entry must be a finite number.`);
      if (i === j && Math.abs(v - 1) > 1e-12) return refuse(`The diagonal entry of ${row(i)} is ${v}: a correlation matrix has 1 on its diagonal.`);
      if (v < -1 || v > 1) return refuse(`The entry ${entry(i, j)} is ${v}: correlations lie between -1 and 1.`);
      if (Math.abs(v - matrix[j][i]) > 1e-12) return refuse(`The entries ${entry(i, j)} and ${entry(j, i)} differ (${v} and ${matrix[j][i]}): a correlation matrix is symmetric.`);
    }
  }
  const eig = symmetricEigen(matrix);
  const smallest = Math.min(...eig.values);
  if (!eig.converged) return refuse('The eigenvalues of the matrix could not be computed to full accuracy (the Jacobi sweeps did not converge), so its validity cannot be confirmed.', smallest);
  if (smallest < -PSD_TOLERANCE) {
    return refuse(
      `The matrix is not positive semi-definite (smallest eigenvalue ${smallest.toPrecision(4)}): no set of factors can have these correlations, and a portfolio model fed with it may fail or give negative variances.`,
      smallest,
    );
  }
  return { valid: true, smallestEigenvalue: smallest };
}

/**
 * The matrix with `margin` added to every off-diagonal entry: C + margin (J - I), J the matrix of ones.
 *
 * Special cases: a margin that is not finite throws RangeError; the result is not checked here
 * (check it with checkCorrelationMatrix: an add-on lowers every eigenvalue orthogonal to the
 * vector of ones by `margin`, so it can break positive semi-definiteness).
 *
 * @example addUniformMargin([[1, 0.2], [0.2, 1]], 0.05) // [[1, 0.25], [0.25, 1]]
 */
export function addUniformMargin(matrix: readonly (readonly number[])[], margin: number): number[][] {
  if (!Number.isFinite(margin)) throw new RangeError(`addUniformMargin: the margin is ${margin}; give a finite number.`);
  return matrix.map((r, i) => r.map((v, j) => (i === j ? v : v + margin)));
}

/**
 * The largest uniform add-on m >= 0 to the off-diagonal entries that keeps a valid correlation
 * matrix valid: the largest m with every entry + m <= 1 and lambda_min(C + m (J - I)) >= -PSD_TOLERANCE.
 *
 * Method: lambda_min of the affine family C + m (J - I) is concave in m (the minimum of linear
 * functions v^T (C + m (J - I)) v over unit v), so the feasible m form an interval starting at 0;
 * bisection on it to 1e-9 (about 30 eigen-decompositions).
 *
 * Special cases: an invalid C throws RangeError with the check's sentence; returns 0 when no
 * positive add-on keeps it valid (for example Higham's nearest matrix with an eigenvalue of 0 and
 * its eigenvector not parallel to the ones).
 *
 * @example largestValidMargin([[1, 0], [0, 1]]) // 1 (the entries reach 1)
 */
export function largestValidMargin(matrix: readonly (readonly number[])[]): number {
  const base = checkCorrelationMatrix(matrix);
  if (!base.valid) throw new RangeError(`largestValidMargin: ${base.problem}`);
  let maxOff = -1;
  for (let i = 0; i < matrix.length; i++) for (let j = 0; j < matrix.length; j++) if (i !== j) maxOff = Math.max(maxOff, matrix[i][j]);
  if (matrix.length < 2) return 0;
  const ok = (m: number) => checkCorrelationMatrix(addUniformMargin(matrix, m)).valid;
  let hi = 1 - maxOff;
  if (ok(hi)) return hi;
  let lo = 0;
  while (hi - lo > 1e-9) {
    const mid = 0.5 * (lo + hi);
    if (ok(mid)) lo = mid;
    else hi = mid;
  }
  return lo;
}
