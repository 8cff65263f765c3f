/**
 * The upload-time check of a loan tape (checkLoanTapeHeader) reads the header and the first data
 * row, then stops. Found in QA: it used to cut the byte stream after the chunk holding the first
 * row, so the partial line at the end of that chunk was read as a row and every tape larger than
 * one chunk (about 16 KB after gunzip) was refused with `too-few-fields`.
 */
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { gunzipSource } from '@/lib/ingest/gzip';
import { checkLoanTapeHeader } from '@/lib/ingest/upload';
import { chunked } from '../ingest/helpers';

const H = 'loan_id,segment,start_date,default_date,exit_date\n';

function tape(loans: number): string {
  let s = H;
  for (let i = 1; i <= loans; i++) s += `L${i},Segment A,2015-0${1 + (i % 9)}-1${i % 10},,\n`;
  return s;
}

describe('loan tape check at upload', () => {
  it('accepts a tape much larger than one chunk, whatever the chunk boundaries', async () => {
    const text = tape(20_000); // about 0.7 MB
    for (const size of [1000, 4096, 16_384, 65_536]) {
      const r = await checkLoanTapeHeader(chunked(text, size), { maxBytes: 100 * 1024 * 1024 });
      expect(r.findings.filter((f) => f.severity === 'error'), `chunks of ${size} bytes`).toEqual([]);
      expect(r.ok).toBe(true);
    }
  });

  it('accepts a large tape read back from its gzip-compressed form (as the route does)', async () => {
    const r = await checkLoanTapeHeader(gunzipSource([gzipSync(Buffer.from(tape(50_000)))]), { maxBytes: 100 * 1024 * 1024 });
    expect(r.findings.filter((f) => f.severity === 'error')).toEqual([]);
  });

  it('still refuses a header without rows, and a first row of the wrong width', async () => {
    const empty = await checkLoanTapeHeader(chunked(H + '\n\n', 7), { maxBytes: 1e9 });
    expect(empty.findings.map((f) => [f.rule, f.severity, f.line])).toEqual([['no-data-rows', 'error', 1]]);
    const narrow = await checkLoanTapeHeader(chunked(H + 'L1,A,2015-01-01\n' + tape(5000).slice(H.length), 512), { maxBytes: 1e9 });
    expect(narrow.findings.map((f) => [f.rule, f.line])).toEqual([['too-few-fields', 2]]);
  });
});
