import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';

/**
 * The demo seed (db/seed.ts -> lib/demo/seed: users, data, library) on a database of its own (the
 * suite's name with _seed_test, so the demo accounts and data do not meet the other tests' rows):
 * a real fit of the demo cohorts through the fit job, and a library made through the DAL whose
 * states, audit trail, queues and outbox are what the demo promises.
 */
type Mods = {
  db: typeof import('@/db/connection');
  schema: typeof import('@/db/schema');
  dal: typeof import('@/lib/dal/assumptions');
  orm: typeof import('drizzle-orm');
};
let m: Mods;
let dbName: string;

beforeAll(async () => {
  dbName = (process.env.DB_NAME ?? 'rhobook_test').replace(/_test$/, '_seed_test');
  vi.stubEnv('DB_NAME', dbName);
  vi.stubEnv('NODE_ENV', 'test');
  vi.resetModules();
  const { resetTestDatabase } = await import('../../support/reset-database');
  await resetTestDatabase({ seed: true });
  m = {
    db: await import('@/db/connection'),
    schema: await import('@/db/schema'),
    dal: await import('@/lib/dal/assumptions'),
    orm: await import('drizzle-orm'),
  };
}, 180_000);
afterAll(async () => {
  if (m) {
    await m.db.getDb().execute(m.orm.sql.raw(`DROP DATABASE IF EXISTS \`${dbName}\``));
    await m.db.closeDb();
  }
  vi.unstubAllEnvs();
});

async function person(email: string) {
  const { users } = m.schema;
  const [u] = await m.db.getDb().select({ id: users.id, email: users.email, name: users.name, role: users.role }).from(users).where(m.orm.eq(users.email, email));
  return u;
}

