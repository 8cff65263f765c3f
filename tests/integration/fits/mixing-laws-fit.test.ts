import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq, inArray } from 'drizzle-orm';
import { closeDb, getDb } from '@/db/connection';
import { fitRunSegments, jobs } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import { runFit } from '@/lib/cli/fit';
import { createFit, getFit } from '@/lib/dal/fits';
import { fitRequestSchema } from '@/lib/fits/request';
import { FIT_JOB } from '@/lib/jobs/kinds/fit-payload';
import { fitPanel } from '@/lib/stats/fit-panel';
import { runJobLoop } from '@/workers/job-loop';
import { makeCohortDataset, PANEL_A } from '../../support/fit-data';
import { makeUser } from '../../support/users';

// The challenge of the Gaussian copula asked for in a fit request: the worker's fit job runs the
// mixing laws as the CLI does (--models t,beta,logitNormal --copula-bootstrap B --seed S) and stores
// them with the segment; a request without it stores exactly what it stored before.

let analyst: SessionUser;
let dataset: { id: number; sha256: string; segments: string[] };

beforeAll(async () => {
  analyst = await makeUser('analyst');
  dataset = await makeCohortDataset(analyst.id, [PANEL_A]);
});
afterAll(async () => {
  await closeDb();
});

async function jobIdsOf(fitId: number): Promise<number[]> {
  const rows = await getDb().select({ jobId: fitRunSegments.jobId }).from(fitRunSegments).where(eq(fitRunSegments.fitRunId, fitId));
  return rows.map((r) => r.jobId!);
}

/** Runs the job loop in this process until the run's jobs have finished. */
async function drain(fitId: number) {
  const ids = await jobIdsOf(fitId);
  const controller = new AbortController();
  const loop = runJobLoop({ db: getDb(), workerId: 'in-test-copula', signal: controller.signal, idleMs: 50, kinds: [FIT_JOB], log: () => undefined });
  const end = Date.now() + 150_000;
  for (;;) {
    const rows = await getDb().select({ status: jobs.status }).from(jobs).where(inArray(jobs.id, ids));
    if (rows.every((r) => r.status !== 'queued' && r.status !== 'running')) break;
    if (Date.now() > end) throw new Error('timed out waiting for the fit jobs');
    await new Promise((r) => setTimeout(r, 150));
  }
  controller.abort();
  await loop;
}

const periods = PANEL_A.obligors.map((_, t) => String(2010 + t));
const json = <T>(v: T): T => JSON.parse(JSON.stringify(v));

