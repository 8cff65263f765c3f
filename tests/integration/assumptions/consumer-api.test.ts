import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { eq } from 'drizzle-orm';
import { closeDb, getDb } from '@/db/connection';
import { apiTokens } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import { addDays, addMonths, todayIso } from '@/lib/assumptions/dates';
import { createDraft, transition } from '@/lib/dal/assumptions';
import { authenticateToken, createToken, LAST_USE_RESOLUTION_MS, listTokens, revokeToken } from '@/lib/dal/tokens';
import * as inForceRoute from '@/app/api/v1/assumptions/route';
import * as versionRoute from '@/app/api/v1/assumptions/[id]/versions/[version]/route';
import * as exportRoute from '@/app/api/v1/assumptions/export/route';
import * as openApiRoute from '@/app/api/openapi.json/route';
import * as tokensRoute from '@/app/api/admin/tokens/route';
import { validate, type Schema } from '../../support/json-schema';
import { makeUser } from '../../support/users';
import { call, draftBody, makeFitRun } from '../../support/assumptions';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session } from '../../support/mock-session';

let analyst: SessionUser;
let validator: SessionUser;
let admin: SessionUser;
let token: string;
const segment = `Consumer segment ${Date.now().toString(36)}`;
const today = todayIso();
const v1Effective = addDays(today, -200);
const v2Effective = addDays(today, -50);
let assumptionId = 0;

/** Drafts, reviews and publishes a version with the clock set to its effective date (noon UTC). */
async function publish(fit: { rho: number; pd: number; profile: { level: number; lower: number; upper: number } }, effectiveDate: string, reviewBy?: string) {
  const { fitId } = await makeFitRun(analyst.id, segment, fit);
  const at = new Date(`${effectiveDate}T12:00:00Z`);
  const v = await createDraft(analyst, draftBody(fitId, segment, { effectiveDate, ...(reviewBy ? { reviewBy } : {}) }) as never);
  await transition(analyst, v.id, { action: 'submit' }, at);
  await transition(validator, v.id, { action: 'start-review' }, at);
  await transition(validator, v.id, { action: 'approve', comment: 'Fine.' }, at);
  await transition(validator, v.id, { action: 'publish' }, at);
  return v;
}

const bearer = (t: string) => ({ authorization: `Bearer ${t}` });
const inForce = (query: string, t = token) => call(inForceRoute.GET, { url: `http://127.0.0.1/api/v1/assumptions?${query}`, headers: bearer(t) });

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  admin = await makeUser('admin');
  // Version 1: effective 200 days ago, review by 100 days from now. Version 2: effective 50 days ago.
  const v1 = await publish({ rho: 0.037091, pd: 0.013307, profile: { level: 0.95, lower: 0.01177, upper: 0.1147 } }, v1Effective, addDays(today, 100));
  assumptionId = v1.assumptionId;
  await publish({ rho: 0.05, pd: 0.0135, profile: { level: 0.95, lower: 0.02, upper: 0.12 } }, v2Effective);
  token = (await createToken(admin, { name: 'Capital model', scopes: ['assumptions:read', 'assumptions:export'] })).token;
});
afterAll(async () => {
  await closeDb();
});

