import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import { closeDb, getDb } from '@/db/connection';
import { mailOutbox } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import { runScheduledTransitions } from '@/lib/dal/assumptions';
import { createMatrixDraft, editMatrixDraft, getMatrixVersionPage, listMatrixQueue, matricesInForce, matrixTransition, matrixVersions } from '@/lib/dal/factor-matrices';
import { publishDueMatrices } from '@/lib/dal/factor-matrices/writes';
import { overduePolicyIn } from '@/lib/dal/overdue-policy';
import { createToken } from '@/lib/dal/tokens';
import { AppError } from '@/lib/errors';
import { NEGATIVE_MARGIN } from '@/lib/factor-matrices/cautions';
import type { MatrixDraftInput } from '@/lib/factor-matrices/content';
import { checkCorrelationMatrix } from '@/lib/stats/correlation-matrix-check';
import { assembleFactorCorrelationMatrix } from '@/lib/stats/factor-correlation-matrix';
import type { FactorCorrelation } from '@/lib/stats/factor-correlation';
import * as draftRoute from '@/app/api/factor-matrices/route';
import * as editRoute from '@/app/api/factor-matrices/[id]/route';
import * as transitionRoute from '@/app/api/factor-matrices/[id]/transitions/route';
import * as inForceRoute from '@/app/api/v1/factor-matrices/route';
import * as versionsRoute from '@/app/api/v1/factor-matrices/[id]/versions/route';
import * as exportRoute from '@/app/api/v1/factor-matrices/export/route';
import * as openApiRoute from '@/app/api/openapi.json/route';
import { validate, type Schema } from '../../support/json-schema';
import { session } from '../../support/mock-session';
import { makeUser } from '../../support/users';
import { call, makeFitRun } from '../../support/assumptions';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));

// A factor-correlation matrix through its lifecycle: drafted from a fit's pairs block (assembled by
// the engine's own assembleFactorCorrelationMatrix from invented pair estimates: the pair likelihood
// itself is checked against SciPy in tests/unit/stats/), every refusal, the scheduler's publication,
// supersession, the consumer API with as-of dates and the CSV.
let analyst: SessionUser;
let validator: SessionUser;
let admin: SessionUser;
const tag = Date.now().toString(36);
const periods = Array.from({ length: 12 }, (_, i) => String(2008 + i));
const day = (offset: number) => new Date(Date.now() + offset * 86_400_000);
const iso = (d: Date) => d.toISOString().slice(0, 10);

function entry(a: string, b: string, r: number): FactorCorrelation {
  return {
    a,
    b,
    status: 'ok',
    periods,
    r,
    lower: Math.max(-1, r - 0.35),
    upper: Math.min(1, r + 0.25),
    level: 0.95,
    moment: r - 0.04,
    logLik: -80,
    margins: { a: { pd: 0.02, rho: 0.08 }, b: { pd: 0.015, rho: 0.11 } },
  };
}

/** The pairs block of a fit over `segments` with the matrix `m` (upper triangle read). */
function pairsBlock(segments: string[], m: number[][]) {
  const entries: FactorCorrelation[] = [];
  for (let i = 0; i < segments.length; i++) for (let j = i + 1; j < segments.length; j++) entries.push(entry(segments[i], segments[j], m[i][j]));
  return assembleFactorCorrelationMatrix(segments, entries);
}

const psd = [
  [1, 0.62, 0.41],
  [0.62, 1, 0.55],
  [0.41, 0.55, 1],
];
// Not positive semi-definite (smallest eigenvalue -0.5616 by numpy.linalg.eigvalsh: tests/fixtures/portfolio/matrix-check-fixtures.json, "pairwise4").
const notPsd = [
  [1, 0.95, 0.1, 0.9],
  [0.95, 1, 0.85, 0.2],
  [0.1, 0.85, 1, 0.7],
  [0.9, 0.2, 0.7, 1],
];
const setA = ['A', 'B', '=HYPERLINK("x")'].map((s) => `${s} ${tag}`);
const setN = ['N1', 'N2', 'N3', 'N4'].map((s) => `${s} ${tag}`);
const setL = ['L1', 'L2', 'L3'].map((s) => `${s} ${tag}`);
let fitA = 0;
let fitN = 0;
let fitTampered = 0;
let fitPlain = 0;
let fitL = 0;

