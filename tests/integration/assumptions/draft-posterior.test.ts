import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { closeDb } from '@/db/connection';
import type { SessionUser } from '@/lib/auth/guard';
import { createDraft, transition } from '@/lib/dal/assumptions';
import { createToken } from '@/lib/dal/tokens';
import { AppError } from '@/lib/errors';
import { fitPanel } from '@/lib/stats/fit-panel';
import { posteriorBlock } from '@/lib/stats/low-default';
import * as inForceRoute from '@/app/api/v1/assumptions/route';
import * as exportRoute from '@/app/api/v1/assumptions/export/route';
import { makeUser } from '../../support/users';
import { call, draftBody, makeFitRun } from '../../support/assumptions';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));

// A low-default segment's posterior median can be drafted as its value: the credible interval,
// the posterior median of p and the priors travel with it. The fit run holds the engine's own
// blocks (the posterior is checked against SciPy in tests/unit/stats/portfolio/rho-posterior.test.ts).
let analyst: SessionUser;
let validator: SessionUser;
let admin: SessionUser;
let fitId = 0;
const tag = Date.now().toString(36);
const name = (what: string) => `Posterior ${tag} ${what}`;
/** One CSV line's fields (RFC 4180 quoting: the priors hold commas). */
const fields = (line: string) => [...line.matchAll(/("(?:[^"]|"")*"|[^,]*)(?:,|$)/g)].slice(0, -1).map((m) => m[1].replace(/^"(.*)"$/s, '$1').replaceAll('""', '"'));
const panel = { obligors: [800, 820, 790, 810, 850, 830, 805, 815], defaults: [0, 2, 0, 1, 3, 0, 1, 0] };
const posterior = posteriorBlock(panel, { kind: 'beta', a: 2, b: 18 }, { assetClass: null });

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  admin = await makeUser('admin');
  const fit = fitPanel({ segment: 'x', periods: panel.obligors.map((_, t) => String(2010 + t)), obligors: panel.obligors, defaults: panel.defaults });
  const segments = [name('draft'), name('published'), name('mismatch'), name('mle')].map((segment) => ({ ...fit, segment, posterior }));
  segments.push({ ...fit, segment: name('without') } as never);
  fitId = (await makeFitRun(analyst.id, segments[0].segment, undefined, { segments })).fitId;
});
afterAll(async () => {
  await closeDb();
});

describe('drafting a posterior median', () => {
  it('copies the median of rho, the credible interval, the median of p and the priors from the fit', async () => {
    if (posterior.status !== 'ok') throw new Error(posterior.reason);
    const v = await createDraft(analyst, draftBody(fitId, name('draft'), { estimator: 'posteriorMedian', intervalMethod: 'credible' }) as never);
    expect(v).toMatchObject({
      estimator: 'posteriorMedian',
      factorModel: 'independent',
      estimate: posterior.median,
      pd: posterior.pd.median,
      intervalMethod: 'credible',
      intervalLevel: 0.95,
      intervalLower: posterior.lower,
      intervalUpper: posterior.upper,
      prior: { rho: 'beta:2,18', pd: 'beta:1,1' },
    });
    // the margins apply to it as to any estimate
    expect(v.conservativeValue).toBeCloseTo(posterior.median + 0.03, 8);
  });

  it('refuses another interval, and a segment whose fit has no posterior, naming the field', async () => {
    const wrong = await createDraft(analyst, draftBody(fitId, name('mismatch'), { estimator: 'posteriorMedian', intervalMethod: 'profile' }) as never).catch((x) => x);
    expect(wrong).toBeInstanceOf(AppError);
    expect(wrong.message).toMatch(/credible interval: choose the interval credible, not profile/);
    expect(wrong.details).toMatchObject({ field: 'intervalMethod' });
    const none = await createDraft(analyst, draftBody(fitId, name('without'), { estimator: 'posteriorMedian', intervalMethod: 'credible' }) as never).catch((x) => x);
    expect(none).toBeInstanceOf(AppError);
    expect(none.status).toBe(422);
    expect(none.message).toMatch(/no posterior for .*: run a fit with a prior/);
    expect(none.details).toMatchObject({ field: 'estimator' });
  });

  it('publishes with the priors in the consumer API and the CSV export, and null priors for other estimators', async () => {
    for (const [segment, estimator, intervalMethod] of [
      [name('published'), 'posteriorMedian', 'credible'],
      [name('mle'), 'binomialMle', 'profile'],
    ]) {
      const v = await createDraft(analyst, draftBody(fitId, segment, { estimator, intervalMethod }) as never);
      await transition(analyst, v.id, { action: 'submit' });
      await transition(validator, v.id, { action: 'start-review' });
      await transition(validator, v.id, { action: 'approve', comment: 'The evidence supports the value.' });
      await transition(validator, v.id, { action: 'publish' });
    }
    const token = (await createToken(admin, { name: 'Posterior reader', scopes: ['assumptions:read', 'assumptions:export'] })).token;
    const headers = { authorization: `Bearer ${token}` };
    const res = await call(inForceRoute.GET, { url: `http://127.0.0.1/api/v1/assumptions?segment=${encodeURIComponent(name('published'))}`, headers });
    expect(res.status).toBe(200);
    const a = res.body.assumption as { estimator: string; prior: unknown; interval: { method: string; methodName: string } };
    expect(a.estimator).toBe('posteriorMedian');
    expect(a.prior).toEqual({ rho: 'beta:2,18', pd: 'beta:1,1' });
    expect(a.interval).toMatchObject({ method: 'credible', methodName: 'equal-tailed credible (posterior)' });
    const csv = await call(exportRoute.GET, { headers });
    const lines = csv.text.replace(/^\uFEFF/, '').trim().split('\r\n').filter((l) => !l.startsWith('# '));
    const header = fields(lines[0]);
    const row = fields(lines.find((l) => l.startsWith(name('published')))!);
    expect(row[header.indexOf('estimator')]).toBe('posteriorMedian');
    expect(row[header.indexOf('prior_rho')]).toBe('beta:2,18');
    expect(row[header.indexOf('prior_pd')]).toBe('beta:1,1');
    const other = lines.map(fields).find((r) => r[0] === name('mle'));
    expect(other).toBeDefined();
    expect(other![header.indexOf('prior_rho')]).toBe('');
  });
});
