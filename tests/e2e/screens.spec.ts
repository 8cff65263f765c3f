import { expect, test, type APIRequestContext } from '@playwright/test';
import { keepScreenshot, signIn } from './helpers';

/**
 * Screens a reviewer can live in: field-level errors, one name and one format for each thing, the
 * cautions beside the value, the library's filters, the pair explorer that never shows numbers that
 * do not match its inputs, Compare that offers only runs that share a segment, the favicon and the
 * token's copy button. Each test keeps screenshots of the screens it changes (test-results/).
 */

async function demoCohortDataset(request: APIRequestContext): Promise<number> {
  const datasets = (await (await request.get('/api/datasets')).json()).datasets as { id: number; kind: string; status: string; name: string }[];
  return datasets.find((d) => d.kind === 'cohort' && d.status === 'ready' && d.name.startsWith('Fenmoor'))!.id;
}

async function fitOf(request: APIRequestContext, datasetId: number, segments: string[]): Promise<number> {
  const res = await request.post('/api/fits', { data: { datasetId, segments } });
  expect(res.status(), await res.text()).toBe(202);
  const { id } = await res.json();
  await expect.poll(async () => (await (await request.get(`/api/fits/${id}`)).json()).status, { timeout: 60_000 }).toBe('succeeded');
  return id;
}

test('the draft form shows every error beside its field, marked and focused, without internal paths', async ({ page }, testInfo) => {
  await signIn(page, 'analyst@fenmoor.example');
  await page.goto(`/library/new?fitId=1&segment=${encodeURIComponent('SME term loans')}`);
  const form = page.getByRole('form', { name: 'Draft an assumption' });
  // Readable names and one format: no code names, PD as a percentage, the cautions in the form.
  await expect(form.getByLabel('Estimator').locator('option:checked')).toHaveText('Binomial-mixture maximum likelihood');
  await expect(form.getByLabel('Estimator')).not.toContainText('vasicekMle');
  await expect(form.getByLabel('Interval').locator('option:checked')).toHaveText('profile likelihood');
  await expect(form.getByTestId('evidence-summary')).toContainText(/Estimate 0\.\d{4} by binomial-mixture maximum likelihood, PD \d+\.\d+%/);
  await expect(form.getByRole('region', { name: 'Cautions', exact: true })).toContainText('does not replace the supervisory correlation in Pillar 1 own-funds requirements');

  await form.getByLabel('Intended uses').fill('Economic capital.');
  await form.getByRole('button', { name: 'Save draft' }).click();
  const rationale = form.getByLabel('Rationale: Data and method deficiencies');
  await expect(rationale).toHaveAttribute('aria-invalid', 'true');
  await expect(rationale).toBeFocused();
  await expect(page.locator('#rationale-data-error')).toHaveText('Give a rationale for the margin for data and method deficiencies (say why, even when the margin is 0).');
  await expect(rationale).toHaveAttribute('aria-describedby', 'rationale-data-error');
  await expect(form.getByLabel('Limitations')).toHaveAttribute('aria-invalid', 'true');
  await expect(page.locator('#limitations-error')).toHaveText('State the limitations of the assumption.');
  await expect(form.getByLabel('Intended uses')).not.toHaveAttribute('aria-invalid', 'true');
  await expect(form.getByTestId('form-message')).toHaveText(/^\d+ fields need a change: see the marked fields\.$/);
  await expect(page.getByText(/margins\.data|field:/)).toHaveCount(0);
  await keepScreenshot(page, testInfo, 'draft-form-errors', { narrow: true });
});