function body(fitId: number, over: Partial<MatrixDraftInput> = {}): MatrixDraftInput {
  return {
    fitId,
    margin: { value: 0.02, rationale: 'Twelve yearly observations: the pairs are imprecise; a small uniform add-on.' },
    intendedUses: 'Economic capital: the correlation between the segments’ systematic factors.',
    limitations: 'Valid only with the segments’ PDs and the Gaussian factor model.',
    effectiveDate: iso(new Date()),
    ...over,
  };
}

async function refusal(p: Promise<unknown>): Promise<AppError> {
  const err = await p.then(
    () => null,
    (e: unknown) => e,
  );
  expect(err).toBeInstanceOf(AppError);
  return err as AppError;
}

async function approve(id: number, now: Date = new Date()) {
  await matrixTransition(analyst, id, { action: 'submit' }, now);
  await matrixTransition(validator, id, { action: 'start-review' }, now);
  await matrixTransition(validator, id, { action: 'approve', comment: 'Pairs and intervals checked against the fit; the margin is justified.' }, now);
}

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  admin = await makeUser('admin');
  fitA = (await makeFitRun(analyst.id, setA[0], undefined, { pairs: pairsBlock(setA, psd) })).fitId;
  fitN = (await makeFitRun(analyst.id, setN[0], undefined, { pairs: pairsBlock(setN, notPsd) })).fitId;
  // Stored results whose estimate is not PSD and carry no nearest matrix: the value itself is not valid.
  fitTampered = (await makeFitRun(analyst.id, setN[0], undefined, { pairs: { ...pairsBlock(setN, notPsd), nearest: null, largestChange: null } })).fitId;
  fitPlain = (await makeFitRun(analyst.id, setA[0])).fitId;
  fitL = (await makeFitRun(analyst.id, setL[0], undefined, { pairs: pairsBlock(setL, psd) })).fitId;
}, 60_000);
afterAll(async () => {
  await closeDb();
});

