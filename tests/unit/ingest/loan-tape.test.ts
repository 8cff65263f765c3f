/**
 * Loan tapes: bad files, and aggregation by the cohort method checked against cohorts counted by
 * hand with the DESIGN.md rule: a loan belongs to the cohort of reference date R when
 * start_date < R, it has not defaulted before R and has not exited before R; it is a default of
 * that cohort when R <= default_date < R + 12 months; exits stay in the denominator by default;
 * year Y counts when the as-of date >= 31 December Y (reference date 1 January).
 */
import { describe, expect, it } from 'vitest';
import { validateLoanTapeStream, validateLoanTapeText } from '@/lib/ingest/loan-tape';
import { chunked, expectFinding } from './helpers';

const H = 'loan_id,segment,start_date,default_date,exit_date\n';

describe('loan tape: bad files', () => {
  it('empty segment', () => {
    const r = validateLoanTapeText(H + 'L1,A,2018-01-05,,\nL2,,2018-01-05,,\n');
    expectFinding(r.findings, 'empty-segment', 'error', 3, 'segment');
  });

  it('duplicate loan_id', () => {
    const r = validateLoanTapeText(H + 'L1,A,2018-01-05,,\nL2,A,2018-01-05,,\nL1,B,2019-01-05,,\n');
    const f = expectFinding(r.findings, 'duplicate-loan-id', 'error', 4, 'loan_id');
    expect(f.value).toBe('L1');
  });

  it('default before start', () => {
    const r = validateLoanTapeText(H + 'L1,A,2018-01-05,2017-12-31,\n');
    expectFinding(r.findings, 'default-before-start', 'error', 2, 'default_date');
  });

  it('exit before start', () => {
    const r = validateLoanTapeText(H + 'L1,A,2018-01-05,,\nL2,A,2018-01-05,,2018-01-04\n');
    expectFinding(r.findings, 'exit-before-start', 'error', 3, 'exit_date');
  });

  it('dates that do not parse or are not calendar days', () => {
    const r = validateLoanTapeText(H + 'L1,A,05/01/2018,,\nL2,A,2019-02-29,,\nL3,A,2020-02-29,,\nL4,A,2018-1-5,,\n');
    const hits = r.findings.filter((f) => f.rule === 'date-unparseable');
    // 2020-02-29 exists (leap year); the others do not parse or do not exist
    expect(hits.map((f) => [f.line, f.severity, f.column])).toEqual([
      [2, 'error', 'start_date'],
      [3, 'error', 'start_date'],
      [5, 'error', 'start_date'],
    ]);
  });

  it('a date after the given as-of date is a warning', () => {
    const r = validateLoanTapeText(H + 'L1,A,2018-01-05,,\nL2,A,2018-01-05,2022-01-10,\n', { asOf: '2021-12-31' });
    expectFinding(r.findings, 'date-after-as-of', 'warning', 3, 'default_date');
  });

  it('missing start date and missing loan id', () => {
    const r = validateLoanTapeText(H + 'L1,A,,,\n,A,2018-01-05,,\n');
    const hits = r.findings.filter((f) => f.rule === 'missing-value');
    expect(hits.map((f) => [f.line, f.column])).toEqual([
      [2, 'start_date'],
      [3, 'loan_id'],
    ]);
  });

  it('missing column', () => {
    const r = validateLoanTapeText('loan_id,segment,start_date,default_date\nL1,A,2018-01-05,\n');
    expectFinding(r.findings, 'missing-column', 'error', 1, 'exit_date');
  });

  it('invalid options are reported, not thrown', () => {
    const r = validateLoanTapeText(H + 'L1,A,2018-01-05,,\n', { asOf: '2021-02-30', referenceMonthDay: '02-29' });
    expectFinding(r.findings, 'as-of-invalid', 'error', null, 'as_of');
    expectFinding(r.findings, 'reference-date-invalid', 'error', null, 'reference_month_day');
  });
});

// Tape worked by hand (line numbers: L1 on line 2 ... L7 on line 8).
const TAPE =
  H +
  'L1,A,2018-06-15,,\n' + // never defaults or exits
  'L2,A,2018-01-01,2020-03-10,\n' + // starts exactly on a reference date
  'L3,A,2017-05-01,,2019-07-01\n' + // exits in 2019
  'L4,A,2019-12-31,2020-01-01,\n' + // defaults on a reference date
  'L5,A,2016-03-01,2016-09-01,\n' + // defaults before its first reference date
  'L6,A,2020-02-01,,2021-12-31\n' + // exits on the latest date of the file
  'L7,B,2019-05-05,2021-06-30,\n';

