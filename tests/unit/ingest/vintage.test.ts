/**
 * Vintage files: bad files, and the conversion to annual cohorts checked against counts worked by
 * hand with the DESIGN.md rule ("the cohort of year Y holds, from every vintage originated before
 * 1 January Y, the loans active in January of Y and their defaults during the twelve months of Y;
 * a vintage whose observation stops before the end of Y is left out of Y and listed as censored").
 */
import { describe, expect, it } from 'vitest';
import { calendarMonthOf, januaryMonthOnBook, validateVintageStream, validateVintageText } from '@/lib/ingest/vintage';
import { chunked, expectFinding } from './helpers';

const H = 'segment,vintage,months_on_book,active,defaults\n';

describe('vintage: bad files', () => {
  // Found in QA: a file whose vintages never cover a full calendar year was accepted as a dataset
  // with no cohort rows. By the DESIGN.md rule, vintage 2020-01 with months on book 1-3
  // (February-April 2020) can only ever feed 2021 and later, which it does not reach.
  it('no complete year anywhere is an error, and nothing is converted', () => {
    const r = validateVintageText(H + 'A,2020-01,1,100,1\nA,2020-01,2,99,0\nA,2020-01,3,99,1\n');
    expectFinding(r.findings, 'no-complete-cohort', 'error', null);
    expect(r.ok).toBe(false);
  });

  it('a segment without a complete year is a warning naming it; the others convert', () => {
    let text = H;
    // B: vintage 2019-12, months on book 1-12 = January-December 2020: one complete year (2020).
    for (let m = 1; m <= 12; m++) text += `B,2019-12,${m},${100 - m},${m === 5 ? 1 : 0}\n`;
    text += 'C,2020-06,1,50,0\nC,2020-06,2,50,0\n'; // lines 14-15: July-August 2020 only
    const r = validateVintageText(text);
    expect(r.ok).toBe(true);
    expect(r.cohortRows.map((c) => [c.segment, c.period, c.obligors, c.defaults])).toEqual([['B', '2020', 99, 1]]);
    const w = expectFinding(r.findings, 'segment-without-cohorts', 'warning', 14, 'segment');
    expect(w.value).toBe('C');
  });

  it('vintage not YYYY-MM', () => {
    const r = validateVintageText(H + 'A,2016-13,1,100,0\nA,2016/03,1,100,0\n');
    const hits = r.findings.filter((f) => f.rule === 'vintage-unparseable');
    expect(hits.map((f) => [f.line, f.severity, f.column])).toEqual([
      [2, 'error', 'vintage'],
      [3, 'error', 'vintage'],
    ]);
  });

  it('months on book 0 and 1.5', () => {
    const r = validateVintageText(H + 'A,2016-03,0,100,0\nA,2016-03,1.5,100,0\n');
    expectFinding(r.findings, 'months-on-book-invalid', 'error', 2, 'months_on_book');
    expectFinding(r.findings, 'non-integer-count', 'error', 3, 'months_on_book');
  });

  it("active loans above the engine's 10^9 a period are refused on their row, naming the active column", () => {
    const r = validateVintageText(H + 'A,2016-03,1,2000000000,0\nA,2016-03,2,100,1\n');
    const f = expectFinding(r.findings, 'cohort-too-large', 'error', 2, 'active');
    expect(f.message).toMatch(/^2000000000 obligors is more than the engine handles \(1e\+9 per period.*in the active column\?\)\.$/);
  });

  it('defaults > active', () => {
    const r = validateVintageText(H + 'A,2016-03,1,100,0\nA,2016-03,2,5,6\n');
    expectFinding(r.findings, 'defaults-exceed-active', 'error', 3, 'defaults');
  });

  it('duplicate month on book', () => {
    const r = validateVintageText(H + 'A,2016-03,1,100,0\nB,2016-03,1,100,0\nA,2016-03,1,100,1\n');
    expectFinding(r.findings, 'duplicate-month', 'error', 4, 'months_on_book');
  });

  it('a gap in months on book', () => {
    const r = validateVintageText(H + 'A,2016-03,1,100,0\nA,2016-03,2,100,0\nA,2016-03,4,100,0\n');
    expectFinding(r.findings, 'months-on-book-gap', 'error', 4, 'months_on_book');
    expect(r.cohortRows).toEqual([]);
  });

  it('active counts that grow are a warning', () => {
    // month 1: 100 active, 2 defaults -> at most 98 left; month 2 says 99
    const r = validateVintageText(H + 'A,2016-03,1,100,2\nA,2016-03,2,99,0\n');
    expectFinding(r.findings, 'active-increases', 'warning', 3, 'active');
  });

  it('missing column', () => {
    const r = validateVintageText('segment,vintage,mob,active,defaults\nA,2016-03,1,100,0\n');
    expectFinding(r.findings, 'missing-column', 'error', 1, 'months_on_book');
    expectFinding(r.findings, 'unknown-column', 'warning', 1, 'mob');
  });
});

