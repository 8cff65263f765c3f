/** The downloadable sample files: valid, and reproducible from the committed generator and seed. */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { fenmoorCohortCsv, fenmoorVintageCsv, sampleFiles } from '@/lib/demo';
import { validateCohortText } from '@/lib/ingest/cohort';
import { validateVintageText } from '@/lib/ingest/vintage';
import { validateLoanTapeText } from '@/lib/ingest/loan-tape';

const dir = path.join(import.meta.dirname, '..', '..', '..', 'public', 'samples');
const read = (name: string) => fs.readFileSync(path.join(dir, name), 'utf8');

describe('public/samples', () => {
  it('match sampleFiles() (regenerate with: npx tsx lib/demo/write-samples.ts)', () => {
    const files = sampleFiles();
    for (const name of Object.keys(files) as (keyof typeof files)[]) expect(read(name)).toBe(files[name]);
  });

  it('validate without errors', () => {
    expect(validateCohortText(read('cohort.csv')).summary.errors).toBe(0);
    expect(validateVintageText(read('vintage.csv')).summary.errors).toBe(0);
    const loans = validateLoanTapeText(read('loans.csv'));
    expect(loans.summary.errors).toBe(0);
    expect(loans.counts.loans).toBe(300);
  });
});

describe('Fenmoor demo files with the engine RNG', () => {
  it('cohort and vintage files validate without errors and are reproducible', () => {
    const cohort = fenmoorCohortCsv();
    expect(cohort).toBe(fenmoorCohortCsv());
    const c = validateCohortText(cohort);
    expect(c.summary.errors).toBe(0);
    expect(new Set(c.rows.map((r) => r.segment)).size).toBe(5);
    expect(validateVintageText(fenmoorVintageCsv()).summary.errors).toBe(0);
  });
});
