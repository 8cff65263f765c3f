import { describe, expect, it } from 'vitest';
import path from 'node:path';
import type { FitDocument } from '@/lib/cli/document';
import { main } from '@/lib/cli';
import { fitGrades } from '@/lib/stats/grade-fit';
import { factorCorrelation } from '@/lib/stats/factor-correlation';
import { prudentPd } from '@/lib/stats/prudent-pd';

const ROOT = path.resolve(import.meta.dirname, '../../..');
const CSV = path.join(ROOT, 'tests/fixtures/cli/panels-ab.csv');

async function runCli(args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const code = await main(args, { out: (t) => (out += t), err: (t) => (err += t + '\n') });
  return { code, out, err };
}

describe('cli fit: --group, --pairs, --prior, --prudent', () => {
  it('adds the group, pairs, posterior and prudentPd blocks under the names of the design, equal to the engine\'s own functions', async () => {
    // the blocks are the library's values (the library's numbers are checked against SciPy in tests/unit/stats/portfolio)
    const { code, out } = await runCli(['fit', CSV, '--json', '--threads', '0', '--group', 'Panel A,Panel B', '--pairs', '--prior', 'flat', '--prudent', '0.12,0.9']);
    expect(code).toBe(0);
    const doc = JSON.parse(out) as FitDocument;
    expect(Object.keys(doc)).toEqual(expect.arrayContaining(['engine', 'segments', 'group', 'pairs', 'failures']));
    const g = doc.group!;
    expect(g).toMatchObject({ segments: ['Panel A', 'Panel B'], lrTest: { df: 1 } });
    expect(Object.keys(g.commonRho!)).toEqual(expect.arrayContaining(['rho', 'logLik', 'interval']));
    expect(Object.keys(g.commonRho!.interval)).toEqual(expect.arrayContaining(['level', 'lower', 'upper']));
    expect(Object.keys(g.pds!['Panel A'])).toEqual(expect.arrayContaining(['pd', 'lower', 'upper']));
    expect(typeof g.gradeRho!['Panel B']).toBe('number');
    const p = doc.pairs!;
    expect(p.segments).toEqual(['Panel A', 'Panel B']);
    expect(p.matrix).toHaveLength(2);
    expect(Object.keys(p.entries[0])).toEqual(expect.arrayContaining(['a', 'b', 'r', 'lower', 'upper', 'moment']));
    const seg = doc.segments[0];
    expect(seg.posterior).toMatchObject({ status: 'ok', prior: { rho: 'flat', pd: 'beta:1,1' } });
    expect(Object.keys(seg.posterior!)).toEqual(expect.arrayContaining(['prior', 'median', 'mean', 'lower', 'upper']));
    expect(seg.prudentPd).toMatchObject({ confidence: 0.9, rho: 0.12 });
    // same numbers as the library called directly
    const rows = doc.segments.map((s) => ({ segment: s.segment, periods: s.periods, obligors: s.observed.map((o) => o.obligors), defaults: s.observed.map((o) => o.defaults) }));
    expect(g.commonRho!.rho).toBe(fitGrades(rows).commonRho!.rho);
    expect(p.entries[0].r).toBe(factorCorrelation(rows[0], rows[1]).r);
    expect((seg.prudentPd as { upper: number }).upper).toBe(prudentPd({ obligors: rows[0].obligors, defaults: rows[0].defaults }, 0.12, 0.9).upper);
  });

  it('refuses bad portfolio options with exit code 2 and a sentence', async () => {
    const cases: [string[], RegExp][] = [
      [['--group', 'Panel A'], /at least two segment names/],
      [['--group', 'Panel A,Nope'], /"Nope", which the file/],
      [['--prior', 'beta:0,2'], /A > 0 and B > 0/],
      [['--prior', 'gamma'], /flat, supervisory:STRENGTH or beta:A,B/],
      [['--prudent', '0.12,1.5'], /confidence strictly between 0 and 1/],
      [['--common-window'], /applies to --group/],
    ];
    for (const [args, message] of cases) {
      const r = await runCli(['fit', CSV, '--json', '--threads', '0', ...args]);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.err).toMatch(message);
    }
  });

  it('gives a supervisory prior without an asset class a status and a sentence, and prudentPd without rho the MLE', async () => {
    const { code, out } = await runCli(['fit', CSV, '--json', '--threads', '0', '--segment', 'Panel A', '--prior', 'supervisory:20', '--prudent', 'mle,0.95']);
    expect(code).toBe(0);
    const seg = (JSON.parse(out) as FitDocument).segments[0];
    expect(seg.posterior).toMatchObject({ status: 'undefined', reason: expect.stringMatching(/asset class/) });
    expect(seg.prudentPd).toMatchObject({ status: 'ok', confidence: 0.95, rho: seg.estimates.binomialMle.rho });
  });

  it('with --audit runs the grade audit on the worker threads, with the numbers of this thread', async () => {
    // reproducibility across threads (deriveSeed per replication)
    const args = ['fit', CSV, '--json', '--group', 'Panel A,Panel B', '--audit', '6', '--audit-seed', '5'];
    const threaded = JSON.parse((await runCli([...args, '--threads', '2'])).out) as FitDocument;
    const here = JSON.parse((await runCli([...args, '--threads', '0'])).out) as FitDocument;
    expect(threaded.group!.estimatorAudit).toMatchObject({ replications: 6, seed: 5 });
    expect(threaded.group!.estimatorAudit).toEqual(here.group!.estimatorAudit);
  });
});