describe('the version in force at a date', () => {
  it('before the first version: 404 with a sentence', async () => {
    const res = await inForce(`segment=${encodeURIComponent(segment)}&asOf=${addDays(v1Effective, -1)}`);
    expect(res.status).toBe(404);
    expect(res.body.message).toContain(`was in force on ${addDays(v1Effective, -1)}`);
  });

  it('between the two: version 1 (superseded now, in force then), with lineage and cautions', async () => {
    const res = await inForce(`segment=${encodeURIComponent(segment)}&asOf=${addDays(v2Effective, -1)}`);
    expect(res.status).toBe(200);
    const a = res.body.assumption as Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any
    expect(a.version).toBe(1);
    expect(a.status).toBe('superseded');
    // When it stopped being the published one: when version 2 published (not null, an ISO time).
    expect(a.endedAt).toMatch(/^\d{4}-\d{2}-\d{2}T/);
    // 0.037091 + 0.01 + 0 + 0.02 (the margins of draftBody), by hand.
    expect(a.value).toBe(0.067091);
    expect(a.pd).toBe(0.013307);
    expect(a.interval).toEqual({ method: 'profile', methodName: 'profile likelihood', level: 0.95, lower: 0.01177, upper: 0.1147 });
    // drafted from binomialMle: the Gaussian one-factor model with independent years
    expect(a.model).toEqual({ copula: 'gaussian', factor: 'independent' });
    // The code name stays; the readable name the screens use is beside it.
    expect(a.estimator).toBe('binomialMle');
    expect(a.estimatorName).toBe('Binomial-mixture maximum likelihood');
    expect(a.lineage.datasetSha256).toMatch(/^[0-9a-f]{64}$/);
    expect(a.lineage.fitUrl).toBe(`/fits/${a.lineage.fitRunId}`);
    expect(a.lineage.seeds).toEqual({ bootstrap: 7, audit: 11 });
    expect(a.approvedBy).toBe(validator.name);
    expect((res.body.cautions as string[]).join(' ')).toMatch(/no tail dependence/);
  });

  it('on the effective date of version 2 and after (today, the default): version 2', async () => {
    expect(((await inForce(`segment=${encodeURIComponent(segment)}&asOf=${v2Effective}`)).body.assumption as { version: number }).version).toBe(2);
    const res = await inForce(`segment=${encodeURIComponent(segment)}`);
    expect(res.body.asOf).toBe(today);
    expect((res.body.assumption as { version: number; value: number }).version).toBe(2);
    expect((res.body.assumption as { endedAt: string | null }).endedAt).toBeNull();
    expect((res.body.assumption as { value: number }).value).toBe(0.08);
  });

  it('after the review-by date of version 2 (a projection), under the default overdue policy: still served, flagged overdue, with the caution', async () => {
    const lapse = addDays(v2Effective, 400);
    const res = await inForce(`segment=${encodeURIComponent(segment)}&asOf=${lapse}`);
    expect(res.status).toBe(200);
    const a = res.body.assumption as { version: number; review: { overdue: boolean; policy: string; reviewBy: string }; cautions: string[] };
    expect(a.version).toBe(2);
    expect(a.review).toEqual({ reviewBy: addMonths(v2Effective, 12), overdue: true, policy: 'flag' });
    expect(a.cautions.some((c) => c.startsWith(`This value is past its review-by date (${addMonths(v2Effective, 12)})`))).toBe(true);
    const now = await inForce(`segment=${encodeURIComponent(segment)}`);
    expect((now.body.assumption as { review: { overdue: boolean } }).review.overdue).toBe(false);
  });

  it('without a segment: every segment in force', async () => {
    const res = await inForce(`asOf=${today}`);
    expect(res.status).toBe(200);
    expect((res.body.assumptions as { segment: string }[]).some((a) => a.segment === segment)).toBe(true);
  });

  it('a bad date is 400 naming asOf', async () => {
    const res = await inForce(`segment=x&asOf=2026-02-30`);
    expect(res.status).toBe(400);
    expect(res.body.message).toMatch(/asOf/);
  });

  it('an exact version, and a version that was never published is 404', async () => {
    let res = await call(versionRoute.GET, { headers: bearer(token), params: { id: String(assumptionId), version: '1' } });
    expect(res.status).toBe(200);
    expect((res.body.assumption as { version: number }).version).toBe(1);
    res = await call(versionRoute.GET, { headers: bearer(token), params: { id: String(assumptionId), version: '9' } });
    expect(res.status).toBe(404);
  });
});

describe('API tokens', () => {
  it('no token or a made-up one: 401', async () => {
    expect((await call(inForceRoute.GET, { url: 'http://127.0.0.1/api/v1/assumptions' })).status).toBe(401);
    expect((await inForce('', 'rhb_not-a-real-token-at-all')).status).toBe(401);
  });

  it('the last use is recorded to the minute: a read within a minute of the last writes nothing', async () => {
    // a write (and its log flush) on every read would cost the consumer API more than the read itself
    const t = await createToken(admin, { name: 'Minute model', scopes: ['assumptions:read'] });
    const t0 = new Date('2026-03-02T10:00:00.000Z');
    const lastUse = async () => (await getDb().select().from(apiTokens).where(eq(apiTokens.id, t.id)))[0].lastUsedAt!.getTime();
    await authenticateToken(`Bearer ${t.token}`, 'assumptions:read', t0);
    expect(await lastUse()).toBe(t0.getTime());
    await authenticateToken(`Bearer ${t.token}`, 'assumptions:read', new Date(t0.getTime() + LAST_USE_RESOLUTION_MS - 1));
    expect(await lastUse()).toBe(t0.getTime());
    const later = new Date(t0.getTime() + LAST_USE_RESOLUTION_MS);
    await authenticateToken(`Bearer ${t.token}`, 'assumptions:read', later);
    expect(await lastUse()).toBe(later.getTime());
  });

  it('a revoked token is refused; the last use is recorded before', async () => {
    const t = await createToken(admin, { name: 'Stress model', scopes: ['assumptions:read'] });
    expect((await inForce(`segment=${encodeURIComponent(segment)}`, t.token)).status).toBe(200);
    const listed = (await listTokens(admin)).find((x) => x.id === t.id)!;
    expect(listed.lastUsedAt).not.toBeNull();
    expect(listed.status).toBe('active');
    await revokeToken(admin, t.id);
    const res = await inForce(`segment=${encodeURIComponent(segment)}`, t.token);
    expect(res.status).toBe(401);
    expect(res.body.code).toBe('unauthorized:token');
    expect((await listTokens(admin)).find((x) => x.id === t.id)!.status).toBe('revoked');
  });

  it('is stored hashed: the secret is nowhere in the table, and the list never shows it', async () => {
    const t = await createToken(admin, { name: 'Pricing', scopes: ['assumptions:read'] });
    const [row] = await getDb().select().from(apiTokens).where(eq(apiTokens.id, t.id));
    expect(JSON.stringify(row)).not.toContain(t.token);
    expect(JSON.stringify(await listTokens(admin))).not.toContain(t.token);
  });

  it('scopes: a read-only token cannot export (403)', async () => {
    const t = await createToken(admin, { name: 'Reader', scopes: ['assumptions:read'] });
    const res = await call(exportRoute.GET, { headers: bearer(t.token) });
    expect(res.status).toBe(403);
  });

  it('only admins create tokens (the route answers 403 to an analyst and shows the secret once to an admin)', async () => {
    session.user = analyst;
    expect((await call(tokensRoute.POST, { body: { name: 'x', scopes: ['assumptions:read'] } })).status).toBe(403);
    session.user = admin;
    const res = await call(tokensRoute.POST, { body: { name: 'Provisioning', scopes: ['assumptions:read'] } });
    session.user = null;
    expect(res.status).toBe(201);
    expect(res.body.token).toMatch(/^rhb_[A-Za-z0-9_-]{32}$/);
  });
});