test('the library: filters by segment, state and as-of date, readable names, one format, cautions beside the values', async ({ page }, testInfo) => {
  await signIn(page, 'viewer@fenmoor.example');
  await page.goto('/library');
  await expect(page.getByRole('region', { name: 'Cautions', exact: true })).toContainText('Capital K shown beside a correlation is an illustration');
  const sme = page.getByTestId('library-row-SME term loans');
  await expect(sme.getByTestId('library-value')).toHaveText(/^0\.\d{4}$/);
  await expect(sme).toContainText('Binomial-mixture maximum likelihood');
  await expect(sme).toContainText(/\d+\.\d+%/);
  await expect(sme).not.toContainText('binomialMle');
  await keepScreenshot(page, testInfo, 'library', { narrow: true });

  await page.getByLabel('State').selectOption('due-for-review');
  await page.getByRole('button', { name: 'Filter' }).click();
  await expect(page).toHaveURL(/state=due-for-review/);
  await expect(page.getByRole('table', { name: 'Published assumptions' }).locator('tbody tr')).toHaveCount(1);
  await expect(page.getByTestId('library-row-Prime auto loans')).toBeVisible();
  // the number of segments depends on what the other specs published before (the t-copula value's adds one)
  await expect(page.getByTestId('library-count')).toHaveText(/^1 of [2-9] segments: due for review within 30 days\.$/);

  // A date before anything was published: nothing in force, and why.
  await page.goto('/library?asOf=2001-01-01&segment=SME');
  await expect(page.getByTestId('library-row-SME term loans')).toContainText('Nothing was published by 2001-01-01.');
  // A filter that cannot be read is named at its field.
  await page.goto('/library?asOf=2024-02-30');
  await expect(page.getByLabel('In force on (as-of date; empty: today)')).toHaveAttribute('aria-invalid', 'true');
  await expect(page.locator('#filter-as-of-error')).toHaveText('The as-of date must be a calendar date written YYYY-MM-DD.');
  await keepScreenshot(page, testInfo, 'library-filter-error');

  // The version page: the value with its cautions beside it, readable names, one format.
  await page.goto('/library');
  await sme.getByRole('link', { name: 'SME term loans' }).click();
  await expect(page.getByRole('navigation', { name: 'Breadcrumb' })).toContainText(/Library\/SME term loans · version \d+/);
  await expect(page.getByTestId('final-value')).toHaveText(/^0\.\d{4}$/);
  await expect(page.getByRole('region', { name: 'Cautions', exact: true })).toContainText("Rhobook does not replace independent validation, the institution's model-risk policy");
  await expect(page.getByText(/by binomial-mixture maximum likelihood, 95% profile likelihood interval \[0\.\d{4}, 0\.\d{4}\]/)).toBeVisible();
  await expect(page.getByTestId('version-evidence').getByTestId('segment-summary')).toBeVisible();
  await keepScreenshot(page, testInfo, 'version', { narrow: true });
});

