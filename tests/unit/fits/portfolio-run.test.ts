import { describe, expect, it } from 'vitest';
import { fitRequestSchema } from '@/lib/fits/request';
import { computeFitRun } from '@/lib/fits/run';
import { fitGrades } from '@/lib/stats/grade-fit';
import { posteriorBlock } from '@/lib/stats/low-default';

const years = ['2011', '2012', '2013', '2014', '2015', '2016', '2017', '2018'];
const panels = [
  { segment: 'Grade A', assetClass: 'corporate' as const, periods: years, obligors: [1000, 1100, 1050, 990, 1200, 1150, 1000, 980], defaults: [2, 5, 1, 9, 3, 2, 4, 7] },
  { segment: 'Grade B', assetClass: 'corporate' as const, periods: years, obligors: [800, 820, 790, 810, 850, 830, 800, 790], defaults: [8, 14, 5, 25, 9, 7, 10, 18] },
];

describe('fit run with the portfolio blocks', () => {
  it('stores group, pairs, posterior and prudentPd with the fit, as the engine computes them', async () => {
    // the blocks are lib/stats' values (checked against SciPy in tests/unit/stats/portfolio)
    const request = fitRequestSchema.parse({
      datasetId: 1,
      group: { segments: ['Grade A', 'Grade B'] },
      pairs: true,
      prior: { kind: 'supervisory', strength: 20 },
      prudent: { rho: null, confidence: 0.9 },
    });
    const results = await computeFitRun(panels, request, { threads: 0 });
    expect(results.group!.commonRho!.rho).toBe(fitGrades(panels, { level: 0.95 }).commonRho!.rho);
    expect(results.pairs!.segments).toEqual(['Grade A', 'Grade B']);
    const expected = posteriorBlock({ obligors: panels[0].obligors, defaults: panels[0].defaults }, { kind: 'supervisory', strength: 20 }, { assetClass: 'corporate', level: 0.95 });
    expect(results.segments[0].posterior).toEqual(expected);
    expect(results.segments[0].prudentPd).toMatchObject({ status: 'ok', confidence: 0.9, rho: results.segments[0].estimates.binomialMle.rho });
  });

  it('refuses a group outside the fit\'s segments and a zero-mass prior in the request, naming the field', () => {
    const bad = fitRequestSchema.safeParse({ datasetId: 1, segments: ['Grade A', 'Grade B'], group: { segments: ['Grade A', 'Grade C'] } });
    expect(bad.success).toBe(false);
    expect(bad.error!.issues[0].message).toMatch(/Grade C/);
    const prior = fitRequestSchema.safeParse({ datasetId: 1, prior: { kind: 'beta', a: 0, b: 2 } });
    expect(prior.success).toBe(false);
    expect(prior.error!.issues[0].message).toMatch(/no mass inside/);
  });
});
