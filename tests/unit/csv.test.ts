import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { commentLines, csvCell, looksLikeFormula, neutralise, toCsv } from '@/lib/csv';
import { liveCells } from '../support/csv-cells';

describe('one CSV writer (RFC 4180 quoting; OWASP formula neutralisation)', () => {
  it('prefixes = + - @ tab and CR with a single quote, after leading spaces and quotes too', () => {
    expect(['=1+1', '+1', '-1', '@SUM(A1)', '\tx', '\rx', 'plain', '', ' =1', '"=1', '\uFF1D1'].map(neutralise)).toEqual([
      "'=1+1",
      "'+1",
      "'-1",
      "'@SUM(A1)",
      "'\tx",
      "'\rx",
      'plain',
      '',
      "' =1",
      '\'"=1',
      "'\uFF1D1",
    ]);
  });

  it('neutralises after every separator inside a text (a spreadsheet set to ; or tab starts a cell there)', () => {
    expect(neutralise('a,=HYPERLINK("x")')).toBe(`a,'=HYPERLINK("x")`);
    expect(neutralise('a; @SUM(1)')).toBe(`a;' @SUM(1)`);
    expect(neutralise('a,"=1"')).toBe(`a,'"=1"`);
    expect(neutralise('line\n-2')).toBe(`line\n'-2`);
    expect(neutralise('Cards, premium; 2015')).toBe('Cards, premium; 2015');
  });

  it('quotes by RFC 4180 and also for ; tab, edge spaces and a leading #; numbers stay numbers', () => {
    expect(csvCell('Cards, premium')).toBe('"Cards, premium"');
    expect(csvCell('say "hi"')).toBe('"say ""hi"""');
    expect(csvCell('a;b')).toBe('"a;b"');
    expect(csvCell(' padded')).toBe('" padded"');
    expect(csvCell('#1 book')).toBe('"#1 book"');
    expect(csvCell(-0.25)).toBe('-0.25');
    expect(csvCell(null)).toBe('');
    expect(csvCell(true)).toBe('true');
    expect(csvCell(new Date('2026-01-02T03:04:05.000Z'))).toBe('2026-01-02T03:04:05.000Z');
    expect(csvCell({ bootstrap: 7 })).toBe('"{""bootstrap"":7}"');
  });

  it('refuses a number that is not finite with a sentence', () => {
    expect(() => csvCell(Number.NaN)).toThrow(RangeError);
    expect(() => csvCell(Infinity)).toThrow(/only finite numbers/);
  });

  it('writes comment lines that readers skipping # lines skip, and that split into no live cell', () => {
    const csv = toCsv(['segment', 'n'], [['A', 1]], { comments: ['File x.csv,=HYPERLINK("http://evil.example"),@SUM(1)\nsecond; -3'] });
    expect(csv.split('\r\n').slice(0, 2)).toEqual([`# File x.csv,'=HYPERLINK("http://evil.example"),'@SUM(1)`, `# second;' -3`]);
    // papaparse with comments: '#' (as pandas' comment='#') reads only the header and the row.
    expect(Papa.parse(csv, { comments: '#', newline: '\r\n', skipEmptyLines: true }).data).toEqual([
      ['segment', 'n'],
      ['A', '1'],
    ]);
    expect(commentLines('a\r\nb')).toEqual(['# a', '# b']);
  });

  it('a byte order mark on request; CRLF after every line', () => {
    expect(toCsv(['a'], [[1]], { bom: true })).toBe('\uFEFFa\r\n1\r\n');
  });

  it('property: on random texts, no cell any reader could see is live, and papaparse gets the text back but the added quotes', () => {
    let seed = 20260103;
    const next = () => (seed = (Math.imul(seed, 1103515245) + 12345) >>> 0);
    const alphabet = ['=', '+', '-', '@', '\t', '\r', '\n', '\r\n', ',', ';', '"', "'", ' ', '#', 'a', 'b', '1', '\uFF1D', 'HYPERLINK(', ')'];
    const randomText = () => Array.from({ length: next() % 12 }, () => alphabet[next() % alphabet.length]).join('');
    for (let trial = 0; trial < 400; trial++) {
      const rows = Array.from({ length: 1 + (next() % 3) }, () => [randomText(), next() % 2 ? -(next() % 100) / 7 : randomText(), randomText()]);
      const comments = [randomText()];
      const csv = toCsv(['x', 'y', 'z'], rows, { comments });
      expect(liveCells(csv), csv).toEqual([]);
      // Read back by an RFC 4180 parser (skipping the comment lines): the same cells, each the
      // original text with single quotes added and nothing else changed.
      const parsed = Papa.parse<string[]>(csv, { comments: '#', newline: '\r\n', skipEmptyLines: true }).data;
      expect(parsed[0]).toEqual(['x', 'y', 'z']);
      expect(parsed.slice(1).map((r) => r.map((c) => c.replace(/'/g, '')))).toEqual(
        rows.map((r) => r.map((c) => (typeof c === 'number' ? String(c) : c.replace(/'/g, '')))),
      );
    }
  });

  it('looksLikeFormula is the rule the upload warning uses', () => {
    expect(looksLikeFormula('=x')).toBe(true);
    expect(looksLikeFormula('x=1')).toBe(false);
  });
});