test('the pair explorer refuses a decimal comma and shows no result while a field is invalid; it starts from a fitted segment', async ({ page }, testInfo) => {
  await signIn(page, 'viewer@fenmoor.example');
  await page.goto('/pairs');
  await expect(page.getByTestId('pair-joint')).toHaveText('0.7135%');
  const pdA = page.getByLabel('PD of obligor A (%)');
  await pdA.fill('5,5');
  await expect(pdA).toHaveAttribute('aria-invalid', 'true');
  await expect(page.getByTestId('pair-explorer')).toContainText('Write the decimal with a point (5.5), not a comma.');
  await expect(page.getByTestId('pair-joint')).toHaveCount(0);
  await pdA.fill('5');
  const rho = page.getByLabel('Asset correlation ρ');
  await rho.fill('1.5');
  await expect(rho).toHaveAttribute('aria-invalid', 'true');
  await expect(page.getByTestId('pair-invalid')).toContainText('no result is shown until every field holds a usable number');
  await expect(page.getByTestId('pair-results')).toHaveCount(0);
  await keepScreenshot(page, testInfo, 'pairs-invalid', { narrow: true });
  await rho.fill('0.3');
  await expect(page.getByTestId('pair-joint')).toHaveText('0.7135%');

  await page.goto(`/pairs?fitId=1&segment=${encodeURIComponent('SME term loans')}`);
  await expect(page.getByTestId('pair-from-segment')).toContainText(/Started from fit #1, SME term loans: both obligors at the fitted PD \d+\.\d+%, asset correlation 0\.\d{4}/);
  await expect(page.getByLabel('Asset correlation ρ')).toHaveValue(/^0\.\d+$/);
  await keepScreenshot(page, testInfo, 'pairs-from-fit');
});

test('Compare offers only runs that share a segment, says why others are greyed out, and shows messages and the LGD', async ({ page }, testInfo) => {
  test.setTimeout(180_000);
  await signIn(page, 'analyst@fenmoor.example');
  const ds = await demoCohortDataset(page.request);
  const cards = await fitOf(page.request, ds, ['Credit cards']);
  const auto = await fitOf(page.request, ds, ['Prime auto loans']);
  await page.goto('/fits');
  await page.getByLabel(`Compare fit ${cards}`, { exact: true }).check();
  await expect(page.getByLabel(`Compare fit ${auto}`, { exact: true })).toBeDisabled();
  await expect(page.getByTestId(`why-${auto}`)).toHaveText('Cannot be compared now: No segment in common with the runs ticked.');
  await expect(page.getByLabel('Compare fit 1', { exact: true })).toBeEnabled();
  await page.getByLabel('Compare fit 1', { exact: true }).check();
  await expect(page.getByTestId('compare-hint')).toHaveText('2 ticked; segments in common: Credit cards.');
  await keepScreenshot(page, testInfo, 'fits-compare-choice', { narrow: true });
  await page.getByRole('button', { name: 'Compare ticked runs' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Compare fits: Credit cards' })).toBeVisible();
  const table = page.getByTestId('compare-table');
  await expect(table).toContainText('Binomial-mixture maximum likelihood');
  await expect(table.getByTestId('capital-convention').first()).toHaveText(/^LGD 45\.0%, (no maturity adjustment|maturity \d+ years)$/);
  await expect(table).not.toContainText('zero-default-periods');
  await expect(page.getByRole('region', { name: 'Cautions', exact: true })).toContainText('not regulatory capital');
  await keepScreenshot(page, testInfo, 'compare', { narrow: true });
});

test('the words of the screens: data check report, usual choice, Queue, small-sample simulation study', async ({ page }, testInfo) => {
  await signIn(page, 'analyst@fenmoor.example');
  await page.goto('/data/upload');
  await page.getByLabel('Loan-level tape').check();
  await expect(page.getByLabel('Loans that exit without default during a year').locator('option:checked')).toHaveText("stay in that year's cohort (usual choice)");
  // The upload form names a missing file at its field.
  await page.getByRole('button', { name: 'Upload and validate' }).click();
  await expect(page.locator('#upload-file-error')).toHaveText('Choose or drop a CSV file first.');
  await keepScreenshot(page, testInfo, 'upload-errors', { narrow: true });
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Queue', exact: true }).click();
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Queue');
  await page.goto(`/fits/1/segments/${encodeURIComponent('Credit cards')}`);
  await expect(page.getByRole('heading', { level: 2, name: 'Small-sample simulation study' })).toBeVisible();
  await expect(page.getByTestId('supervisory-row')).toContainText(/Supervisory correlation/);
  await expect(page.getByText(/estimator audit/i)).toHaveCount(0);
});

test('a favicon and no console error on sign-in; a new API token has a copy button', async ({ page, context }, testInfo) => {
  const errors: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error') errors.push(m.text());
  });
  await page.goto('/sign-in');
  const icon = await page.locator('link[rel="icon"]').first().getAttribute('href');
  expect(icon).toMatch(/^\/icon/);
  expect((await page.request.get(icon!)).status()).toBe(200);
  // Empty fields are named at the fields.
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.locator('#email-error')).toHaveText('Type the e-mail address of your account.');
  await expect(page.getByLabel('E-mail')).toBeFocused();
  await signIn(page, 'admin@fenmoor.example');
  expect(errors).toEqual([]);

  await context.grantPermissions(['clipboard-read', 'clipboard-write']);
  await page.goto('/admin/tokens');
  await page.getByLabel('Name (who uses it)').fill('');
  await page.getByRole('button', { name: 'Create token' }).click();
  await expect(page.getByLabel('Name (who uses it)')).toHaveAttribute('aria-invalid', 'true');
  await expect(page.locator('#token-name-error')).toHaveText('Give the token a name that says who uses it.');
  await page.getByLabel('Name (who uses it)').fill(`Copy check ${Date.now()}`);
  await page.getByRole('button', { name: 'Create token' }).click();
  const token = (await page.getByTestId('new-token').textContent())!.trim();
  expect(token).toMatch(/^rhb_/);
  await page.getByRole('button', { name: 'Copy the token' }).click();
  await expect(page.getByText('Copied to the clipboard.')).toBeVisible();
  expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(token);
  await keepScreenshot(page, testInfo, 'token-copied');
});
