import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import engine from '@/tests/fixtures/engine/engine-fixtures.json';
import { closeDb } from '@/db/connection';
import type { SessionUser } from '@/lib/auth/guard';
import { createDraft, transition } from '@/lib/dal/assumptions';
import { createToken } from '@/lib/dal/tokens';
import { AppError } from '@/lib/errors';
import { fitPanel, type SegmentFit } from '@/lib/stats/fit-panel';
import * as inForceRoute from '@/app/api/v1/assumptions/route';
import * as exportRoute from '@/app/api/v1/assumptions/export/route';
import { makeUser } from '../../support/users';
import { call, draftBody, makeFitRun } from '../../support/assumptions';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));

// Every estimator with an interval can be drafted, and the version records the factor model its
// value came from. The fit run holds the engine's own results for fixture panel A (binomialMle rho
// 0.037091, computed with SciPy 1.17 by tests/fixtures/engine/make_fixtures.py), once per segment.
let analyst: SessionUser;
let validator: SessionUser;
let admin: SessionUser;
let fit: SegmentFit;
let fitId = 0;
const tag = Date.now().toString(36);
const name = (estimator: string) => `Models ${tag} ${estimator}`;

/** What each estimator assumes about the factor over time (DESIGN.md; lib/stats/fit-models.ts states the same). */
const MODEL: Record<string, 'independent' | 'ar1'> = {
  binomialMle: 'independent',
  vasicekMle: 'independent',
  momentVariance: 'independent',
  momentVarianceCorrected: 'independent',
  jointDefault: 'independent',
  momentVarianceAutocorrected: 'ar1',
  ar1Mle: 'ar1',
};
const DRAFTS: [string, string][] = [
  ['binomialMle', 'wald'],
  ['vasicekMle', 'chiSquare'],
  ['momentVariance', 'bootstrap'],
  ['momentVarianceCorrected', 'bootstrap'],
  ['momentVarianceAutocorrected', 'bootstrap'],
  ['jointDefault', 'bootstrap'],
  ['ar1Mle', 'profile'],
];

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  admin = await makeUser('admin');
  const A = engine.panels.A;
  fit = fitPanel(
    { segment: 'A', periods: A.obligors.map((_, t) => String(2010 + t)), obligors: A.obligors, defaults: A.defaults },
    { bootstrap: { replications: 40, seed: 7 } },
  );
  const names = [...DRAFTS.map(([e]) => name(e)), name('mismatch'), name('ar1Mle published'), name('binomialMle published')];
  const segments = names.map((segment) => ({ ...fit, segment }));
  fitId = (await makeFitRun(analyst.id, segments[0].segment, undefined, { segments })).fitId;
});
afterAll(async () => {
  await closeDb();
});

describe('drafting any estimator with its interval', () => {
  it.each(DRAFTS)('%s with its %s interval: the value, the interval and the model are copied from the fit', async (estimator, method) => {
    const e = fit.estimates[estimator as keyof SegmentFit['estimates']] as { rho: number; pd: number; intervals: Record<string, { level: number; lower: number; upper: number }> };
    expect(e.intervals[method]).toBeTruthy();
    const v = await createDraft(analyst, draftBody(fitId, name(estimator), { estimator, intervalMethod: method }) as never);
    expect(v).toMatchObject({
      estimator,
      factorModel: MODEL[estimator],
      estimate: e.rho,
      pd: e.pd,
      intervalMethod: method,
      intervalLevel: 0.95,
      intervalLower: e.intervals[method].lower,
      intervalUpper: e.intervals[method].upper,
    });
  });

  it('refuses an interval the estimator does not have, naming the ones it has', async () => {
    const err = await createDraft(analyst, draftBody(fitId, name('mismatch'), { estimator: 'ar1Mle', intervalMethod: 'wald' }) as never).catch((x) => x);
    expect(err).toBeInstanceOf(AppError);
    expect(err.status).toBe(422);
    expect(err.message).toMatch(/no wald interval for ar1Mle .* \(for this estimator: profile\)/);
    expect(err.details).toMatchObject({ field: 'intervalMethod' });
  });
});

describe('the model in the consumer API and the CSV export', () => {
  it('answers the factor model of a published AR(1) value, and gaussian/independent for the others', async () => {
    const versions = new Map<string, number>();
    for (const estimator of ['ar1Mle', 'binomialMle']) {
      const v = await createDraft(analyst, draftBody(fitId, name(`${estimator} published`), { estimator, intervalMethod: 'profile' }) as never);
      await transition(analyst, v.id, { action: 'submit' });
      await transition(validator, v.id, { action: 'start-review' });
      await transition(validator, v.id, { action: 'approve', comment: 'Fine.' });
      await transition(validator, v.id, { action: 'publish' });
      versions.set(estimator, v.id);
    }
    const token = (await createToken(admin, { name: 'Model reader', scopes: ['assumptions:read', 'assumptions:export'] })).token;
    const headers = { authorization: `Bearer ${token}` };
    for (const [estimator, factor] of [
      ['ar1Mle', 'ar1'],
      ['binomialMle', 'independent'],
    ] as const) {
      const res = await call(inForceRoute.GET, { url: `http://127.0.0.1/api/v1/assumptions?segment=${encodeURIComponent(name(`${estimator} published`))}`, headers });
      expect(res.status).toBe(200);
      const a = res.body.assumption as { estimator: string; model: unknown };
      expect(a.estimator).toBe(estimator);
      expect(a.model).toEqual({ copula: 'gaussian', factor });
    }
    const csv = await call(exportRoute.GET, { headers });
    // the cautions come first as '# ' lines; the header is the first line after them
    const lines = csv.text.replace(/^\uFEFF/, '').trim().split('\r\n').filter((l) => !l.startsWith('# '));
    const header = lines[0].split(',');
    const row = lines.find((l) => l.startsWith(name('ar1Mle published')))!.split(',');
    expect(row[header.indexOf('estimator')]).toBe('ar1Mle');
    expect(row[header.indexOf('copula')]).toBe('gaussian');
    expect(row[header.indexOf('factor_model')]).toBe('ar1');
  });
});