describe('the fit request: challenge the Gaussian copula', () => {
  it('defaults to the three laws with B = 200 and R = 200; refuses too few replications and unknown laws with a sentence at the field', () => {
    const parsed = fitRequestSchema.parse({ datasetId: 1, mixingLaws: { seed: 3 } });
    expect(parsed.mixingLaws).toEqual({ laws: ['t', 'beta', 'logitNormal'], replications: 200, powerReplications: 200, seed: 3 });
    const few = fitRequestSchema.safeParse({ datasetId: 1, mixingLaws: { replications: 5, seed: 3 } });
    expect(few.success).toBe(false);
    expect(few.error!.issues[0]).toMatchObject({ path: ['mixingLaws', 'replications'], message: 'The copula test needs at least 20 replications.' });
    const unknown = fitRequestSchema.safeParse({ datasetId: 1, mixingLaws: { laws: ['clayton'], seed: 3 } });
    expect(unknown.success).toBe(false);
    expect(unknown.error!.issues[0].message).toBe('A mixing law is one of t, beta, logitNormal.');
    // absent: not run (requests stored before the option parse unchanged)
    expect(fitRequestSchema.parse({ datasetId: 1 }).mixingLaws).toBeUndefined();
  });

  it('a fit job with the option stores the laws, their comparison, the LR test and the power with the segment, as the CLI computes them', async () => {
    const { id } = await createFit(analyst, { datasetId: dataset.id, models: ['independent'], mixingLaws: { replications: 20, powerReplications: 20, seed: 9 } });
    await drain(id);
    const fit = await getFit(analyst, id);
    expect(fit.status).toBe('succeeded');
    expect(fit.request.mixingLaws).toEqual({ laws: ['t', 'beta', 'logitNormal'], replications: 20, powerReplications: 20, seed: 9 });
    expect(fit.seeds).toEqual({ bootstrap: null, audit: null, breakTest: null, mixingLaws: 9 });
    const seg = fit.results!.segments[0];
    expect(Object.keys(seg.estimates.tCopula!)).toEqual(expect.arrayContaining(['rho', 'pd', 'nu', 'logLik', 'status', 'intervals', 'nuInterval']));
    expect(Object.keys(seg.estimates.betaMixing!)).toEqual(expect.arrayContaining(['a', 'b', 'pd', 'equivalentRho', 'logLik', 'status', 'intervals']));
    expect(Object.keys(seg.estimates.logitNormal!)).toEqual(expect.arrayContaining(['mu', 'sigma', 'pd', 'equivalentRho', 'logLik', 'status', 'intervals']));
    const mc = seg.modelComparison!;
    expect(mc.laws.map((l) => l.law)).toEqual(['gaussian', 't', 'beta', 'logitNormal']);
    // The Gaussian row is binomialMle's maximum: Panel A's logLik -33.785195 (computed with SciPy 1.17 by tests/fixtures/engine/make_fixtures.py).
    expect(mc.laws[0].logLik).toBeCloseTo(-33.785195, 5);
    // BIC over the T = 10 years, AIC with 2 and 3 parameters (Schwarz 1978; Akaike 1974).
    expect(mc.laws[0].bic).toBeCloseTo(2 * Math.log(10) + 2 * 33.785195, 4);
    expect(mc.laws[1].aic).toBeCloseTo(6 - 2 * mc.laws[1].logLik, 9);
    // The t copula nests the Gaussian (1/nu = 0): its maximum is at least as high (a maximum really is a maximum).
    expect(mc.laws[1].logLik).toBeGreaterThanOrEqual(mc.laws[0].logLik - 1e-6);
    // Bootstrap p = (1 + #{LR_b >= LR}) / (B + 1) with B = 20 (Davison & Hinkley 1997), so a multiple of 1/21.
    const test = mc.lrTestGaussianVsT!;
    expect(test.replications + test.failed).toBe(20);
    expect(Math.abs(test.pValue! * 21 - Math.round(test.pValue! * 21))).toBeLessThan(1e-9);
    expect(mc.power!.replications + mc.power!.failed).toBe(20);
    expect(mc.power!.rejectRate).toBeGreaterThanOrEqual(0);
    expect(mc.power!.rejectRate).toBeLessThanOrEqual(1);
    // Each law's granular PIT travels in the stored results (law-count-pit.ts; randomised from the mixing laws' seed).
    for (const l of mc.laws) {
      expect(l.pit!.values, l.law).toHaveLength(10);
      expect(l.pit!.uniformity.seed, l.law).toBe(9);
    }

    // The same numbers as the CLI's --models independent,t,beta,logitNormal --copula-bootstrap 20 --seed 9 ...
    const dir = await mkdtemp(path.join(os.tmpdir(), 'rhobook-copula-'));
    try {
      const csv = path.join(dir, 'panel-a.csv');
      const name = dataset.segments[0];
      await writeFile(csv, ['segment,period,obligors,defaults', ...PANEL_A.obligors.map((n, t) => `${name},${periods[t]},${n},${PANEL_A.defaults[t]}`)].join('\n') + '\n');
      let out = '';
      const code = await runFit([csv, '--json', '--models', 'independent,t,beta,logitNormal', '--copula-bootstrap', '20', '--seed', '9', '--threads', '1', '--asset-class', 'corporate'], {
        out: (t) => (out += t),
        err: () => undefined,
      });
      expect(code).toBe(0);
      const cli = JSON.parse(out).segments[0];
      expect(json(seg.estimates.tCopula)).toEqual(cli.estimates.tCopula);
      expect(json(seg.estimates.betaMixing)).toEqual(cli.estimates.betaMixing);
      expect(json(seg.estimates.logitNormal)).toEqual(cli.estimates.logitNormal);
      expect(json(seg.modelComparison)).toEqual(cli.modelComparison);
    } finally {
      await rm(dir, { recursive: true, force: true });
    }
  }, 200_000);

  it('a fit without the option is unchanged field for field: no mixing-law estimates, no comparison, the engine fields of fitPanel without them', async () => {
    const { id } = await createFit(analyst, { datasetId: dataset.id, models: ['independent'] });
    await drain(id);
    const fit = await getFit(analyst, id);
    expect(fit.status).toBe('succeeded');
    expect(fit.request).not.toHaveProperty('mixingLaws');
    expect(fit.seeds).toEqual({ bootstrap: null, audit: null, breakTest: null });
    const { assetClass: _a, chosen: _c, windows: _w, timing: _t, ...engineFields } = fit.results!.segments[0];
    expect(engineFields).not.toHaveProperty('modelComparison');
    expect(Object.keys(engineFields.estimates)).not.toEqual(expect.arrayContaining(['tCopula']));
    expect(engineFields.estimates).not.toHaveProperty('betaMixing');
    expect(engineFields.estimates).not.toHaveProperty('logitNormal');
    const { timing: _dt, ...direct } = json(
      fitPanel({ segment: dataset.segments[0], periods, obligors: PANEL_A.obligors, defaults: PANEL_A.defaults }, { models: ['independent'], assetClass: 'corporate' }),
    ) as unknown as Record<string, unknown>;
    expect(json(engineFields)).toEqual(direct);
    // Panel A's binomialMle rho 0.037091 (computed with SciPy 1.17 by tests/fixtures/engine/make_fixtures.py).
    expect(engineFields.estimates.binomialMle.rho).toBeCloseTo(0.037091, 5);
  }, 120_000);
});
