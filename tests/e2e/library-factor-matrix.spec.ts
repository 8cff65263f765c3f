import { expect, test } from '@playwright/test';
import { keepScreenshot, signIn } from './helpers';

// Needs the seeded demo data and a running worker (npm test starts both). A fit of three segments
// with their factor correlations (pairs), requested through the fits API as a person would; its
// matrix drafted as an assumption on the fit's page, approved by a second person, published by the
// scheduler and read from the consumer API and its CSV.
const SEGMENTS = ['SME term loans', 'Prime auto loans', 'Credit cards'];

test('a factor-correlation matrix: drafted from a fit with pairs, approved by a second person, published by the scheduler and served by the consumer API', async ({ browser }, testInfo) => {
  test.setTimeout(360_000);
  const analystCtx = await browser.newContext();
  const analyst = await analystCtx.newPage();
  await signIn(analyst, 'analyst@fenmoor.example');
  const datasets = (await (await analyst.request.get('/api/datasets')).json()).datasets as { id: number; kind: string; status: string; name: string }[];
  const cohort = datasets.find((d) => d.kind === 'cohort' && d.status === 'ready' && d.name === 'Fenmoor Cooperative Bank: annual cohorts by segment');
  expect(cohort, 'the demo data has its cohort dataset').toBeTruthy();
  const res = await analyst.request.post('/api/fits', { data: { datasetId: cohort!.id, segments: SEGMENTS, pairs: true } });
  expect(res.status(), await res.text()).toBe(202);
  const fitId = (await res.json()).id as number;
  await expect
    .poll(async () => (await (await analyst.request.get(`/api/fits/${fitId}`)).json()).status, { timeout: 240_000, intervals: [1000, 2000] })
    .toBe('succeeded');
  const pairs = (await (await analyst.request.get(`/api/fits/${fitId}`)).json()).results.pairs as { entries: { r: number | null }[] };
  expect(pairs.entries).toHaveLength(3);
  expect(pairs.entries.every((e) => e.r !== null)).toBe(true);

  // The analyst drafts the matrix on the fit's page; a negative margin is refused at its field.
  await analyst.goto(`/fits/${fitId}`);
  const matrix = analyst.getByTestId('pair-matrix');
  await matrix.getByText('Draft as an assumption').click();
  const form = matrix.getByRole('form', { name: 'Draft the matrix as an assumption' });
  await form.getByLabel('Margin added off the diagonal').fill('-0.05');
  await form.getByLabel('Rationale of the margin').fill('Fifteen or more annual cohorts per pair; the nearest matrix is not needed.');
  await form.getByLabel('Intended uses').fill('Economic capital: the correlation of the three segments’ systematic factors.');
  await form.getByLabel('Limitations').fill('Valid only with the fitted PDs and the Gaussian factor model; not for Pillar 1.');
  await form.getByRole('button', { name: 'Save draft' }).click();
  await expect(form.locator('#matrix-margin-error')).toContainText('The margin must be 0 or more', { timeout: 30_000 });
  await expect(form.getByLabel('Margin added off the diagonal')).toBeFocused();
  await keepScreenshot(analyst, testInfo, 'draft-factor-matrix');
  await form.getByLabel('Margin added off the diagonal').fill('0');
  await form.getByRole('button', { name: 'Save draft' }).click();
  await expect(analyst).toHaveURL(/\/library\/matrices\/\d+$/, { timeout: 60_000 });
  const versionUrl = analyst.url();
  await expect(analyst.getByTestId('matrix-value-heatmap')).toBeVisible();
  await expect(analyst.getByTestId('version-cautions')).toContainText('not to Pillar 1');
  await analyst.getByRole('button', { name: 'Submit for review', exact: true }).click();
  await expect(analyst.getByRole('heading', { level: 1 }).getByTestId('status-badge')).toHaveText('submitted', { timeout: 30_000 });

  // A second person, the validator, approves it; the scheduler publishes it on its effective date (today).
  const validatorCtx = await browser.newContext();
  const validator = await validatorCtx.newPage();
  await signIn(validator, 'validator@fenmoor.example');
  await validator.goto(versionUrl);
  await validator.getByRole('button', { name: 'Start review', exact: true }).click();
  await expect(validator.getByRole('heading', { level: 1 }).getByTestId('status-badge')).toHaveText('in review', { timeout: 30_000 });
  await validator.getByLabel(/^Comment/).fill('Each pair and its interval checked against the fit; the matrix is positive semi-definite.');
  await validator.getByRole('button', { name: 'Approve', exact: true }).click();
  const dialog = validator.getByRole('dialog', { name: /Approve the matrix of .* version \d+/ });
  await expect(dialog.getByTestId('decision-facts')).toContainText('Smallest eigenvalue');
  await dialog.getByRole('button', { name: 'Approve now' }).click();
  await expect(validator.getByRole('status').filter({ hasText: 'now approved' })).toBeVisible({ timeout: 30_000 });
  await expect
    .poll(
      async () => {
        await validator.reload();
        return validator.getByRole('heading', { level: 1 }).getByTestId('status-badge').textContent();
      },
      { timeout: 60_000, intervals: [2000] },
    )
    .toBe('published');
  await keepScreenshot(validator, testInfo, 'version-factor-matrix');
  await validator.goto('/library');
  await expect(validator.getByTestId('matrix-library')).toContainText(SEGMENTS.join(', '));

  // A downstream model reads it, in any order of the segments, and its CSV.
  const adminCtx = await browser.newContext();
  const admin = await adminCtx.newPage();
  await signIn(admin, 'admin@fenmoor.example');
  const created = await admin.request.post('/api/admin/tokens', { data: { name: `matrix reader ${Date.now()}`, scopes: ['assumptions:read', 'assumptions:export'] } });
  expect(created.status(), await created.text()).toBe(201);
  const headers = { authorization: `Bearer ${(await created.json()).token as string}` };
  const answer = await admin.request.get(`/api/v1/factor-matrices?segments=${encodeURIComponent([...SEGMENTS].reverse().join(','))}`, { headers });
  expect(answer.status()).toBe(200);
  const m = (await answer.json()).matrices[0];
  expect(m).toMatchObject({ status: 'published', lineage: { fitRunId: fitId } });
  expect([...m.segments].sort()).toEqual([...SEGMENTS].sort());
  expect(m.pairs).toHaveLength(3);
  const csv = await admin.request.get('/api/v1/factor-matrices/export', { headers });
  expect(csv.status()).toBe(200);
  expect(await csv.text()).toContain(`${m.matrixId},${m.version},published,${m.pairs[0].segmentA},${m.pairs[0].segmentB},${m.pairs[0].r},`);
  await Promise.all([analystCtx.close(), validatorCtx.close(), adminCtx.close()]);
});