describe('the demo library', () => {
  it('comes from one succeeded fit run recorded by its fit jobs (one per segment), on the demo cohort dataset', async () => {
    const { fitRuns, fitRunSegments, jobs, datasets } = m.schema;
    // Two runs: the segments' (four jobs) and, second, the factor correlations of three of them (one job).
    const runs = await m.db.getDb().select().from(fitRuns).orderBy(fitRuns.id);
    expect(runs).toHaveLength(2);
    expect(runs.map((r) => r.status)).toEqual(['succeeded', 'succeeded']);
    const segs = await m.db.getDb().select().from(fitRunSegments).where(m.orm.eq(fitRunSegments.fitRunId, runs[0].id));
    expect(segs).toHaveLength(4);
    const done = await m.db.getDb().select().from(jobs).where(m.orm.inArray(jobs.id, segs.map((s) => s.jobId!)));
    expect(done.map((j) => j.status)).toEqual(['succeeded', 'succeeded', 'succeeded', 'succeeded']);
    const [ds] = await m.db.getDb().select().from(datasets).where(m.orm.eq(datasets.id, runs[0].datasetId));
    expect(ds.kind).toBe('cohort');
    expect(runs[0].datasetSha256).toBe(ds.sha256);
  });

  it('has the states the demo promises, each reached through the lifecycle', async () => {
    const viewer = await person('viewer@fenmoor.example');
    const library = await m.dal.listLibrary(viewer);
    const bySegment = Object.fromEntries(library.map((e) => [e.segment, e]));
    // The viewer sees the two published segments only.
    expect(Object.keys(bySegment).sort()).toEqual(['Prime auto loans', 'SME term loans']);
    expect(bySegment['SME term loans'].health).toBe('ok');
    // Their dataset has been restated with 2025: both are flagged, with the backtest on 2025 run.
    for (const seg of ['SME term loans', 'Prime auto loans']) {
      expect(bySegment[seg].evidence).toMatchObject({ superseded: true, newPeriods: ['2025'], flagged: true });
      expect(bySegment[seg].evidence!.backtest).toMatchObject({ status: 'done', periods: ['2025'] });
      expect(['consistent', 'watch', 'breach']).toContain(bySegment[seg].evidence!.backtest!.verdict);
    }
    expect(bySegment['Prime auto loans'].health).toBe('expiring');
    expect(bySegment['Prime auto loans'].daysToReview).toBeGreaterThanOrEqual(17);
    expect(bySegment['Prime auto loans'].daysToReview).toBeLessThanOrEqual(23);
    const sme = bySegment['SME term loans'].current!;
    // Written with the seed's clock through the lifecycle's rules: approved before its effective
    // date and published by the scheduler on it, four months ago.
    expect(sme.publishedAt!.slice(0, 10)).toBe(sme.effectiveDate);
    expect(sme.decidedAt!.slice(0, 10) <= sme.effectiveDate).toBe(true);
    expect(sme.effectiveDate < new Date().toISOString().slice(0, 10)).toBe(true);
    // The final value is the estimate plus the margins, rounded up to two decimals.
    expect(sme.finalValue).toBeGreaterThanOrEqual(sme.conservativeValue);
    expect(sme.finalValue - sme.conservativeValue).toBeLessThan(0.01);
    expect(Math.round(sme.finalValue * 100)).toBeCloseTo(sme.finalValue * 100, 9);
    expect(sme.validator?.email).toBe('validator@fenmoor.example');

    const { assumptionAudit } = m.schema;
    const trail = await m.db.getDb().select().from(assumptionAudit).where(m.orm.eq(assumptionAudit.versionId, sme.id)).orderBy(assumptionAudit.id);
    expect(trail.map((r) => r.action)).toEqual(['draft', 'submit', 'start-review', 'approve', 'publish']);
    expect(trail.map((r) => r.actorRole)).toEqual(['analyst', 'analyst', 'validator', 'validator', 'system']);
    // The history is dated as it happened, in order, all before the effective date but the publication.
    const times = trail.map((r) => r.at.getTime());
    expect([...times].sort((a, b) => a - b)).toEqual(times);
    expect(trail.slice(0, 4).every((r) => r.at.toISOString().slice(0, 10) < sme.effectiveDate)).toBe(true);
    expect(trail[4].at.toISOString().slice(0, 10)).toBe(sme.effectiveDate);
  });

  it('gives no version an effective date before its approval date, and the consumer API a stable history', async () => {
    const { assumptionVersions } = m.schema;
    const versions = await m.db.getDb().select().from(assumptionVersions);
    for (const v of versions.filter((x) => x.decidedAt)) expect(v.decidedAt!.toISOString().slice(0, 10) <= v.effectiveDate).toBe(true);
    const viewer = await person('viewer@fenmoor.example');
    // Nothing was published before its effective date either.
    expect(versions.filter((v) => v.publishedAt && v.effectiveDate > v.publishedAt.toISOString().slice(0, 10))).toEqual([]);
    // Before the SME version's effective date nothing was in force; on it, that version.
    const smeRow = (await m.dal.listLibrary(viewer)).find((e) => e.segment === 'SME term loans')!.current!;
    const day = (d: string, n: number) => new Date(Date.parse(`${d}T00:00:00Z`) + n * 86_400_000).toISOString().slice(0, 10);
    await expect(m.dal.versionInForce(viewer, 'SME term loans', day(smeRow.effectiveDate, -1))).rejects.toMatchObject({ code: 'not_found:assumption' });
    expect((await m.dal.versionInForce(viewer, 'SME term loans', smeRow.effectiveDate)).id).toBe(smeRow.id);
  });

  it('filters the library by segment, state and as-of date, and names a filter it cannot read', async () => {
    const analyst = await person('analyst@fenmoor.example');
    const names = async (filters: Record<string, string>) => (await m.dal.listLibrary(analyst, new Date(), filters)).map((e) => e.segment);
    expect(await names({})).toEqual(['Credit cards', 'Owner-occupied mortgages', 'Prime auto loans', 'SME term loans']);
    expect(await names({ segment: 'loans' })).toEqual(['Prime auto loans', 'SME term loans']);
    expect(await names({ state: 'due-for-review' })).toEqual(['Prime auto loans']);
    expect(await names({ state: 'in-force' })).toEqual(['Prime auto loans', 'SME term loans']);
    expect(await names({ state: 'in-progress' })).toEqual(['Credit cards', 'Owner-occupied mortgages']);
    expect(await names({ state: 'not-published', segment: 'cards' })).toEqual(['Credit cards']);
    // As of the day before the SME version's effective date, nothing of SME was in force; on it, that version.
    const sme = (await m.dal.listLibrary(analyst)).find((e) => e.segment === 'SME term loans')!.current!;
    const before = new Date(Date.parse(`${sme.effectiveDate}T00:00:00Z`) - 86_400_000).toISOString().slice(0, 10);
    const then = (await m.dal.listLibrary(analyst, new Date(), { asOf: before, segment: 'SME' }))[0];
    expect(then).toMatchObject({ segment: 'SME term loans', current: null, health: 'none', note: `Nothing was published by ${before}.` });
    const on = (await m.dal.listLibrary(analyst, new Date(), { asOf: sme.effectiveDate, segment: 'SME' }))[0];
    expect(on.current?.id).toBe(sme.id);
    expect(on.health).toBe('ok');
    await expect(m.dal.listLibrary(analyst, new Date(), { asOf: '2024-02-30' })).rejects.toMatchObject({
      code: 'invalid:library-filters',
      details: { field: 'asOf', fieldErrors: { asOf: 'The as-of date must be a calendar date written YYYY-MM-DD.' } },
    });
    await expect(m.dal.listLibrary(analyst, new Date(), { state: 'lost' })).rejects.toMatchObject({ details: { field: 'state' } });
  });

  it("leaves one version in the validator's queue and one sent back in the analyst's", async () => {
    const validatorQueue = await m.dal.listQueue(await person('validator@fenmoor.example'));
    expect(validatorQueue.map((q) => [q.segment, q.status])).toEqual([['Owner-occupied mortgages', 'submitted']]);
    const analystQueue = await m.dal.listQueue(await person('analyst@fenmoor.example'));
    expect(analystQueue.map((q) => [q.segment, q.status])).toEqual([['Credit cards', 'draft']]);
    expect(analystQueue[0].why).toMatch(/^Changes requested: A general estimation-error margin of 0/);
  });

  it('wrote the e-mails of those transitions to the outbox, to the right people', async () => {
    const { mailOutbox } = m.schema;
    const mail = await m.db.getDb().select({ kind: mailOutbox.kind, to: mailOutbox.toAddress, subject: mailOutbox.subject }).from(mailOutbox);
    const of = (kind: string) => mail.filter((x) => x.kind === kind);
    // Four segment versions and the matrix were submitted; the auto and SME values and the matrix published.
    expect(of('awaiting-review').map((x) => x.to)).toEqual(Array(5).fill('validator@fenmoor.example'));
    expect(of('changes-requested')).toEqual([expect.objectContaining({ to: 'analyst@fenmoor.example', subject: 'Changes requested: Credit cards v1' })]);
    expect(of('published').map((x) => x.to).sort()).toEqual([...Array(3).fill('analyst@fenmoor.example'), ...Array(3).fill('validator@fenmoor.example')]);
    expect(of('published').filter((x) => x.subject.includes('factor-correlation matrix of SME term loans, Prime auto loans, Owner-occupied mortgages v1'))).toHaveLength(2);
  });
});