describe('drafting a factor-correlation matrix from a fit', () => {
  let draftId = 0;
  it('freezes the evidence, the pairs with their intervals and moment values, and adds the margin off the diagonal', async () => {
    const v = await createMatrixDraft(analyst, body(fitA));
    draftId = v.id;
    expect(v).toMatchObject({ status: 'draft', version: 1, segments: setA, fitRunId: fitA, engineVersion: 'test-engine-1', seeds: { bootstrap: 7, audit: 11 }, windowFrom: '2008', windowTo: '2019', margin: 0.02, nearest: null, largestChange: null });
    expect(v.datasetSha256).toMatch(/^[0-9a-f]{64}$/);
    expect(v.contentHash).toMatch(/^[0-9a-f]{64}$/);
    expect(v.pairs).toHaveLength(3);
    expect(v.pairs[0]).toEqual({ a: setA[0], b: setA[1], r: 0.62, lower: 0.27, upper: 0.87, level: 0.95, moment: 0.62 - 0.04, periods });
    expect(v.estimated).toEqual(psd);
    expect(v.value[0][1]).toBeCloseTo(0.64, 14);
    expect(v.value[1][2]).toBeCloseTo(0.57, 14);
    expect(v.value[2][2]).toBe(1);
    expect(checkCorrelationMatrix(v.value).valid).toBe(true);
    expect(v.author?.id).toBe(analyst.id);
  });

  it('refuses a second open version of the same set of segments (in any order of the fit)', async () => {
    const err = await refusal(createMatrixDraft(analyst, body(fitA)));
    expect(err.code).toBe('conflict:open-version');
    expect(err.message).toContain(`Version 1 of the matrix of ${setA.join(', ')} is still draft`);
    await matrixTransition(analyst, draftId, { action: 'submit' });
    await matrixTransition(validator, draftId, { action: 'start-review' });
    await matrixTransition(validator, draftId, { action: 'reject', comment: 'Drafted only to test the refusal of a second open version.' });
  });

  it('starts from the nearest correlation matrix when the estimates are not PSD, and names the largest change', async () => {
    const v = await createMatrixDraft(analyst, body(fitN, { margin: { value: 0, rationale: 'The nearest matrix already changes the estimates; no add-on.' } }));
    expect(v.smallestEigenvalue).toBeCloseTo(-0.5616275216849151, 10); // numpy.linalg.eigvalsh, matrix-check-fixtures.json
    expect(v.nearest).not.toBeNull();
    expect(v.largestChange).not.toBeNull();
    expect(v.value).toEqual(v.nearest);
    expect(v.valueSmallestEigenvalue).toBeGreaterThanOrEqual(-1e-10);
    await matrixTransition(analyst, v.id, { action: 'submit' });
    await matrixTransition(analyst, v.id, { action: 'withdraw' });
    await matrixTransition(analyst, v.id, { action: 'submit' });
    await matrixTransition(validator, v.id, { action: 'start-review' });
    await matrixTransition(validator, v.id, { action: 'reject', comment: 'Test of the nearest matrix only.' });
  });

  it('refuses a margin that breaks positive semi-definiteness, at the margin field, naming the largest margin that keeps it valid', async () => {
    const err = await refusal(createMatrixDraft(analyst, body(fitN, { margin: { value: 0.05, rationale: 'Too much.' } })));
    expect(err.code).toBe('invalid:matrix-margin');
    expect(err.status).toBe(422);
    expect(err.details).toMatchObject({ field: 'margin.value' });
    expect(err.message).toMatch(/With the margin 0\.05 the matrix is no longer a valid correlation matrix\. The matrix is not positive semi-definite \(smallest eigenvalue -.*The largest margin that keeps it valid is 0(\.0+)?\./);
  });

  it('refuses a value that is not a valid correlation matrix (an estimate that is not PSD with no nearest matrix)', async () => {
    const err = await refusal(createMatrixDraft(analyst, body(fitTampered)));
    expect(err.code).toBe('invalid:matrix');
    expect(err.message).toMatch(/not a valid correlation matrix: The matrix is not positive semi-definite \(smallest eigenvalue -0\.5616\)/);
  });

  it('refuses a negative margin (the conservative direction is an increase), a fit without pairs, a review-by date too late, and a non-analyst', async () => {
    session.user = analyst;
    const neg = await call(draftRoute.POST, { body: body(fitA, { margin: { value: -0.01, rationale: 'Lower.' } }) });
    expect(neg.status).toBe(422);
    expect((neg.body.fieldErrors as Record<string, string>)['margin.value']).toBe(NEGATIVE_MARGIN);
    expect((await refusal(createMatrixDraft(analyst, body(fitPlain)))).code).toBe('conflict:no-matrix');
    const late = await refusal(createMatrixDraft(analyst, body(fitA, { reviewBy: iso(day(400)) })));
    expect(late.details).toMatchObject({ field: 'reviewBy' });
    expect((await refusal(createMatrixDraft(validator, body(fitA)))).code).toBe('forbidden:assumptions:draft');
  });
});

describe('the lifecycle of a matrix version: the rules of the segment assumptions', () => {
  it('refuses self-review, approval without a comment, approval by an administrator and a back-dated effective date', async () => {
    const v = await createMatrixDraft(analyst, body(fitA, { margin: { value: 0, rationale: 'None.' } }));
    expect((await refusal(matrixTransition(validator, v.id, { action: 'submit' }))).code).toBe('forbidden:submit');
    await matrixTransition(analyst, v.id, { action: 'submit' });
    // In every validator's queue but its author's (were the author a validator now).
    expect((await listMatrixQueue(validator)).find((i) => i.id === v.id)).toMatchObject({ why: 'Submitted: awaiting review', href: `/library/matrices/${v.id}` });
    expect((await listMatrixQueue({ ...analyst, role: 'validator' })).some((i) => i.id === v.id)).toBe(false);
    // The e-mail of a segment's version: awaiting review, to the validators who are not its makers.
    const mail = await getDb()
      .select()
      .from(mailOutbox)
      .where(and(eq(mailOutbox.kind, 'awaiting-review'), eq(mailOutbox.toAddress, validator.email.toLowerCase())));
    const mine = mail.find((m) => m.body.includes(`/library/matrices/${v.id}`));
    expect(mine?.subject).toBe(`Awaiting review: correlation assumption the factor-correlation matrix of ${setA.join(', ')} v${v.version}`);
    expect(mine?.body).toContain('(effective ');
    expect(mine?.versionId).toBeNull();
    // The author, later a validator (a role change), still may not review what they drafted.
    const self = await refusal(matrixTransition({ ...analyst, role: 'validator' }, v.id, { action: 'start-review' }));
    expect(self.code).toBe('forbidden:start-review:maker');
    await matrixTransition(validator, v.id, { action: 'start-review' });
    const noComment = await refusal(matrixTransition(validator, v.id, { action: 'approve', comment: '  ' }));
    expect(noComment.code).toBe('invalid:comment');
    expect((await refusal(matrixTransition(admin, v.id, { action: 'approve', comment: 'x' }))).code).toBe('forbidden:approve');
    // Approving tomorrow a version effective today: back-dated.
    const back = await refusal(matrixTransition(validator, v.id, { action: 'approve', comment: 'Looks right.' }, day(1)));
    expect(back.code).toBe('conflict:approve:back-dated');
    expect(back.message).toContain('cannot take effect before it is approved');
    // Changes requested with a comment: back to draft.
    session.user = validator;
    const r = await call(transitionRoute.POST, { params: { id: String(v.id) }, body: { action: 'request-changes', comment: 'State the window of each pair in the limitations.' } });
    expect(r.status).toBe(200);
    expect(r.body).toMatchObject({ status: 'draft', previous: 'in_review' });
    const page = await getMatrixVersionPage(analyst, v.id);
    expect(page.version.decisionComment).toBe('State the window of each pair in the limitations.');
    expect(page.audit.filter((a) => a.versionId === v.id).map((a) => a.action)).toEqual(['draft', 'submit', 'start-review', 'request-changes']);
    expect(page.actions).toEqual(['submit']);
    expect((await listMatrixQueue(analyst)).find((i) => i.id === v.id)?.why).toBe('Changes requested: State the window of each pair in the limitations.');
    await matrixTransition(analyst, v.id, { action: 'submit' });
    await matrixTransition(validator, v.id, { action: 'start-review' });
    await matrixTransition(validator, v.id, { action: 'reject', comment: 'Closed for the next test.' });
  });

  it('edits the judgement of a version sent back (another analyst): the value recomputed and re-checked, a new hash, the editor a maker too', async () => {
    const v = await createMatrixDraft(analyst, body(fitA, { margin: { value: 0, rationale: 'None.' } }));
    await matrixTransition(analyst, v.id, { action: 'submit' });
    const analyst2 = await makeUser('analyst');
    // An edit after submission returns the version to draft.
    session.user = analyst2;
    const edited = await call(editRoute.PATCH, {
      method: 'PATCH',
      params: { id: String(v.id) },
      body: { margin: { value: 0.03, rationale: 'Twelve years: a small add-on.' }, intendedUses: v.intendedUses, limitations: v.limitations, effectiveDate: v.effectiveDate },
    });
    expect(edited.status).toBe(200);
    expect(edited.body).toMatchObject({ status: 'draft' });
    expect(edited.body.contentHash).not.toBe(v.contentHash);
    const page = await getMatrixVersionPage(analyst2, v.id);
    expect(page.version.value[0][1]).toBeCloseTo(0.65, 14);
    expect(page.version.margin).toBe(0.03);
    expect(page.makerIds.sort()).toEqual([analyst.id, analyst2.id].sort());
    expect(page.audit.filter((a) => a.versionId === v.id).map((a) => [a.action, a.fromStatus, a.toStatus])).toEqual([
      ['draft', null, 'draft'],
      ['submit', 'draft', 'submitted'],
      ['edit', 'submitted', 'draft'],
    ]);
    // A margin that breaks the matrix is refused at its field; a validator cannot edit.
    const broken = await refusal(editMatrixDraft(analyst2, v.id, { margin: { value: 0.45, rationale: 'Too much.' }, intendedUses: 'x', limitations: 'y', effectiveDate: v.effectiveDate }));
    expect(broken.code).toBe('invalid:matrix-margin');
    expect((await refusal(editMatrixDraft(validator, v.id, { margin: { value: 0, rationale: 'x' }, intendedUses: 'x', limitations: 'y', effectiveDate: v.effectiveDate }))).code).toBe('forbidden:edit');
    await matrixTransition(analyst2, v.id, { action: 'submit' });
    // The editor, were they a validator now, may not review it.
    expect((await refusal(matrixTransition({ ...analyst2, role: 'validator' }, v.id, { action: 'start-review' }))).code).toBe('forbidden:start-review:maker');
    await matrixTransition(validator, v.id, { action: 'start-review' });
    await matrixTransition(validator, v.id, { action: 'reject', comment: 'Closed for the next test.' });
    // A rejected version is immutable.
    expect((await refusal(editMatrixDraft(analyst2, v.id, { margin: { value: 0, rationale: 'x' }, intendedUses: 'x', limitations: 'y', effectiveDate: v.effectiveDate }))).code).toBe('conflict:edit');
  });

  it('keeps the audit trail append-only', async () => {
    const failure = (p: Promise<unknown>) => p.then(() => 'no error', (e: unknown) => `${String(e)} ${String((e as { cause?: unknown }).cause)}`);
    expect(await failure(getDb().execute(sql`UPDATE factor_matrix_audit SET comment = 'changed'`))).toContain('factor_matrix_audit is append-only: rows cannot be updated');
    expect(await failure(getDb().execute(sql`DELETE FROM factor_matrix_audit`))).toContain('factor_matrix_audit is append-only: rows cannot be deleted');
  });
});

describe('publication, supersession and the consumer API', () => {
  let v1 = 0;
  let v2 = 0;
  let matrixId = 0;
  const past = day(-10);
  it('publishes an approved version on its effective date by the scheduler, not before', async () => {
    // Version 1: drafted, approved and published ten days ago (the DAL takes the time of each write).
    const d1 = await createMatrixDraft(analyst, body(fitL, { effectiveDate: iso(past), margin: { value: 0, rationale: 'None.' } }), past);
    v1 = d1.id;
    matrixId = d1.matrixId;
    await approve(v1, past);
    const r1 = await runScheduledTransitions(past);
    expect(r1.matrices.published).toContain(v1);
    // Version 2: approved today, effective tomorrow: not published today.
    const d2 = await createMatrixDraft(analyst, body(fitL, { effectiveDate: iso(day(1)) }));
    v2 = d2.id;
    expect(d2.version).toBe(2);
    await approve(v2);
    const r2 = await runScheduledTransitions(new Date());
    expect(r2.matrices.published).not.toContain(v2);
    expect((await getMatrixVersionPage(validator, v2)).version.status).toBe('approved');
    const r3 = await runScheduledTransitions(new Date(`${iso(day(1))}T06:00:00Z`));
    expect(r3.matrices.published).toContain(v2);
    const page = await getMatrixVersionPage(validator, v1);
    expect(page.version.status).toBe('superseded');
    expect(page.audit.filter((a) => a.versionId === v1).map((a) => a.action)).toEqual(['draft', 'submit', 'start-review', 'approve', 'publish', 'supersede']);
  });

  it('answers the version in force at a date (as-of before and after supersession), by set of segments in any order', async () => {
    const token = (await createToken(admin, { name: 'Matrix reader', scopes: ['assumptions:read', 'assumptions:export'] })).token;
    const headers = { authorization: `Bearer ${token}` };
    const seg = encodeURIComponent([setL[2], setL[0], setL[1]].join(','));
    const before = await call(inForceRoute.GET, { url: `http://127.0.0.1/api/v1/factor-matrices?segments=${seg}&asOf=${iso(day(-5))}`, headers });
    expect(before.status).toBe(200);
    const m1 = (before.body.matrices as { version: number; matrixId: number; value: number[][]; lineage: { fitRunId: number } }[])[0];
    expect(m1).toMatchObject({ version: 1, matrixId, lineage: { fitRunId: fitL } });
    expect(m1.value).toEqual(psd);
    const longAgo = await call(inForceRoute.GET, { url: `http://127.0.0.1/api/v1/factor-matrices?segments=${seg}&asOf=${iso(day(-30))}`, headers });
    expect(longAgo.body.matrices).toEqual([]);
    expect((longAgo.body.missing as { reason: string }[])[0].reason).toContain('was published by');
    // The DAL at tomorrow's time: version 2 is in force, version 1 superseded.
    const tomorrow = new Date(`${iso(day(1))}T12:00:00Z`);
    const now2 = await matricesInForce(validator, iso(day(1)), setL, tomorrow);
    expect(now2.matrices.map((m) => m.version)).toEqual([2]);
    expect(now2.matrices[0].margin).toEqual({ value: 0.02, rationale: expect.any(String) });
    expect(now2.matrices[0].pairs[0]).toMatchObject({ segmentA: setL[0], segmentB: setL[1], r: 0.62, interval: { method: 'profile', level: 0.95 }, value: 0.64 });
    // Past its review-by date, under the default overdue policy (flag), it stays in force, flagged overdue.
    const late = await matricesInForce(validator, iso(day(500)), setL, day(500));
    expect(late.matrices.map((m) => [m.version, m.review.overdue, m.review.policy])).toEqual([[2, true, 'flag']]);
    const asOfPast = await matricesInForce(validator, iso(day(-5)), setL, tomorrow);
    expect(asOfPast.matrices.map((m) => m.version)).toEqual([1]);
    const versions = await call(versionsRoute.GET, { params: { id: String(matrixId) }, headers });
    expect((versions.body.versions as { version: number; status: string }[]).map((v) => [v.version, v.status])).toEqual([
      [2, 'published'],
      [1, 'superseded'],
    ]);
    expect((await matrixVersions(validator, matrixId)).length).toBe(2);
    // A set never published, one segment, a bad date, no token.
    expect((await call(inForceRoute.GET, { url: `http://127.0.0.1/api/v1/factor-matrices?segments=${encodeURIComponent(setL.slice(0, 2).join(','))}`, headers })).status).toBe(404);
    expect((await call(inForceRoute.GET, { url: 'http://127.0.0.1/api/v1/factor-matrices?segments=A', headers })).status).toBe(400);
    expect((await call(inForceRoute.GET, { url: 'http://127.0.0.1/api/v1/factor-matrices?asOf=2024-02-30', headers })).status).toBe(400);
    expect((await call(inForceRoute.GET, { url: 'http://127.0.0.1/api/v1/factor-matrices' })).status).toBe(401);

    // Every answer validates against the OpenAPI document.
    const doc = (await call(openApiRoute.GET)).body as Schema;
    const paths = doc.paths as Record<string, Record<string, { responses: Record<string, { content?: Record<string, { schema: Schema }> }> }>>;
    expect(validate(before.body, paths['/api/v1/factor-matrices'].get.responses['200'].content!['application/json'].schema, doc)).toEqual([]);
    expect(validate(versions.body, paths['/api/v1/factor-matrices/{id}/versions'].get.responses['200'].content!['application/json'].schema, doc)).toEqual([]);
  });

  it('exports the published matrices as a long CSV through the one CSV writer (cautions as comments, formulas neutralised)', async () => {
    const a = await createMatrixDraft(analyst, body(fitA, { margin: { value: 0.01, rationale: 'Small add-on.' } }));
    await approve(a.id);
    await runScheduledTransitions(new Date());
    const token = (await createToken(admin, { name: 'Matrix export', scopes: ['assumptions:export'] })).token;
    const res = await call(exportRoute.GET, { headers: { authorization: `Bearer ${token}` } });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toContain('text/csv');
    const lines = res.text.replace(/^\uFEFF/, '').split('\r\n').filter(Boolean);
    const comments = lines.filter((l) => l.startsWith('# '));
    expect(comments.some((l) => l.includes('not to Pillar 1'))).toBe(true);
    const [header, ...rows] = lines.filter((l) => !l.startsWith('# '));
    expect(header.split(',')).toEqual(['matrix_id', 'version', 'status', 'segment_a', 'segment_b', 'r', 'lower', 'upper', 'level', 'moment', 'nearest', 'margin', 'value_used', 'pair_window_from', 'pair_window_to', 'effective_date', 'review_by', 'overdue', 'fit_run_id', 'dataset_sha256', 'engine_version', 'content_hash']);
    const mine = rows.filter((r) => r.startsWith(`${a.matrixId},`));
    expect(mine).toHaveLength(3);
    expect(mine[0]).toBe(`${a.matrixId},${a.version},published,A ${tag},B ${tag},0.62,0.27,0.87,0.95,${0.62 - 0.04},,0.01,${0.62 + 0.01},2008,2019,${a.effectiveDate},${a.reviewBy},false,${fitA},${a.datasetSha256},test-engine-1,${a.contentHash}`);
    // The segment named like a formula is written as text.
    expect(mine[1]).toContain(`,"'=HYPERLINK(""x"") ${tag}",`);
    const l = rows.filter((r) => r.startsWith(`${matrixId},`));
    // The scheduler ran at tomorrow's time above: version 2 is the published one, version 1 superseded and not exported.
    expect(l.map((r) => r.split(',').slice(1, 3).join(' '))).toEqual(['2 published', '2 published', '2 published']);
    const noComments = await call(exportRoute.GET, { url: 'http://127.0.0.1/api/v1/factor-matrices/export?comments=0', headers: { authorization: `Bearer ${token}` } });
    expect(noComments.text.replace(/^\uFEFF/, '').startsWith('matrix_id,')).toBe(true);
  });
  it('reminds the makers and the validator 30 and 7 days before review-by, once each, and escalates once past it (the segment versions\' rules)', async () => {
    const v = (await getMatrixVersionPage(validator, v2)).version;
    const reviewBy = new Date(`${v.reviewBy}T12:00:00Z`);
    const at = (days: number) => new Date(reviewBy.getTime() + days * 86_400_000);
    const mails = (kind: string) => getDb().select().from(mailOutbox).where(sql`${mailOutbox.dedupeKey} like ${`matrix:${kind}:${v2}:%`}`);
    const r30 = await publishDueMatrices(at(-20), getDb());
    expect(r30.reminders).toBeGreaterThanOrEqual(2);
    const thirty = await mails('review-by-30');
    expect(thirty.map((m) => m.toAddress).sort()).toEqual([analyst.email, validator.email].sort());
    expect(thirty[0].subject).toBe(`Review due in 20 days: the factor-correlation matrix of ${setL.join(', ')} v2`);
    expect(thirty[0].body).toContain(`/library/matrices/${v2}`);
    await publishDueMatrices(at(-19), getDb());
    expect((await mails('review-by-30')).length).toBe(2); // once
    await publishDueMatrices(at(-3), getDb());
    expect((await mails('review-by-7')).map((m) => m.toAddress).sort()).toEqual([analyst.email, validator.email].sort());
    // Past review-by: one escalation to the validators and administrators, whichever policy is in force then.
    const policy = await overduePolicyIn(getDb(), at(1));
    const late = await publishDueMatrices(at(1), getDb());
    const kind = policy === 'withdraw' ? 'review-withdrawn' : 'review-overdue';
    const escalated = await mails(kind);
    expect(escalated.map((m) => m.toAddress)).toEqual(expect.arrayContaining([validator.email, admin.email]));
    expect(escalated.map((m) => m.toAddress)).not.toContain(analyst.email);
    // (the test database keeps other runs' matrices: the counts cover them too)
    expect(late.escalations).toBeGreaterThanOrEqual(escalated.length);
    expect(late.expired.includes(v2)).toBe(policy === 'withdraw');
    await publishDueMatrices(at(2), getDb());
    expect((await mails(kind)).length).toBe(escalated.length); // once
  });
});
