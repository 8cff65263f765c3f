import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { addUniformMargin, checkCorrelationMatrix, largestValidMargin } from '@/lib/stats/correlation-matrix-check';

type Case = {
  name: string;
  matrix: number[][];
  smallestEigenvalue: number;
  valid: boolean;
  margin?: number;
  withMarginSmallestEigenvalue?: number;
  withMarginValid?: boolean;
  largestMargin?: number;
};
// Computed with numpy 2.4 linalg.eigvalsh and SciPy 1.17 installed (tests/fixtures/portfolio/make_matrix_check.py).
const fixtures = JSON.parse(readFileSync('tests/fixtures/portfolio/matrix-check-fixtures.json', 'utf8')) as { numpy: string; scipy: string; cases: Case[] };

describe('checkCorrelationMatrix against numpy.linalg.eigvalsh', () => {
  it('records the library versions it was made with', () => {
    expect(fixtures.numpy).toMatch(/^\d+\.\d+/);
    expect(fixtures.scipy).toMatch(/^1\.17/);
  });
  for (const c of fixtures.cases) {
    it(`${c.name}: smallest eigenvalue ${c.smallestEigenvalue.toPrecision(6)}, ${c.valid ? 'valid' : 'not PSD'}`, () => {
      const check = checkCorrelationMatrix(c.matrix);
      expect(check.smallestEigenvalue).toBeCloseTo(c.smallestEigenvalue, 12);
      expect(check.valid).toBe(c.valid);
      if (!check.valid) expect(check.problem).toMatch(/not positive semi-definite \(smallest eigenvalue -/);
    });
    if (c.margin !== undefined) {
      it(`${c.name}: with ${c.margin} added off the diagonal, smallest eigenvalue and validity as numpy's; largest valid add-on by bisection`, () => {
        const m = addUniformMargin(c.matrix, c.margin!);
        const check = checkCorrelationMatrix(m);
        expect(check.smallestEigenvalue).toBeCloseTo(c.withMarginSmallestEigenvalue!, 12);
        expect(check.valid).toBe(c.withMarginValid);
        expect(largestValidMargin(c.matrix)).toBeCloseTo(c.largestMargin!, 8);
      });
    }
  }
});

describe('checkCorrelationMatrix: the structural rules, each refused with a sentence naming the entry', () => {
  const names = ['Retail', 'SME', 'Corporate'];
  it('names the segments of an entry out of [-1, 1], a diagonal other than 1, an asymmetric pair, a non-finite entry', () => {
    expect(checkCorrelationMatrix([[1, 1.2], [1.2, 1]], ['A', 'B'])).toMatchObject({ valid: false, problem: 'The entry A–B is 1.2: correlations lie between -1 and 1.' });
    expect(checkCorrelationMatrix([[1, 0], [0, 0.9]], ['A', 'B'])).toMatchObject({ valid: false, problem: expect.stringContaining('diagonal entry of “B” is 0.9') });
    expect(checkCorrelationMatrix([[1, 0.2, 0], [0.3, 1, 0], [0, 0, 1]], names)).toMatchObject({ valid: false, problem: expect.stringContaining('Retail–SME and SME–Retail differ') });
    expect(checkCorrelationMatrix([[1, Number.NaN], [Number.NaN, 1]])).toMatchObject({ valid: false, problem: expect.stringContaining('(1, 2) is NaN') });
    expect(checkCorrelationMatrix([[1, 0], [0]])).toMatchObject({ valid: false, problem: expect.stringContaining('not square') });
    expect(checkCorrelationMatrix([])).toMatchObject({ valid: false });
  });
  it('takes [[1]] as valid and a rank-one matrix of ones (eigenvalues 0 and n) as valid (common practice: PSD includes 0)', () => {
    expect(checkCorrelationMatrix([[1]])).toEqual({ valid: true, smallestEigenvalue: 1 });
    const ones = [[1, 1, 1], [1, 1, 1], [1, 1, 1]];
    const c = checkCorrelationMatrix(ones);
    expect(c.valid).toBe(true);
    expect(Math.abs(c.smallestEigenvalue!)).toBeLessThan(1e-12);
  });
  it('adds the margin to the off-diagonal entries only (C + m (J - I))', () => {
    expect(addUniformMargin([[1, 0.2], [0.2, 1]], 0.05)).toEqual([[1, 0.25], [0.25, 1]]);
    expect(() => addUniformMargin([[1]], Number.POSITIVE_INFINITY)).toThrow(RangeError);
    expect(() => largestValidMargin([[1, 2], [2, 1]])).toThrow(/between -1 and 1/);
  });
});
