import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { main } from '@/lib/cli';
import type { FitDocument } from '@/lib/cli/document';
import { validateCohortText } from '@/lib/ingest/cohort';

const SAMPLE = path.join(import.meta.dirname, '..', '..', '..', 'public', 'samples', 'cohort-grades.csv');

describe('cohort files with a grade column', () => {
  it('make each grade of a segment a panel of its own, "SEGMENT / GRADE"; an empty grade stays in the segment', () => {
    const v = validateCohortText('segment,grade,period,obligors,defaults\nCorp,A,2015,100,1\nCorp,B,2015,80,3\nCorp,A,2016,110,0\nRetail,,2015,500,9\n');
    expect(v.summary.errors).toBe(0);
    expect(v.rows.map((r) => r.segment)).toEqual(['Corp / A', 'Corp / B', 'Corp / A', 'Retail']);
  });

  it('refuse a repeated segment, grade and period, and a grade without a segment, naming the line', () => {
    const dup = validateCohortText('segment,grade,period,obligors,defaults\nCorp,A,2015,100,1\nCorp,A,2015,90,2\n');
    expect(dup.findings.find((f) => f.severity === 'error')).toMatchObject({ line: 3, rule: 'duplicate-period' });
    const empty = validateCohortText('segment,grade,period,obligors,defaults\n,A,2015,100,1\n');
    expect(empty.summary.errors).toBeGreaterThan(0);
    expect(empty.findings[0].line).toBe(2);
  });

  it('the graded sample file fits as a group from the command line', async () => {
    let out = '';
    const code = await main(['fit', SAMPLE, '--json', '--threads', '0', '--group', 'Corporate loans / A,Corporate loans / BBB,Corporate loans / BB,Corporate loans / B,Corporate loans / CCC'], {
      out: (t) => (out += t),
      err: () => undefined,
    });
    expect(code).toBe(0);
    const g = (JSON.parse(out) as FitDocument).group!;
    expect(g.status).toBe('ok');
    // invented with rho = 0.12 and PDs rising from A to CCC (lib/demo/index.ts): the interval holds it, the order is kept
    expect(g.commonRho!.interval.lower).toBeLessThan(0.12);
    expect(g.commonRho!.interval.upper).toBeGreaterThan(0.12);
    expect(g.monotonicity!.increasing).toBe(true);
    expect(fs.readFileSync(SAMPLE, 'utf8').split('\n')[0]).toBe('segment,grade,period,obligors,defaults');
  });
});
