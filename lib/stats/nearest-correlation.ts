/**
 * The nearest correlation matrix (Higham 2002) and the symmetric eigen-decomposition it needs.
 */

/**
 * Eigenvalues and eigenvectors of a symmetric matrix by the cyclic Jacobi method.
 *
 * A = V diag(values) V^T, V orthogonal (column j of V, stored row-major as V[i * n + j], is the
 * eigenvector of values[j]).
 *
 * Method: cyclic Jacobi rotations (Golub & Van Loan 2013, section 8.5.3) until the off-diagonal
 * Frobenius norm is below 1e-15 of the total or 100 sweeps; quadratic convergence, eigenvalues to
 * about 1e-15 relative of the largest for the small matrices of a segment portfolio.
 *
 * Special cases: a non-square or non-symmetric (beyond 1e-12) input throws RangeError.
 *
 * @example symmetricEigen([[2, 1], [1, 2]]).values // [1, 3] (in some order)
 *
 * Reference: Golub, G. H. & Van Loan, C. F. (2013), Matrix Computations, 4th ed., algorithm 8.5.3.
 */
export function symmetricEigen(matrix: readonly (readonly number[])[]): { values: number[]; vectors: number[][]; converged: boolean } {
  const n = matrix.length;
  matrix.forEach((row, i) => {
    if (row.length !== n) throw new RangeError(`symmetricEigen: row ${i + 1} has ${row.length} entries; the matrix must be ${n} x ${n}.`);
    row.forEach((v, j) => {
      if (!Number.isFinite(v)) throw new RangeError(`symmetricEigen: entry (${i + 1}, ${j + 1}) is ${v}; every entry must be a finite number.`);
      if (Math.abs(v - matrix[j][i]) > 1e-12 * Math.max(1, Math.abs(v))) throw new RangeError(`symmetricEigen: entries (${i + 1}, ${j + 1}) and (${j + 1}, ${i + 1}) differ; the matrix must be symmetric.`);
    });
  });
  const A = matrix.map((r) => r.slice());
  const V: number[][] = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 : 0)));
  let total = 0;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) total += A[i][j] * A[i][j];
  let converged = n <= 1;
  for (let sweep = 0; sweep < 100 && !converged; sweep++) {
    let off = 0;
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j) off += A[i][j] * A[i][j];
    if (off <= 1e-30 * total || off === 0) {
      converged = true;
      break;
    }
    for (let p = 0; p < n - 1; p++) {
      for (let q = p + 1; q < n; q++) {
        if (A[p][q] === 0) continue;
        const theta = (A[q][q] - A[p][p]) / (2 * A[p][q]);
        const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
        const c = 1 / Math.sqrt(t * t + 1);
        const s = t * c;
        for (let k = 0; k < n; k++) {
          const akp = A[k][p];
          const akq = A[k][q];
          A[k][p] = c * akp - s * akq;
          A[k][q] = s * akp + c * akq;
        }
        for (let k = 0; k < n; k++) {
          const apk = A[p][k];
          const aqk = A[q][k];
          A[p][k] = c * apk - s * aqk;
          A[q][k] = s * apk + c * aqk;
        }
        for (let k = 0; k < n; k++) {
          const vkp = V[k][p];
          const vkq = V[k][q];
          V[k][p] = c * vkp - s * vkq;
          V[k][q] = s * vkp + c * vkq;
        }
      }
    }
  }
  return { values: A.map((r, i) => r[i]), vectors: V, converged };
}

/** Result of {@link nearestCorrelation}. */
export interface NearestCorrelationResult {
  matrix: number[][];
  /** Frobenius distance to the input. */
  distance: number;
  /** Smallest eigenvalue of the input (negative when it was not positive semi-definite). */
  smallestEigenvalue: number;
  /** The entry that moved most: (i, j) with i < j, from and to. */
  largestChange: { i: number; j: number; from: number; to: number };
  converged: boolean;
  iterations: number;
}

