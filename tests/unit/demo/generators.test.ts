/**
 * The demo generators, driven here by a small local generator (mulberry32 + Box-Muller +
 * Bernoulli sums) so the checks do not depend on the engine's RNG: the files pass validation, and
 * a loan tape aggregated by the cohort method shows the Vasicek behaviour it was generated with.
 * Statistical checks use 4-standard-error bounds (common practice: each fails by chance with
 * probability about 6e-5); the seeds are fixed, so a result never flips between runs.
 */
import { describe, expect, it } from 'vitest';
import { cohortRowsCsv, FENMOOR_SEGMENTS, generateCohortRows, generateVintageCsv, type DemoRng, type DemoSegment } from '@/lib/demo/fenmoor';
import { generateLoanTape } from '@/lib/demo/loan-tape';
import { validateCohortText } from '@/lib/ingest/cohort';
import { validateVintageText } from '@/lib/ingest/vintage';
import { validateLoanTapeText } from '@/lib/ingest/loan-tape';

function testRng(seed: number): DemoRng {
  let a = seed >>> 0;
  const uniform = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return {
    uniform,
    normal: () => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform()),
    binomial: (n, p) => {
      let k = 0;
      for (let i = 0; i < n; i++) if (uniform() < p) k++;
      return k;
    },
  };
}

describe('demo cohort file', () => {
  it('5 segments with 15-25 cohorts each, valid, no errors', () => {
    const rows = generateCohortRows(testRng(1));
    const bySegment = new Map<string, number>();
    for (const r of rows) bySegment.set(r.segment, (bySegment.get(r.segment) ?? 0) + 1);
    expect([...bySegment.keys()]).toEqual(FENMOOR_SEGMENTS.map((s) => s.name));
    for (const n of bySegment.values()) expect(n >= 15 && n <= 25).toBe(true);
    const v = validateCohortText(cohortRowsCsv(rows));
    expect(v.summary.errors).toBe(0);
    expect(v.rows).toHaveLength(rows.length);
  });

  it('is reproducible from its seed', () => {
    expect(cohortRowsCsv(generateCohortRows(testRng(7)))).toBe(cohortRowsCsv(generateCohortRows(testRng(7))));
  });
});

describe('demo vintage file', () => {
  it('validates and converts to annual cohorts without errors', () => {
    const v = validateVintageText(generateVintageCsv(testRng(2)));
    expect(v.summary.errors).toBe(0);
    // vintages 2015-01..2023-12 observed to 2024-12 -> cohorts 2016..2024 for both segments
    expect(new Set(v.cohortRows.map((r) => r.period))).toEqual(new Set(['2016', '2017', '2018', '2019', '2020', '2021', '2022', '2023', '2024']));
  });
});

describe('demo loan tape follows the model it was generated with', () => {
  const seg = (rho: number): DemoSegment => ({ name: 'Test', pd: 0.05, rho, obligors: 1, growth: 0, firstYear: 2005, lastYear: 2024 });

  it('rho = 0: every cohort default rate is within 4 binomial standard errors of p = 0.05', () => {
    const text = [...generateLoanTape(testRng(3), { loans: 40_000, segments: [seg(0)] })].join('');
    const v = validateLoanTapeText(text);
    expect(v.ok).toBe(true);
    expect(v.cohortRows.length).toBe(20); // 2005..2024, as-of 2024-12-31
    for (const r of v.cohortRows) {
      const se = Math.sqrt((0.05 * 0.95) / r.obligors);
      expect(Math.abs(r.defaults / r.obligors - 0.05)).toBeLessThan(4 * se);
    }
  });

  it('rho = 0.3: default rates vary far more than binomial noise allows', () => {
    const text = [...generateLoanTape(testRng(4), { loans: 40_000, segments: [seg(0.3)] })].join('');
    const v = validateLoanTapeText(text);
    const rates = v.cohortRows.map((r) => r.defaults / r.obligors);
    const mean = rates.reduce((a, b) => a + b, 0) / rates.length;
    const variance = rates.reduce((a, b) => a + (b - mean) ** 2, 0) / (rates.length - 1);
    const binomialVariance = v.cohortRows.reduce((a, r) => a + (0.05 * 0.95) / r.obligors, 0) / v.cohortRows.length;
    // Vasicek variance at p = 0.05, rho = 0.3 is Phi2(k,k;0.3) - p^2 ~ 0.0025 (about 60x the binomial term here)
    expect(variance).toBeGreaterThan(10 * binomialVariance);
  });

  it('the demo-sized tape validates with no errors', () => {
    const text = [...generateLoanTape(testRng(5), { loans: 20_000 })].join('');
    const v = validateLoanTapeText(text);
    expect(v.summary.errors).toBe(0);
    expect(v.counts.segments).toBe(5);
    expect(v.conventions.asOf).toBe('2024-12-31');
  });
});
