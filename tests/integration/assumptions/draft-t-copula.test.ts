import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { eq } from 'drizzle-orm';
import { closeDb, getDb } from '@/db/connection';
import { assumptionVersions } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import { contentHash } from '@/lib/assumptions/content';
import { createDraft, getVersionPage, transition } from '@/lib/dal/assumptions';
import { createToken } from '@/lib/dal/tokens';
import { AppError } from '@/lib/errors';
import { fitPanel } from '@/lib/stats/fit-panel';
import type { SegmentFit } from '@/lib/stats/fit-result';
import * as inForceRoute from '@/app/api/v1/assumptions/route';
import * as exportRoute from '@/app/api/v1/assumptions/export/route';
import * as openApiRoute from '@/app/api/openapi.json/route';
import { validate, type Schema } from '../../support/json-schema';
import { makeUser } from '../../support/users';
import { call, draftBody, makeFitRun } from '../../support/assumptions';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));

// A t-copula value: the fit's estimates.tCopula (the engine's own, run here by fitPanel with the t
// copula; the MLE is checked against SciPy in tests/unit/stats/) drafted with rho's profile interval,
// nu and nu's interval, approved by a second person, published, and read from the consumer API and
// the CSV with its mixing law.
let analyst: SessionUser;
let validator: SessionUser;
let admin: SessionUser;
let fitId = 0;
let fit: SegmentFit;
const tag = Date.now().toString(36);
const name = (what: string) => `T copula ${tag} ${what}`;
const fields = (line: string) => [...line.matchAll(/("(?:[^"]|"")*"|[^,]*)(?:,|$)/g)].slice(0, -1).map((m) => m[1].replace(/^"(.*)"$/s, '$1').replaceAll('""', '"'));
// Sixteen years drawn from a t copula with nu = 4 (simulateTCopulaPanel, seed 1): the maximum has a finite nu.
const panel = { obligors: Array<number>(16).fill(1500), defaults: [4, 68, 0, 0, 10, 0, 3, 26, 12, 0, 52, 49, 0, 2, 1, 4] };

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  admin = await makeUser('admin');
  fit = fitPanel({ segment: 'x', periods: panel.obligors.map((_, t) => String(2005 + t)), obligors: panel.obligors, defaults: panel.defaults }, { mixingLaws: { models: ['t'] } });
  const t = fit.estimates.tCopula!;
  const segments: unknown[] = [name('draft'), name('published'), name('gaussian'), name('wald')].map((segment) => ({ ...fit, segment }));
  // a fit without the challenge, and one whose t maximum is the Gaussian limit or was clipped
  const { tCopula: _t, ...plain } = fit.estimates;
  segments.push({ ...fit, segment: name('without'), estimates: plain });
  segments.push({ ...fit, segment: name('limit'), estimates: { ...fit.estimates, tCopula: { ...t, nu: null, reason: 'The maximum is the Gaussian limit (nu = infinity).' } } });
  segments.push({ ...fit, segment: name('clipped'), estimates: { ...fit.estimates, tCopula: { ...t, status: 'clipped', reason: 'The maximum lies at the smallest nu searched (2.04): the tail may be fatter still.' } } });
  fitId = (await makeFitRun(analyst.id, name('draft'), undefined, { segments })).fitId;
}, 60_000);
afterAll(async () => {
  await closeDb();
});

async function publish(id: number) {
  await transition(analyst, id, { action: 'submit' });
  await transition(validator, id, { action: 'start-review' });
  await transition(validator, id, { action: 'approve', comment: 'The t copula fits these years; nu is recorded with the value.' });
  await transition(validator, id, { action: 'publish' });
}