describe('the demo factor-correlation matrix', () => {
  it('is published from the second fit, approved by the validator before its effective date, and served by the consumer API', async () => {
    const matrices = await import('@/lib/dal/factor-matrices');
    const viewer = await person('viewer@fenmoor.example');
    const segments = ['SME term loans', 'Prime auto loans', 'Owner-occupied mortgages'];
    const { matrices: inForce } = await matrices.matricesInForce(viewer, new Date().toISOString().slice(0, 10), segments);
    expect(inForce).toHaveLength(1);
    const mx = inForce[0];
    expect(mx).toMatchObject({ version: 1, status: 'published', margin: { value: 0.05 } });
    expect(mx.segments).toEqual(segments);
    expect(mx.pairs).toHaveLength(3);
    // The value is each pair's estimate plus the margin (common practice: a valid correlation matrix, unit diagonal).
    for (const p of mx.pairs) if (p.r !== null) expect(p.value).toBeCloseTo(Math.min(1, p.r + 0.05), 12);
    mx.value.forEach((row, i) => expect(row[i]).toBe(1));
    const { factorMatrixVersions } = m.schema;
    const [row] = await m.db.getDb().select({ id: factorMatrixVersions.id }).from(factorMatrixVersions).where(m.orm.eq(factorMatrixVersions.matrixId, mx.matrixId));
    const page = await matrices.getMatrixVersionPage(await person('validator@fenmoor.example'), row.id);
    expect(page.audit.map((a) => a.action)).toEqual(['draft', 'submit', 'start-review', 'approve', 'publish']);
    expect(page.version.decidedAt!.slice(0, 10) < page.version.effectiveDate).toBe(true);
    expect(page.version.publishedAt!.slice(0, 10)).toBe(page.version.effectiveDate);
  });
});

describe('the demo governance', () => {
  it('registers a consuming model of the auto and SME values with a webhook to the local receiver, and queued their publications for it', async () => {
    const { consumingModels, webhookDeliveries } = m.schema;
    const [model] = await m.db.getDb().select().from(consumingModels);
    expect(model.name).toBe('Economic capital model');
    expect(model.webhookUrl).toMatch(/\/api\/webhook-receiver$/);
    const deliveries = await m.db.getDb().select().from(webhookDeliveries).where(m.orm.eq(webhookDeliveries.modelId, model.id));
    expect(deliveries.filter((d) => d.event === 'assumption.published')).toHaveLength(2);
  });

  it('has a finding open on the version under review and a high one on the credit-card draft', async () => {
    const findings = await import('@/lib/dal/findings');
    const open = await findings.listFindings(await person('viewer@fenmoor.example'), { unresolved: true });
    // The viewer sees no drafts: none of their findings.
    expect(open).toEqual([]);
    const all = await findings.listFindings(await person('validator@fenmoor.example'), { unresolved: true });
    expect(all.map((f) => [f.target.label, f.severity])).toEqual([
      ['Credit cards v1', 'high'],
      ['Owner-occupied mortgages v1', 'medium'],
    ]);
  });

  it('carries the definition of default: the restated file states it per row and warns of the change in the early SME years', async () => {
    const { uploadReports } = m.schema;
    const reports = await m.db.getDb().select().from(uploadReports).where(m.orm.eq(uploadReports.fileName, 'fenmoor-cohorts-restated.csv'));
    const findings = reports[0].findings as { rule: string; message: string }[];
    expect(findings.find((f) => f.rule === 'default-definition-change')?.message).toContain('120 days past due (2003-2004); 90 days past due or unlikely to pay (2005-2025)');
    const viewer = await person('viewer@fenmoor.example');
    const sme = (await m.dal.listLibrary(viewer)).find((e) => e.segment === 'SME term loans')!.current!;
    expect(sme.defaultDefinitions?.map((d) => d.definition)).toEqual(['90 days past due or unlikely to pay']);
  });
});
