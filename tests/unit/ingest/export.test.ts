import { describe, expect, it } from 'vitest';
import { cohortRowsToCsv, findingsToCsv } from '@/lib/ingest/export';
import { sha256Hex, hashingSource, sha256OfStream } from '@/lib/ingest/hash';
import { DATE_BAD_FORMAT, DATE_NOT_IN_CALENDAR, DATE_OUT_OF_RANGE, nextDay, parseIsoDate, previousDay } from '@/lib/ingest/dates';
import { StringSet } from '@/lib/ingest/string-set';
import { validateCohortText } from '@/lib/ingest/cohort';
import { chunked } from './helpers';

describe('CSV exports of uploads go through the one CSV writer (lib/csv.ts; RFC 4180, OWASP CSV injection)', () => {
  it('cohort rows, with comment lines, written by hand', () => {
    const csv = cohortRowsToCsv(
      [
        { segment: '=HYPERLINK("http://x.example")', period: '2015', obligors: 100, defaults: 2 },
        { segment: 'Cards, premium', period: '2016', obligors: 90, defaults: 1 },
      ],
      ['Convention: exits stay.\nCensored: none.', 'File a.csv,=HYPERLINK("http://x.example")'],
    );
    expect(csv).toBe(
      '# Convention: exits stay.\r\n# Censored: none.\r\n# File a.csv,\'=HYPERLINK("http://x.example")\r\nsegment,period,obligors,defaults\r\n' +
        '"\'=HYPERLINK(""http://x.example"")",2015,100,2\r\n' +
        '"Cards, premium",2016,90,1\r\n',
    );
  });

  it('a report from a file with a formula in a segment name', () => {
    const r = validateCohortText('segment,period,obligors,defaults\n@cmd,2015,100,2\n');
    const csv = findingsToCsv(r.findings.filter((f) => f.rule === 'formula-like-text'));
    const [header, row] = csv.split('\r\n');
    expect(header).toBe('line,column,rule,severity,value,message');
    expect(row.startsWith("2,segment,formula-like-text,warning,'@cmd,")).toBe(true);
  });
});

describe('SHA-256', () => {
  // FIPS 180-2, Appendix B.1: SHA-256("abc")
  const ABC = 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad';
  it('matches the FIPS 180-2 example, whole and streamed', async () => {
    expect(sha256Hex(Buffer.from('abc'))).toBe(ABC);
    expect(await sha256OfStream(chunked('abc', 1))).toBe(ABC);
  });

  it('hashes while a validator reads', async () => {
    const h = hashingSource(chunked('abc', 2));
    for await (const _ of h.source) void _;
    expect(h.digest()).toBe(ABC);
  });
});

describe('strict ISO dates (Gregorian calendar rules)', () => {
  it('leap years: divisible by 4, except centuries not divisible by 400', () => {
    expect(parseIsoDate('2024-02-29')).toBe(20240229);
    expect(parseIsoDate('2000-02-29')).toBe(20000229);
    expect(parseIsoDate('1900-02-29')).toBe(DATE_NOT_IN_CALENDAR);
    expect(parseIsoDate('2100-02-29')).toBe(DATE_NOT_IN_CALENDAR);
    expect(parseIsoDate('2023-04-31')).toBe(DATE_NOT_IN_CALENDAR);
    expect(parseIsoDate('2023-00-10')).toBe(DATE_NOT_IN_CALENDAR);
  });
  it('format and range', () => {
    expect(parseIsoDate('2023-1-10')).toBe(DATE_BAD_FORMAT);
    expect(parseIsoDate('10/01/2023')).toBe(DATE_BAD_FORMAT);
    expect(parseIsoDate('2023-01-10T00:00')).toBe(DATE_BAD_FORMAT);
    expect(parseIsoDate('1899-12-31')).toBe(DATE_OUT_OF_RANGE);
  });
  it('day arithmetic across month, year and leap days', () => {
    expect(nextDay(20201231)).toBe(20210101);
    expect(nextDay(20240228)).toBe(20240229);
    expect(nextDay(20230228)).toBe(20230301);
    expect(previousDay(20210101)).toBe(20201231);
    expect(previousDay(20240301)).toBe(20240229);
  });
});

describe('StringSet agrees with Set', () => {
  it('on random strings with many repeats (property)', () => {
    let seed = 12345;
    const next = () => (seed = (Math.imul(seed, 1103515245) + 12345) >>> 0);
    const ours = new StringSet(4);
    const ref = new Set<string>();
    for (let i = 0; i < 50000; i++) {
      const s = 'k' + (next() % 20000).toString(36);
      expect(ours.add(s)).toBe(!ref.has(s));
      ref.add(s);
    }
    expect(ours.size).toBe(ref.size);
    expect(ours.has('not-there')).toBe(false);
  });
});