describe('CSV export', () => {
  it('one row per published segment; formula-like cells neutralised', async () => {
    const res = await call(exportRoute.GET, { headers: bearer(token) });
    expect(res.status).toBe(200);
    const lines = res.text.replace(/^\uFEFF/, '').trim().split('\r\n').filter((l) => !l.startsWith('#'));
    expect(lines[0].split(',')[0]).toBe('segment');
    const mine = lines.filter((l) => l.startsWith(segment));
    expect(mine).toHaveLength(1);
    expect(mine[0].split(',')[1]).toBe('2');
  });
});

// The OpenAPI document against the real answers (the validator: tests/support/json-schema.ts).
describe('the OpenAPI document', () => {
  it('is OpenAPI 3.1, lists the routes, and every real answer validates against it', async () => {
    const doc = (await call(openApiRoute.GET)).body as Schema;
    expect(doc.openapi).toBe('3.1.0');
    const paths = doc.paths as Record<string, Record<string, { responses: Record<string, { content?: Record<string, { schema: Schema }> }> }>>;
    expect(Object.keys(paths).sort()).toEqual([
      '/api/v1/assumptions',
      '/api/v1/assumptions/export',
      '/api/v1/assumptions/{id}/versions/{version}',
      '/api/v1/factor-matrices',
      '/api/v1/factor-matrices/export',
      '/api/v1/factor-matrices/{id}/versions',
    ]);
    const schemaOf = (p: string, status: string) => paths[p].get.responses[status].content!['application/json'].schema;

    const one = await inForce(`segment=${encodeURIComponent(segment)}`);
    expect(validate(one.body, schemaOf('/api/v1/assumptions', '200'), doc)).toEqual([]);
    const list = await inForce(`asOf=${today}`);
    expect(validate(list.body, schemaOf('/api/v1/assumptions', '200'), doc)).toEqual([]);
    const exact = await call(versionRoute.GET, { headers: bearer(token), params: { id: String(assumptionId), version: '1' } });
    expect(validate(exact.body, schemaOf('/api/v1/assumptions/{id}/versions/{version}', '200'), doc)).toEqual([]);
    const missing = await inForce(`segment=nothing-here`);
    expect(missing.status).toBe(404);
    expect(validate(missing.body, schemaOf('/api/v1/assumptions', '404'), doc)).toEqual([]);
    const refused = await inForce('', 'rhb_nope');
    expect(validate(refused.body, schemaOf('/api/v1/assumptions', '401'), doc)).toEqual([]);

    // Every value names its mixing law: the Gaussian copula for every value drafted before t-copula values (no nu).
    expect(one.body.assumption).toMatchObject({ mixingLaw: 'gaussian', nu: null, model: { copula: 'gaussian' } });
    const answer = (doc.components as { schemas: Record<string, { properties: { assumption: { properties: Record<string, Schema> } } }> }).schemas.Answer;
    const fields = answer.properties.assumption.properties;
    expect(fields.mixingLaw).toMatchObject({ type: 'string', enum: ['gaussian', 't'] });
    expect(JSON.stringify(fields.nu)).toContain('"null"');
    expect(validate({ ...(one.body.assumption as Schema), mixingLaw: 'beta' }, answer.properties.assumption as never, doc)).toEqual(['$.mixingLaw: beta not in enum']);
    // The validator itself catches an answer that drifts from the document.
    const drifted = { ...one.body, assumption: { ...(one.body.assumption as Schema), extra: 1, value: 'high' } };
    expect(validate(drifted, schemaOf('/api/v1/assumptions', '200'), doc)).not.toEqual([]);
  });
});
