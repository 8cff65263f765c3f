import path from 'node:path';
import { describe, expect, it } from 'vitest';
import type { FitDocument } from '@/lib/cli/document';
import { main } from '@/lib/cli';
import { betaMixingMle } from '@/lib/stats/estimators/beta-mixing-mle';
import { binomialMle } from '@/lib/stats/estimators/binomial-mle';

const ROOT = path.resolve(import.meta.dirname, '../../..');
const CSV = path.join(ROOT, 'tests/fixtures/cli/panels-ab.csv');

async function fit(args: string[]): Promise<{ code: number; doc: FitDocument | null; err: string }> {
  const out: string[] = [];
  const err: string[] = [];
  const code = await main(['fit', CSV, '--json', '--segment', 'Panel A', ...args], { out: (s) => out.push(s), err: (s) => err.push(s) });
  return { code, doc: code === 0 ? (JSON.parse(out.join('')) as FitDocument) : null, err: err.join('\n') };
}

describe('cli fit with the mixing laws', () => {
  it('puts the t copula, beta and logit-normal estimates and the comparison under the segment in the JSON of the design', async () => {
    // shape: the engine specification of the mixing laws; values: the stats functions' own (checked against SciPy in their tests)
    const { code, doc } = await fit(['--models', 'independent,t,beta,logitNormal']);
    expect(code).toBe(0);
    const s = doc!.segments[0];
    const t = s.estimates.tCopula!;
    expect(Object.keys(t)).toEqual(expect.arrayContaining(['rho', 'pd', 'nu', 'logLik', 'status', 'intervals', 'nuInterval']));
    expect(t.intervals.profile).toMatchObject({ level: 0.95 });
    expect(t.nuInterval).toHaveProperty('upper');
    const b = s.estimates.betaMixing!;
    expect(Object.keys(b)).toEqual(expect.arrayContaining(['a', 'b', 'pd', 'equivalentRho', 'logLik', 'status', 'intervals']));
    const panel = { obligors: s.observed.map((o) => o.obligors), defaults: s.observed.map((o) => o.defaults) };
    expect(b.equivalentRho).toBe(betaMixingMle(panel).equivalentRho);
    expect(Object.keys(s.estimates.logitNormal!)).toEqual(expect.arrayContaining(['mu', 'sigma', 'pd', 'equivalentRho', 'logLik', 'status', 'intervals']));
    const c = s.modelComparison!;
    expect(c.laws.map((l) => l.law)).toEqual(['gaussian', 't', 'beta', 'logitNormal']);
    expect(c.laws[0].logLik).toBe(binomialMle(panel).logLik);
    for (const l of c.laws) {
      expect(Object.keys(l)).toEqual(
        expect.arrayContaining(['law', 'logLik', 'parameters', 'aic', 'bic', 'quantile99', 'quantile999', 'jointDefault', 'defaultCorrelation', 'tailDependence', 'pit']),
      );
      // README's JSON section: the law's granular mid-PIT per year, the KS test on the randomised PIT from the mixing laws' seed, the tail years
      expect(l.pit).toMatchObject({ method: 'mid', uniformity: { test: 'kolmogorov-smirnov', randomised: true, seed: 1 }, tails: { level: 0.01 } });
      expect(l.pit!.values).toHaveLength(s.T);
    }
    // the Gaussian row's PIT is the diagnostics' (the same convention, count-pit.ts)
    c.laws[0].pit!.values.forEach((u, t) => expect(Math.abs(u - s.diagnostics.pit![t])).toBeLessThan(1e-9));
    expect(c.lrTestGaussianVsT).toMatchObject({ pValue: null, replications: 0 });
    expect(c.lrTestGaussianVsT!.pValueAsymptotic).toBeGreaterThan(0);
    expect(c.power).toBeNull();
  });

  it('runs the LR test\'s bootstrap and the power study on the worker threads with the numbers of this thread', async () => {
    // reproducibility rule of DEVELOPERS.md: replication i seeded by deriveSeed(seed, i), any split
    const args = ['--models', 'independent,t', '--copula-bootstrap', '2', '--seed', '9'];
    const threads = await fit([...args, '--threads', '2']);
    const here = await fit([...args, '--threads', '0']);
    expect(threads.code).toBe(0);
    const a = threads.doc!.segments[0].modelComparison!;
    const b = here.doc!.segments[0].modelComparison!;
    expect(a).toEqual(b);
    expect(a.lrTestGaussianVsT).toMatchObject({ replications: 2 });
    expect(a.lrTestGaussianVsT!.pValue).toBeGreaterThanOrEqual(1 / 3);
    expect(a.power).toMatchObject({ replications: 2 });
    expect(threads.doc!.segments[0].estimates.betaMixing).toBeUndefined();
  });
});