/**
 * The nearest correlation matrix in the Frobenius norm to a symmetric matrix with unit diagonal.
 *
 * X = argmin ||A - X||_F over symmetric positive semi-definite X with unit diagonal.
 *
 * Method: Higham's alternating projections with Dykstra's correction: Y_k = P_U(P_S(R_k)),
 * R_{k+1} = Y_k - dS, P_S the projection on the positive semi-definite cone (eigenvalues clipped at
 * 0, symmetricEigen), P_U setting the diagonal to 1; stops when successive iterates differ by
 * less than 1e-12 (Frobenius, relative) or after 1000 iterations. The result is then PSD up to
 * rounding (smallest eigenvalue above about -1e-12).
 *
 * Special cases: an input that is already positive semi-definite (smallest eigenvalue >= -1e-12)
 * is returned unchanged; a matrix that is not square and symmetric, with a diagonal other than 1
 * or entries outside [-1, 1] throws RangeError.
 *
 * @example nearestCorrelation([[1, 1, 0], [1, 1, 1], [0, 1, 1]]).matrix // Higham (2002) section 4
 *
 * Reference: Higham, N. J. (2002), "Computing the nearest correlation matrix: a problem from
 * finance", IMA Journal of Numerical Analysis 22:329-343, algorithm 3.3.
 */
export function nearestCorrelation(input: readonly (readonly number[])[]): NearestCorrelationResult {
  const n = input.length;
  input.forEach((row, i) => {
    if (Math.abs(row[i] - 1) > 1e-12) throw new RangeError(`nearestCorrelation: diagonal entry ${i + 1} is ${row[i]}; a correlation matrix has 1 on its diagonal.`);
    row.forEach((v, j) => {
      if (!(v >= -1 && v <= 1)) throw new RangeError(`nearestCorrelation: entry (${i + 1}, ${j + 1}) is ${v}; correlations lie in [-1, 1].`);
    });
  });
  const smallest = Math.min(...symmetricEigen(input).values);
  const copy = input.map((r) => r.slice());
  if (smallest >= -1e-12) {
    return { matrix: copy, distance: 0, smallestEigenvalue: smallest, largestChange: { i: 0, j: Math.min(1, n - 1), from: copy[0]?.[1] ?? 1, to: copy[0]?.[1] ?? 1 }, converged: true, iterations: 0 };
  }
  let Y = copy.map((r) => r.slice());
  const dS = copy.map((r) => r.map(() => 0));
  let converged = false;
  let iterations = 0;
  for (iterations = 1; iterations <= 1000; iterations++) {
    const R = Y.map((r, i) => r.map((v, j) => v - dS[i][j]));
    const { values, vectors } = symmetricEigen(R.map((r, i) => r.map((v, j) => 0.5 * (v + R[j][i]))));
    const X = R.map((_, i) => R.map((__, j) => {
      let s = 0;
      for (let k = 0; k < n; k++) if (values[k] > 0) s += vectors[i][k] * values[k] * vectors[j][k];
      return s;
    }));
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) dS[i][j] = X[i][j] - R[i][j];
    const next = X.map((r, i) => r.map((v, j) => (i === j ? 1 : v)));
    let diff = 0;
    let norm = 0;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        diff += (next[i][j] - Y[i][j]) ** 2;
        norm += next[i][j] ** 2;
      }
    }
    Y = next;
    if (Math.sqrt(diff) <= 1e-12 * Math.sqrt(norm)) {
      converged = true;
      break;
    }
  }
  let distance = 0;
  let largestChange = { i: 0, j: 1, from: copy[0][1], to: Y[0][1] };
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      distance += (Y[i][j] - copy[i][j]) ** 2;
      if (j > i && Math.abs(Y[i][j] - copy[i][j]) > Math.abs(largestChange.to - largestChange.from)) largestChange = { i, j, from: copy[i][j], to: Y[i][j] };
    }
  }
  return { matrix: Y, distance: Math.sqrt(distance), smallestEigenvalue: smallest, largestChange, converged, iterations: Math.min(iterations, 1000) };
}
