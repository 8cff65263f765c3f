/**
 * The demo lender's files, reproducible from fixed seeds with the engine's seeded generator
 * (lib/stats/random.ts). The seed script feeds these through the same validation path as an
 * upload (validateCohortText, validateVintageText, validateLoanTapeStream). All data is invented.
 */
import { Readable } from 'node:stream';
import { createRng } from '@/lib/stats/random';
import { conditionalPd as vasicekConditionalPd } from '@/lib/stats/vasicek';
import { cohortRowsCsv, conditionalPd, DEMO_SEED, FENMOOR_SEGMENTS, generateCohortRows, generateVintageCsv } from './fenmoor';
import { generateLoanTape } from './loan-tape';

export { LENDER_NAME, FENMOOR_SEGMENTS, DEMO_SEED, conditionalPd } from './fenmoor';

/** Cohort file: 5 segments x 15-25 annual cohorts (see fenmoor.ts for the parameters). */
export function fenmoorCohortCsv(seed: number = DEMO_SEED): string {
  return cohortRowsCsv(generateCohortRows(createRng(seed)));
}

/** The factor of the restated file's new year: an invented downturn, two standard deviations bad. */
export const RESTATED_YEAR = 2025;
export const RESTATED_FACTOR = -2.2;
export const RESTATED_DEFINITION = '90 days past due or unlikely to pay';
export const EARLY_SME_DEFINITION = '120 days past due';

/**
 * The restated cohort file that supersedes the first one: the same history with the definition of
 * default written on every row (the first two SME years were counted at 120 days past due, which
 * the restatement makes explicit), and one more year, 2025, drawn at an invented downturn factor
 * (RESTATED_FACTOR) with its own seed. Used by the demo to show evidence that ages.
 */
export function fenmoorRestatedCohortCsv(seed: number = DEMO_SEED): string {
  const rows = generateCohortRows(createRng(seed));
  const rng = createRng(seed + 10);
  const lines = ['segment,period,obligors,defaults,default_definition'];
  for (const s of FENMOOR_SEGMENTS) {
    const own = rows.filter((r) => r.segment === s.name);
    for (const r of own) {
      const early = s.name === 'SME term loans' && r.period < s.firstYear + 2;
      lines.push(`${r.segment},${r.period},${r.obligors},${r.defaults},${early ? EARLY_SME_DEFINITION : RESTATED_DEFINITION}`);
    }
    const last = own[own.length - 1];
    const obligors = Math.max(1, Math.round(last.obligors * (1 + s.growth) * (0.95 + 0.1 * rng.uniform())));
    const defaults = rng.binomial(obligors, conditionalPd(s.pd, s.rho, RESTATED_FACTOR));
    lines.push(`${s.name},${RESTATED_YEAR},${obligors},${defaults},${RESTATED_DEFINITION}`);
  }
  return lines.join('\n') + '\n';
}

/** Vintage file: prime auto and unsecured personal loans, vintages 2015-01..2023-12 observed to 2024-12. */
export function fenmoorVintageCsv(seed: number = DEMO_SEED + 1): string {
  return generateVintageCsv(createRng(seed));
}

/** Loan-level tape (default 200,000 loans, as of 2024-12-31) as CSV text chunks. */
export function fenmoorLoanTapeChunks(seed: number = DEMO_SEED + 2, loans = 200_000): Generator<string> {
  return generateLoanTape(createRng(seed), { loans });
}

/** The same tape as a Node Readable of UTF-8 text chunks, for validateLoanTapeStream. */
export function fenmoorLoanTapeStream(seed: number = DEMO_SEED + 2, loans = 200_000): Readable {
  return Readable.from(fenmoorLoanTapeChunks(seed, loans));
}

/**
 * A cohort file with a `grade` column: five rating grades of invented corporate loans, 2005-2024,
 * whose defaults share one factor per year (asset correlation 0.12), for the grade model.
 */
export function gradedCohortCsv(seed: number = DEMO_SEED + 4): string {
  const rng = createRng(seed);
  const grades = [
    { grade: 'A', pd: 0.002, obligors: 900 },
    { grade: 'BBB', pd: 0.006, obligors: 1400 },
    { grade: 'BB', pd: 0.015, obligors: 1600 },
    { grade: 'B', pd: 0.04, obligors: 1100 },
    { grade: 'CCC', pd: 0.12, obligors: 400 },
  ];
  const lines = ['segment,grade,period,obligors,defaults'];
  for (let year = 2005; year <= 2024; year++) {
    const x = rng.normal();
    for (const g of grades) {
      const n = g.obligors + Math.round(g.obligors * 0.1 * rng.normal());
      lines.push(`Corporate loans,${g.grade},${year},${n},${rng.binomial(n, vasicekConditionalPd(g.pd, 0.12, x))}`);
    }
  }
  return lines.join('\n') + '\n';
}

/** Small files offered for download on the upload page (public/samples). */
export function sampleFiles(seed: number = DEMO_SEED + 3): { 'cohort.csv': string; 'vintage.csv': string; 'loans.csv': string; 'cohort-grades.csv': string } {
  const rng = createRng(seed);
  const two = FENMOOR_SEGMENTS.filter((s) => s.name === 'SME term loans' || s.name === 'Credit cards');
  const cohort = cohortRowsCsv(generateCohortRows(rng, two), () => undefined);
  const vintage = generateVintageCsv(rng, {
    segments: FENMOOR_SEGMENTS.filter((s) => s.name === 'Prime auto loans'),
    firstVintage: '2021-01',
    lastVintage: '2021-06',
    observedTo: '2023-12',
    loansPerVintage: 300,
    term: 36,
  });
  const loans = [...generateLoanTape(rng, { loans: 300, segments: two, weights: [1, 1] })].join('');
  return { 'cohort.csv': cohort, 'vintage.csv': vintage, 'loans.csv': loans, 'cohort-grades.csv': gradedCohortCsv() };
}
