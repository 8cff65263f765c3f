import { describe, expect, it } from 'vitest';
import { nearestCorrelation, symmetricEigen } from '@/lib/stats/nearest-correlation';
import { crossSegmentDefault } from '@/lib/stats/cross-segment-default';
import { jointDefaultProbability } from '@/lib/stats/vasicek';

describe('nearestCorrelation (Higham 2002)', () => {
  it("gives Higham's worked example", () => {
    // Higham (2002), IMA J. Numer. Anal. 22, section 4: A = [1 1 0; 1 1 1; 0 1 1] ->
    // [1 .7607 .1573; .7607 1 .7607; .1573 .7607 1] (4 decimals, from memory of the paper)
    const r = nearestCorrelation([[1, 1, 0], [1, 1, 1], [0, 1, 1]]);
    expect(r.converged).toBe(true);
    const X = r.matrix;
    expect(Math.abs(X[0][1] - 0.7607)).toBeLessThan(6e-5);
    expect(Math.abs(X[0][2] - 0.1573)).toBeLessThan(6e-5);
    expect(Math.abs(X[1][2] - 0.7607)).toBeLessThan(6e-5);
    expect(r.smallestEigenvalue).toBeLessThan(0);
  });

  it('returns a unit-diagonal positive semi-definite matrix no farther than any other candidate tried', () => {
    // properties of the projection: feasibility, and optimality against feasible perturbations
    const A = [[1, 0.9, 0.7, -0.5], [0.9, 1, 0.95, 0.2], [0.7, 0.95, 1, 0.9], [-0.5, 0.2, 0.9, 1]];
    const r = nearestCorrelation(A);
    const { values } = symmetricEigen(r.matrix);
    expect(Math.min(...values)).toBeGreaterThan(-1e-10);
    r.matrix.forEach((row, i) => expect(row[i]).toBe(1));
    const dist = (X: number[][]) => Math.sqrt(X.flatMap((row, i) => row.map((v, j) => (v - A[i][j]) ** 2)).reduce((s, v) => s + v, 0));
    // a convex combination with the identity stays feasible and must not be closer
    for (const t of [0.01, 0.1, 0.5]) {
      const Y = r.matrix.map((row, i) => row.map((v, j) => (1 - t) * v + t * (i === j ? 1 : 0)));
      expect(dist(Y)).toBeGreaterThanOrEqual(r.distance - 1e-9);
    }
    expect(r.largestChange.from).toBe(A[r.largestChange.i][r.largestChange.j]);
  });

  it('leaves a valid correlation matrix as it is', () => {
    const A = [[1, 0.3, 0.2], [0.3, 1, 0.4], [0.2, 0.4, 1]];
    const r = nearestCorrelation(A);
    expect(r.distance).toBe(0);
    expect(r.matrix).toEqual(A);
  });

  it('refuses a matrix that is not a correlation matrix, with a sentence', () => {
    expect(() => nearestCorrelation([[1, 2], [2, 1]])).toThrow(/\[-1, 1\]/);
    expect(() => nearestCorrelation([[2, 0], [0, 1]])).toThrow(/diagonal/);
    expect(() => symmetricEigen([[1, 0.5], [0.4, 1]])).toThrow(/symmetric/);
  });
});

describe('crossSegmentDefault', () => {
  it('is independence at r = 0 and the one-segment joint default at r = 1 with equal segments', () => {
    // definitions: Phi2(k1, k2; 0) = p1 p2; with the same (p, rho) and r = 1 it is Phi2(k, k; rho) (DESIGN.md)
    const a = crossSegmentDefault(0.01, 0.12, 0.03, 0.2, 0);
    expect(Math.abs(a.jointDefault - 0.0003)).toBeLessThan(1e-15);
    expect(Math.abs(a.defaultCorrelation)).toBeLessThan(1e-12);
    const b = crossSegmentDefault(0.02, 0.15, 0.02, 0.15, 1);
    expect(Math.abs(b.jointDefault - jointDefaultProbability(0.02, 0.02, 0.15))).toBeLessThan(1e-15);
    expect(b.assetCorrelation).toBeCloseTo(0.15, 15);
  });

  it('is symmetric in the two segments and increasing in r', () => {
    // properties
    const x = crossSegmentDefault(0.01, 0.12, 0.03, 0.2, 0.5);
    const y = crossSegmentDefault(0.03, 0.2, 0.01, 0.12, 0.5);
    expect(Math.abs(x.jointDefault - y.jointDefault)).toBeLessThan(1e-16);
    expect(crossSegmentDefault(0.01, 0.12, 0.03, 0.2, 0.6).jointDefault).toBeGreaterThan(x.jointDefault);
    expect(() => crossSegmentDefault(0, 0.1, 0.1, 0.1, 0)).toThrow(/pA/);
    expect(() => crossSegmentDefault(0.1, 0.1, 0.1, 0.1, 1.5)).toThrow(/r must/);
  });
});