describe('drafting a Student-t copula value', () => {
  it('copies rho with its profile interval, the PD and nu with its interval (an unbounded end null) from the fit, margins as for any estimate', async () => {
    const t = fit.estimates.tCopula!;
    expect(t.status).toBe('ok');
    expect(t.nu).toBeGreaterThan(2);
    expect(t.nuInterval?.upper).toBeNull();
    const v = await createDraft(analyst, draftBody(fitId, name('draft'), { estimator: 'tCopula', intervalMethod: 'profile' }) as never);
    expect(v).toMatchObject({
      estimator: 'tCopula',
      mixingLaw: 't',
      factorModel: 'independent',
      estimate: t.rho,
      pd: t.pd,
      intervalMethod: 'profile',
      intervalLevel: 0.95,
      intervalLower: t.intervals.profile!.lower,
      intervalUpper: t.intervals.profile!.upper,
      nu: t.nu,
      nuInterval: { level: 0.95, lower: t.nuInterval!.lower, upper: null },
      prior: null,
    });
    expect(v.conservativeValue).toBeCloseTo((t.rho as number) + 0.03, 8);
    const [row] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, v.id));
    expect(row).toMatchObject({ mixingLaw: 't', nu: t.nu, nuInterval: { level: 0.95, lower: t.nuInterval!.lower, upper: null } });
    // the law and nu are in the hash of a t value: the stored hash is that of the content with them
    expect(contentHash(v)).toBe(row.contentHash);
    expect(contentHash({ ...v, nu: (t.nu as number) + 1 })).not.toBe(row.contentHash);
    // the version page names the law, and its own cautions say what nu means for the tail
    const page = await getVersionPage(validator, v.id, new Date());
    expect(page.version).toMatchObject({ mixingLaw: 't', nu: t.nu });
  });

  it('refuses, with a sentence naming the field, a fit without the t copula, its Gaussian limit, a clipped maximum and another interval', async () => {
    const refusal = async (segment: string, intervalMethod = 'profile') => {
      const err = await createDraft(analyst, draftBody(fitId, segment, { estimator: 'tCopula', intervalMethod }) as never).catch((x) => x);
      expect(err).toBeInstanceOf(AppError);
      expect(err.status).toBe(422);
      return { message: err.message as string, field: err.details?.field };
    };
    expect(await refusal(name('without'))).toEqual({ message: expect.stringMatching(/^The fit has no Student-t copula estimate for .* without: run a fit that challenges the Gaussian copula/), field: 'estimator' });
    expect(await refusal(name('limit'))).toEqual({ message: expect.stringMatching(/is the Gaussian limit \(nu = infinity\)/), field: 'estimator' });
    expect(await refusal(name('clipped'))).toEqual({ message: expect.stringMatching(/has status clipped, not ok, so it cannot be drafted: The maximum lies at the smallest nu/), field: 'estimator' });
    expect(await refusal(name('wald'), 'wald')).toEqual({ message: expect.stringMatching(/choose the interval profile, not wald/), field: 'intervalMethod' });
  });

  it('is published like any value and served in force by the consumer API and the CSV with mixing law t and its nu; a Gaussian value says gaussian and keeps its hash', async () => {
    const t = fit.estimates.tCopula!;
    const tv = await createDraft(analyst, draftBody(fitId, name('published'), { estimator: 'tCopula', intervalMethod: 'profile' }) as never);
    await publish(tv.id);
    const gv = await createDraft(analyst, draftBody(fitId, name('gaussian')) as never);
    await publish(gv.id);
    const [grow] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, gv.id));
    expect(grow).toMatchObject({ mixingLaw: 'gaussian', nu: null, nuInterval: null });
    // the hash of a Gaussian value leaves the law out, as it was taken before the law was kept
    const { mixingLaw: _l, nu: _n, nuInterval: _i, ...withoutLaw } = gv;
    expect(contentHash(withoutLaw as never)).toBe(grow.contentHash);

    const token = (await createToken(admin, { name: 'T copula reader', scopes: ['assumptions:read', 'assumptions:export'] })).token;
    const headers = { authorization: `Bearer ${token}` };
    const res = await call(inForceRoute.GET, { url: `http://127.0.0.1/api/v1/assumptions?segment=${encodeURIComponent(name('published'))}`, headers });
    expect(res.status).toBe(200);
    const a = res.body.assumption as Record<string, unknown>;
    expect(a).toMatchObject({
      estimator: 'tCopula',
      estimatorName: 'Student-t copula maximum likelihood',
      mixingLaw: 't',
      nu: { value: t.nu, interval: { level: 0.95, lower: t.nuInterval!.lower, upper: null } },
      model: { copula: 't', factor: 'independent' },
      interval: { method: 'profile', lower: t.intervals.profile!.lower, upper: t.intervals.profile!.upper },
    });
    expect((a.cautions as string[]).some((c) => /Student-t copula with nu = .*must use the t copula with this nu/.test(c))).toBe(true);
    const g = await call(inForceRoute.GET, { url: `http://127.0.0.1/api/v1/assumptions?segment=${encodeURIComponent(name('gaussian'))}`, headers });
    expect(g.body.assumption).toMatchObject({ mixingLaw: 'gaussian', nu: null, model: { copula: 'gaussian' } });
    // both answers as the OpenAPI document describes them
    const doc = (await call(openApiRoute.GET)).body as Schema;
    const answer = { $ref: '#/components/schemas/Answer' };
    expect(validate(res.body, answer, doc)).toEqual([]);
    expect(validate(g.body, answer, doc)).toEqual([]);

    const csv = await call(exportRoute.GET, { headers });
    const lines = csv.text.replace(/^\uFEFF/, '').trim().split('\r\n').filter((l) => !l.startsWith('# '));
    const header = fields(lines[0]);
    const col = (row: string[], c: string) => row[header.indexOf(c)];
    const trow = fields(lines.find((l) => l.startsWith(name('published')))!);
    expect(col(trow, 'mixing_law')).toBe('t');
    expect(col(trow, 'copula')).toBe('t');
    expect(Number(col(trow, 'nu'))).toBe(t.nu);
    expect(Number(col(trow, 'nu_lower'))).toBe(t.nuInterval!.lower);
    expect(col(trow, 'nu_upper')).toBe('');
    const grow2 = fields(lines.find((l) => l.startsWith(name('gaussian')))!);
    expect(col(grow2, 'mixing_law')).toBe('gaussian');
    expect(col(grow2, 'nu')).toBe('');
  });
});