describe('loan tape: aggregation worked by hand', () => {
  it('1 January reference dates, exits stay, as-of = latest date (2021-12-31)', () => {
    const r = validateLoanTapeText(TAPE);
    expect(r.ok).toBe(true);
    // A 2017 (R = 2017-01-01): L5 defaulted 2016-09-01 before R, L3 starts after R -> empty, no row.
    // A 2018: L3 only (L2 starts on R itself, not before it)                 -> 1 obligor, 0 defaults.
    // A 2019: L1, L2, L3 (L3 exits 2019-07-01, after R: stays)               -> 3, 0.
    // A 2020: L1, L2 (defaults 2020-03-10), L4 (start 2019-12-31, defaults on R) -> 3, 2.
    // A 2021: L1, L6 (start 2020-02-01; exit 2021-12-31 after R)             -> 2, 0.
    // B 2020: L7 -> 1, 0.  B 2021: L7, defaults 2021-06-30 -> 1, 1.
    // As-of 2021-12-31 >= 31 December 2021, so 2021 is included.
    expect(r.cohortRows.map((c) => [c.segment, c.period, c.obligors, c.defaults])).toEqual([
      ['A', '2018', 1, 0],
      ['A', '2019', 3, 0],
      ['A', '2020', 3, 2],
      ['A', '2021', 2, 0],
      ['B', '2020', 1, 0],
      ['B', '2021', 1, 1],
    ]);
    expect(r.counts).toEqual({ rows: 7, loans: 7, rejectedRows: 0, defaults: 4, exits: 2, segments: 2 });
    expect(r.conventions).toEqual({
      referenceMonthDay: '01-01',
      exitConvention: 'exits-stay',
      asOf: '2021-12-31',
      asOfSource: 'latest-date-in-file',
      firstPeriod: '2018',
      lastPeriod: '2021',
    });
    expect(r.conventionText).toContain('stays in');
    expect(r.conventionText).toContain('2021-12-31');
  });

  it('the alternative convention removes loans that exit without default from that year', () => {
    const r = validateLoanTapeText(TAPE, { exitConvention: 'exits-removed' });
    // A 2019: L3 exits 2019-07-01 without default -> removed: 2 obligors (L1, L2).
    // A 2021: L6 exits 2021-12-31 without default -> removed: 1 obligor (L1). Others unchanged.
    expect(r.cohortRows.map((c) => [c.segment, c.period, c.obligors, c.defaults])).toEqual([
      ['A', '2018', 1, 0],
      ['A', '2019', 2, 0],
      ['A', '2020', 3, 2],
      ['A', '2021', 1, 0],
      ['B', '2020', 1, 0],
      ['B', '2021', 1, 1],
    ]);
    expect(r.conventions.exitConvention).toBe('exits-removed');
    expect(r.conventionText).toContain('removed');
  });

  it('the last year needs the as-of date on or after 31 December', () => {
    const r = validateLoanTapeText(TAPE, { asOf: '2021-12-30' });
    // 2021 is not complete on 2021-12-30; L6's exit 2021-12-31 is after the as-of date (line 7).
    expect(r.cohortRows.map((c) => [c.segment, c.period])).toEqual([
      ['A', '2018'],
      ['A', '2019'],
      ['A', '2020'],
      ['B', '2020'],
    ]);
    expectFinding(r.findings, 'date-after-as-of', 'warning', 7, 'exit_date');
    expect(r.conventions.asOfSource).toBe('given');
  });

  it('reference date 1 July', () => {
    const r = validateLoanTapeText(TAPE, { referenceMonthDay: '07-01' });
    // Period Y = [Y-07-01, (Y+1)-07-01). As-of 2021-12-31 < 2022-06-30, so the last period is 2020.
    // A 2016: L5 (start 2016-03-01 < R, defaults 2016-09-01 in the year)      -> 1, 1.
    // A 2017: L3                                                               -> 1, 0.
    // A 2018: L1 (2018-06-15), L2, L3 (exit 2019-07-01 is R_2019, not in 2018) -> 3, 0.
    // A 2019: L1, L2 (defaults 2020-03-10), L3 (exits on R itself: not before R) -> 3, 1.
    // A 2020: L1, L6 (L2, L4 defaulted before 2020-07-01)                     -> 2, 0.
    // B 2019: L7 -> 1, 0.  B 2020: L7 defaults 2021-06-30 < 2021-07-01        -> 1, 1.
    expect(r.cohortRows.map((c) => [c.segment, c.period, c.obligors, c.defaults])).toEqual([
      ['A', '2016', 1, 1],
      ['A', '2017', 1, 0],
      ['A', '2018', 3, 0],
      ['A', '2019', 3, 1],
      ['A', '2020', 2, 0],
      ['B', '2019', 1, 0],
      ['B', '2020', 1, 1],
    ]);
    expect(r.conventions.referenceMonthDay).toBe('07-01');
    expect(r.conventionText).toContain('1 July');
  });

  it('streaming with CRLF in tiny chunks gives the same result', async () => {
    const crlf = TAPE.replace(/\n/g, '\r\n');
    const s = await validateLoanTapeStream(chunked(crlf, 5));
    const t = validateLoanTapeText(TAPE);
    expect(s.cohortRows).toEqual(t.cohortRows);
    expect(s.counts).toEqual(t.counts);
    expect(s.findings).toEqual(t.findings);
  });

  it('a tape with errors returns no cohort rows', () => {
    const r = validateLoanTapeText(TAPE + 'L1,A,2018-01-05,,\n');
    expect(r.ok).toBe(false);
    expect(r.cohortRows).toEqual([]);
    expect(r.counts.rejectedRows).toBe(1);
  });

  it('duplicate ids among many long ids are all found', () => {
    // 20,000 ids of 20 characters, every 1,000th repeated once at the end (lines 20,002 ...).
    const ids = Array.from({ length: 20000 }, (_, i) => `LOAN-${String(i).padStart(15, '0')}`);
    const dup = ids.filter((_, i) => i % 1000 === 0);
    const text = H + [...ids, ...dup].map((id) => `${id},A,2018-01-05,,`).join('\n') + '\n';
    const r = validateLoanTapeText(text);
    const hits = r.findings.filter((f) => f.rule === 'duplicate-loan-id');
    expect(hits.map((f) => f.value)).toEqual(dup);
    expect(hits[0].line).toBe(20002);
  });
});