describe('vintage: month arithmetic (DESIGN.md rule: month on book 1 is the month after origination)', () => {
  it('calendar months and January months on book', () => {
    expect(calendarMonthOf('2019-11', 1)).toBe('2019-12');
    expect(calendarMonthOf('2019-11', 2)).toBe('2020-01');
    expect(calendarMonthOf('2019-12', 1)).toBe('2020-01');
    // vintage 2019-12: January 2020 is month on book 1
    expect(januaryMonthOnBook('2019-12', 2020)).toBe(1);
    // vintage 2020-01: January 2021 is month on book 12 (Feb 2020 = 1, ..., Jan 2021 = 12)
    expect(januaryMonthOnBook('2020-01', 2021)).toBe(12);
  });
});

describe('vintage: conversion worked by hand', () => {
  // Vintage 2019-11 (segment A): months on book 1..16 = Dec 2019 .. Mar 2021.
  //   active at month m = 101 - m, one default every month.
  // Vintage 2020-01 (segment A): months on book 1..23 = Feb 2020 .. Dec 2021.
  //   50 active for months 1..12; 2 defaults in month 12 (Jan 2021); 48 active for months 13..20,
  //   1 default in month 20 (Sep 2021); 47 active for months 21..23.
  const rows: string[] = [];
  for (let m = 1; m <= 16; m++) rows.push(`A,2019-11,${m},${101 - m},1`);
  for (let m = 1; m <= 23; m++) {
    const active = m <= 12 ? 50 : m <= 20 ? 48 : 47;
    const defaults = m === 12 ? 2 : m === 20 ? 1 : 0;
    rows.push(`A,2020-01,${m},${active},${defaults}`);
  }
  const text = H + rows.join('\n') + '\n';

  it('counts each cohort from the vintages that were on the book on 1 January', () => {
    const r = validateVintageText(text);
    expect(r.ok).toBe(true);
    // 2020: only vintage 2019-11 was originated before 1 Jan 2020. January 2020 = month 2,
    //   active 101 - 2 = 99; defaults in months 2..13 (Jan..Dec 2020) = 12 x 1 = 12.
    //   Vintage 2020-01 is not in 2020 (originated in 2020).
    // 2021: vintage 2019-11 stops at month 16 (Mar 2021) -> censored for 2021.
    //   Vintage 2020-01: January 2021 = month 12, active 50; defaults months 12..23 = 2 + 1 = 3.
    // 2019: no vintage originated before 1 Jan 2019 -> no row.
    expect(r.cohortRows).toEqual([
      { segment: 'A', period: '2020', obligors: 99, defaults: 12, line: null },
      { segment: 'A', period: '2021', obligors: 50, defaults: 3, line: null },
    ]);
    expect(r.censored).toHaveLength(1);
    expect(r.censored[0]).toMatchObject({ segment: 'A', vintage: '2019-11', year: 2021 });
    expect(r.censored[0].reason).toContain('2021-03');
    expect(r.convention).toContain('1 January');
    expect(r.convention).toContain('1 vintage-year was censored');
  });

  it('streams to the same result', async () => {
    const s = await validateVintageStream(chunked(text, 13));
    const t = validateVintageText(text);
    expect(s.cohortRows).toEqual(t.cohortRows);
    expect(s.censored).toEqual(t.censored);
    expect(s.findings).toEqual(t.findings);
  });

  it('a vintage first observed after January is censored for that year', () => {
    // Vintage 2018-06 observed from month 10 (Apr 2019) to month 30 (Dec 2020), 10 active, no defaults.
    // 2019: January 2019 = month 7, before the first observed month 10 -> censored.
    // 2020: January 2020 = month 19, months 19..30 observed -> 10 obligors, 0 defaults.
    const t = H + Array.from({ length: 21 }, (_, i) => `B,2018-06,${i + 10},10,0`).join('\n') + '\n';
    const r = validateVintageText(t);
    expect(r.cohortRows).toEqual([{ segment: 'B', period: '2020', obligors: 10, defaults: 0, line: null }]);
    expect(r.censored.map((c) => [c.vintage, c.year])).toEqual([['2018-06', 2019]]);
  });
});
