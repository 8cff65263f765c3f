import { execFile } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { describe, expect, it } from 'vitest';
import type { FitDocument } from '@/lib/cli/document';
import { main } from '@/lib/cli';
import { ENGINE_VERSION } from '@/lib/stats/version';

const run = promisify(execFile);
const ROOT = path.resolve(import.meta.dirname, '../../..');
const CSV = path.join(ROOT, 'tests/fixtures/cli/panels-ab.csv');

/** Spawns the CLI as `npm run cli` does (tsx lib/cli/index.ts) and returns code, stdout, stderr. */
async function cli(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run(process.execPath, ['--import', 'tsx', 'lib/cli/index.ts', ...args], { cwd: ROOT, maxBuffer: 1 << 26 });
    return { code: 0, stdout, stderr };
  } catch (err) {
    const e = err as { code: number; stdout: string; stderr: string };
    return { code: e.code, stdout: e.stdout, stderr: e.stderr };
  }
}

function tempCsv(text: string): string {
  const dir = mkdtempSync(path.join(tmpdir(), 'rhobook-cli-'));
  const file = path.join(dir, 'cohorts.csv');
  writeFileSync(file, text);
  return file;
}

describe('cli fit --json (spawned)', () => {
  it('prints the JSON document for a two-segment file, with panel A and B values', async () => {
    const { code, stdout } = await run('npm', ['run', '--silent', 'cli', '--', 'fit', CSV, '--json'], { cwd: ROOT, maxBuffer: 1 << 26 }).then(
      (r) => ({ code: 0, ...r }),
    );
    expect(code).toBe(0);
    const doc = JSON.parse(stdout) as FitDocument;
    expect(doc.engine).toEqual({ version: ENGINE_VERSION });
    expect(doc.segments.map((s) => s.segment)).toEqual(['Panel A', 'Panel B']);
    const [a, b] = doc.segments;
    expect(a).toMatchObject({ T: 10, periods: ['2001', '2002', '2003', '2004', '2005', '2006', '2007', '2008', '2009', '2010'] });
    for (const key of ['segment', 'T', 'periods', 'estimates', 'warnings', 'timing']) expect(a).toHaveProperty(key);
    expect(a.timing.ms).toBeGreaterThan(0);
    const m = a.estimates.binomialMle;
    // engine specification, computed with SciPy 1.17
    expect(Math.abs(m.rho! - 0.037091)).toBeLessThan(1e-5);
    expect(Math.abs(m.pd! - 0.013307)).toBeLessThan(1e-5);
    expect(Math.abs(m.logLik! - -33.785195)).toBeLessThan(1e-5);
    expect(Math.abs(m.intervals.profile!.lower - 0.01177)).toBeLessThan(2e-3);
    expect(Math.abs(m.intervals.profile!.upper - 0.1147)).toBeLessThan(2e-3);
    expect(m.intervals.wald).toMatchObject({ level: 0.95 });
    expect(m.intervals.wald!.se).toBeGreaterThan(0);
    expect(m.intervals.bootstrap).toBeNull();
    expect(Math.abs(a.estimates.momentVariance!.rho! - 0.05111)).toBeLessThan(1e-6);
    expect(Math.abs(a.estimates.jointDefault!.rho! - 0.037745)).toBeLessThan(1e-6);
    // engine specification, computed with SciPy 1.17
    expect(b.estimates.vasicekMle).toMatchObject({ rho: null, pd: null, status: 'undefined' });
    expect(typeof b.estimates.vasicekMle!.reason).toBe('string');
    expect(Math.abs(b.estimates.binomialMle.rho! - 0.06262)).toBeLessThan(1e-5);
    expect(Math.abs(b.estimates.binomialMle.pd! - 0.002561)).toBeLessThan(1e-6);
    expect(b.estimates.binomialMle.intervals.profile!.lower).toBe(0);
    expect(Math.abs(b.estimates.binomialMle.intervals.profile!.upper - 0.344)).toBeLessThan(2e-3);
    expect(Math.abs(b.estimates.jointDefault!.rho! - 0.050346)).toBeLessThan(1e-6);
    expect(b.warnings.map((w) => w.code)).toContain('zero-default-periods');
    // The cautions travel with the numbers: both missing ones and the deferral (DESIGN.md, "Cautions").
    expect(doc.cautions.join(' ')).toMatch(/does not replace the supervisory correlation in Pillar 1 own-funds requirements/);
    expect(doc.cautions.join(' ')).toMatch(/Capital K .* illustration at the LGD and maturity stated with it, not regulatory capital/);
    expect(doc.cautions.join(' ')).toMatch(/does not replace independent validation, the institution's model-risk policy, supervisory requirements or qualified professional judgement/);
  });

  it('filters by segment and period window and bootstraps identically on 1 and 2 threads', async () => {
    const args = ['fit', CSV, '--json', '--segment', 'Panel A', '--from', '2003', '--to', '2009', '--level', '0.9', '--bootstrap', '12', '--seed', '5'];
    const [one, two] = await Promise.all([cli([...args, '--threads', '1']), cli([...args, '--threads', '2'])]);
    expect(one.code).toBe(0);
    expect(two.code).toBe(0);
    const d1 = JSON.parse(one.stdout) as FitDocument;
    const d2 = JSON.parse(two.stdout) as FitDocument;
    expect(d1.segments).toHaveLength(1);
    const s = d1.segments[0];
    expect(s).toMatchObject({ segment: 'Panel A', T: 7, periods: ['2003', '2004', '2005', '2006', '2007', '2008', '2009'], level: 0.9 });
    expect(s.estimates.binomialMle.intervals.profile!.level).toBe(0.9);
    expect(s.estimates.binomialMle.intervals.bootstrap).toMatchObject({ level: 0.9, replications: 12, seed: 5 });
    expect(d2.segments[0].estimates).toEqual(s.estimates);
  });

  it('bad rows: exit code 2 and a message naming the line and the problem', async () => {
    const file = tempCsv('segment,period,obligors,defaults\nSME,2001,100,3\nSME,2002,50,70\nSME,2003,abc,1\n');
    const { code, stdout, stderr } = await cli(['fit', file, '--json']);
    expect(code).toBe(2);
    expect(stdout).toBe('');
    expect(stderr).toMatch(/line 3, column defaults: Defaults \(70\) exceed obligors \(50\)/);
    expect(stderr).toMatch(/line 4, column obligors/);
    expect(stderr).toMatch(/nothing was fitted/);
  });

  it('prints a readable table without --json', async () => {
    const { code, stdout } = await cli(['fit', CSV, '--segment', 'Panel B']);
    expect(code).toBe(0);
    expect(stdout).toMatch(/Segment Panel B: T = 10 \(2001-2010\)/);
    expect(stdout).toMatch(/binomialMle .*0\.0626/);
    expect(stdout).toMatch(/vasicekMle .*undefined/);
    // the models over time and the stability across the window, in words
    expect(stdout).toMatch(/ar1Mle .*profile \[0, /);
    expect(stdout).toMatch(/AR\(1\) factor: phi -?\d\.\d+ .*LR test of phi = 0: statistic/);
    expect(stdout).toMatch(/break test: largest LR statistic .* from \d{4}; no p-value \(run with --bootstrap B\)/);
    expect(stdout).toMatch(/rolling window of 10: 1 window, /);
    expect(stdout).toMatch(/slowest stages: /);
    expect(stdout).toMatch(/\nCautions:\n  - The Gaussian one-factor model has no tail dependence/);
    expect(stdout).toMatch(/  - An estimated correlation does not replace the supervisory correlation in Pillar 1 own-funds requirements/);
  });
});

describe('cli fit --models and the stability block (in process)', () => {
  const fit = async (argv: string[]) => {
    const out: string[] = [];
    const err: string[] = [];
    const code = await main(['fit', CSV, '--json', '--segment', 'Panel A', ...argv], { out: (t) => out.push(t), err: (t) => err.push(t) });
    return { code, doc: code === 0 ? (JSON.parse(out.join('\n')) as FitDocument) : null, err: err.join('\n') };
  };

  it('runs every model by default and the AR(1) model alone with --models ar1 (no stability block: DESIGN.md)', async () => {
    const all = (await fit([])).doc!.segments[0];
    expect(all.models).toEqual(['independent', 'ar1']);
    expect(Object.keys(all.estimates)).toContain('ar1Mle');
    expect(all.stability!.rolling).toMatchObject({ status: 'ok', window: 10 });
    const ar1 = (await fit(['--models', 'ar1'])).doc!.segments[0];
    expect(Object.keys(ar1.estimates)).toEqual(['binomialMle', 'momentVarianceAutocorrected', 'ar1Mle']);
    expect(ar1.stability).toBeNull();
    // the same AR(1) numbers whichever models run beside it
    expect(ar1.estimates.ar1Mle).toEqual(all.estimates.ar1Mle);
  });

  it('--bootstrap B runs every parametric bootstrap with B replications: the moment estimators\' and the break test\'s too (DESIGN.md)', async () => {
    const { code, doc } = await fit(['--models', 'independent', '--bootstrap', '20', '--seed', '3', '--rolling-window', '6']);
    expect(code).toBe(0);
    const s = doc!.segments[0];
    for (const key of ['momentVariance', 'momentVarianceCorrected', 'jointDefault'] as const) {
      expect(s.estimates[key]!.intervals.bootstrap).toMatchObject({ replications: 20, seed: 3 });
    }
    expect(s.stability!.breakTest).toMatchObject({ status: 'ok', replications: 20, seed: 3 });
    expect((s.stability!.breakTest as { pValue: number }).pValue).toBeGreaterThan(0);
    expect(s.stability!.rolling).toMatchObject({ status: 'ok', window: 6 });
    expect((s.stability!.rolling as { entries: unknown[] }).entries).toHaveLength(5);
    expect(s.estimates.ar1Mle).toBeUndefined();
  });
});

describe('cli main (in process)', () => {
  it('compares with the supervisory correlation of an asset class', async () => {
    const out: string[] = [];
    const code = await main(['fit', CSV, '--json', '--segment', 'Panel A', '--asset-class', 'sme-corporate', '--turnover', '27.5'], {
      out: (t) => void out.push(t),
      err: () => undefined,
    });
    expect(code).toBe(0);
    const s = (JSON.parse(out[0]) as FitDocument).segments[0];
    const pd = s.estimates.binomialMle.pd!;
    const w = (1 - Math.exp(-50 * pd)) / (1 - Math.exp(-50));
    // BCBS 2006 paras 272-273: corporate correlation minus 0.04 (1 - (S - 5) / 45) at S = 27.5
    expect(s.implications!.supervisory!.rho).toBeCloseTo(0.12 * w + 0.24 * (1 - w) - 0.04 * (1 - 22.5 / 45), 12);
    expect(s.implications!.maturityYears).toBe(2.5);
  });
});

describe('cli main (in process): usage errors exit 2 with a sentence', () => {
  const io = () => {
    const out: string[] = [];
    const err: string[] = [];
    return { out, err, io: { out: (t: string) => void out.push(t), err: (t: string) => void err.push(t) } };
  };
  it.each([
    [['fit'], /exactly one cohort CSV file/],
    [['fit', CSV, '--level', '95'], /--level must be a number strictly between 0 and 1/],
    [['fit', CSV, '--bootstrap', '1'], /--bootstrap must be a whole number of replications/],
    [['fit', CSV, '--seed', '3'], /give --bootstrap B or --copula-bootstrap B as well/],
    [['fit', CSV, '--from', '2010', '--to', '2001'], /--from \(2010\) is after --to \(2001\)/],
    [['fit', CSV, '--segment', 'Retail'], /no segment "Retail".*"Panel A", "Panel B"/],
    [['fit', CSV, '--from', '2020'], /has no period from 2020/],
    [['fit', CSV, '--asset-class', 'bank'], /--asset-class must be one of/],
    [['fit', CSV, '--frobnicate'], /Unknown option/],
    [['fit', CSV, '--asset-class', 'sme-corporate'], /needs --turnover/],
    [['fit', CSV, '--turnover', '20'], /applies only to --asset-class sme-corporate/],
    [['fit', '/nonexistent/cohorts.csv'], /no such file/],
    [['estimate'], /Unknown command "estimate"/],
    [['fit', CSV, '--models', 'garch'], /--models takes a comma-separated list of independent, ar1, t, beta, logitNormal; got "garch"/],
    [['fit', CSV, '--models', 't,beta'], /needs a factor model \(independent or ar1\) beside the mixing laws/],
    [['fit', CSV, '--models', 'independent,beta', '--copula-bootstrap', '20'], /add t to --models/],
    [['fit', CSV, '--models', 'ar1,ar1'], /names a model twice/],
    [['fit', CSV, '--rolling-window', '1'], /--rolling-window must be a whole number of periods from 2 to 1000/],
    [['fit', CSV, '--models', 'ar1', '--rolling-window', '5'], /belongs to the independent model/],
  ])('%j', async (argv, message) => {
    const h = io();
    expect(await main(argv as string[], h.io)).toBe(2);
    expect(h.err.join('\n')).toMatch(message);
    expect(h.out).toEqual([]);
  });
});

describe('cli fit --audit R', () => {
  it('runs the seeded estimator audit on the worker threads and gives the numbers of fitPanel in this thread', async () => {
    // reproducibility: replication r draws from deriveSeed(seed, r) whatever the split (DEVELOPERS.md)
    const out: string[] = [];
    const code = await main(['fit', CSV, '--json', '--segment', 'Panel A', '--audit', '20', '--audit-seed', '7', '--threads', '2'], {
      out: (t) => out.push(t),
      err: () => undefined,
    });
    expect(code).toBe(0);
    const doc = JSON.parse(out.join('\n')) as FitDocument;
    const a = doc.segments[0].estimatorAudit!;
    expect(a).toMatchObject({ replications: 20, seed: 7 });
    const { fitPanel } = await import('@/lib/stats/fit-panel');
    const s = doc.segments[0];
    const direct = fitPanel(
      { segment: s.segment, periods: s.periods, obligors: s.observed.map((o) => o.obligors), defaults: s.observed.map((o) => o.defaults) },
      { audit: { replications: 20, seed: 7 } },
    );
    expect(a).toEqual(direct.estimatorAudit);
    await expect(main(['fit', CSV, '--audit-seed', '3'], { out: () => undefined, err: () => undefined })).resolves.toBe(2);
  });
});
