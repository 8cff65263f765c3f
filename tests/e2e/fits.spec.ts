import { expect, test } from '@playwright/test';
import { keepScreenshot, signIn } from './helpers';

// Needs the seeded demo data and a running worker (npm test starts both).

test('an analyst starts a fit with a bootstrap, follows its progress and reads the review', async ({ page }, testInfo) => {
  test.setTimeout(240_000);
  await signIn(page, 'analyst@fenmoor.example');
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Fits' }).click();
  await page.getByRole('link', { name: 'New fit' }).click();
  await expect(page.getByRole('heading', { name: 'New fit' })).toBeVisible();

  const datasetSelect = page.getByLabel('Dataset');
  const cohortOption = datasetSelect.locator('option', { hasText: 'annual cohorts' });
  await datasetSelect.selectOption((await cohortOption.first().getAttribute('value'))!);
  // One segment keeps the run short: untick the others.
  const boxes = page.getByRole('group', { name: 'Segments' }).getByRole('checkbox');
  const n = await boxes.count();
  expect(n).toBeGreaterThan(1);
  for (let i = 1; i < n; i++) await boxes.nth(i).uncheck();
  const segmentName = ((await boxes.nth(0).locator('..').textContent()) ?? '').split(/\d{4}–/)[0].trim();

  await expect(page.getByLabel('Parametric bootstrap of the likelihood estimate')).toBeChecked();
  await page.getByLabel('Bootstrap replications').fill('1000');
  await page.getByLabel('Bootstrap seed').fill('7');
  await page.getByRole('checkbox', { name: /^Small-sample simulation study/ }).check();
  await page.getByLabel('Simulated panels').fill('100');
  await page.getByRole('button', { name: 'Start the fit' }).click();

  await page.waitForURL(/\/fits\/\d+$/);
  const fitId = Number(page.url().split('/').pop());
  const bar = page.getByRole('progressbar', { name: 'Fit progress' });
  await expect(bar).toBeVisible();
  // Progress moves while the bootstrap runs, and survives a reload of the page.
  await expect(page.getByTestId('fit-progress-message')).toContainText(/Bootstrap and simulation study: \d+% of the replications|Bootstrap \d+ of 1000/, { timeout: 60_000 });
  const before = Number(await bar.getAttribute('aria-valuenow'));
  expect(before).toBeGreaterThan(0);
  await page.reload();
  const overview = page.getByTestId('segments-overview');
  await expect(bar.or(overview)).toBeVisible();

  // The fit page is an overview of its segments: estimate, interval, PD, window, links.
  await expect(overview).toBeVisible({ timeout: 180_000 });
  await expect(page.getByRole('navigation', { name: 'Breadcrumb' })).toContainText(`Fits/Fit #${fitId}`);
  const row = overview.getByTestId('overview-row-0');
  await expect(row).toContainText(segmentName);
  await expect(row).toContainText(/0\.\d{4}\s*Binomial-mixture maximum likelihood/);
  await expect(row).toContainText(/\[0\.\d{4}, 0\.\d{4}\]/);
  await expect(row).toContainText(/\d\.\d+%/);
  await expect(row.getByRole('link', { name: `Draft an assumption for ${segmentName} from this fit` })).toBeVisible();
  const periods = Number((await row.textContent())!.match(/\((\d+) periods\)/)![1]);
  expect(periods).toBeGreaterThan(5);
  await keepScreenshot(page, testInfo, 'fit-overview', { narrow: true });

  // Each segment has its own review page, its sections in a side index.
  await row.getByRole('link', { name: segmentName, exact: true }).click();
  await expect(page).toHaveURL(new RegExp(`/fits/${fitId}/segments/`));
  await expect(page.getByRole('heading', { level: 1, name: segmentName })).toBeVisible();
  await expect(page.getByRole('navigation', { name: 'Breadcrumb' })).toContainText(`Fits/Fit #${fitId}/${segmentName}`);
  const index = page.getByRole('navigation', { name: 'Sections of this review' });
  for (const title of ['Estimates and intervals', 'Default rates against the fitted model', 'Profile log-likelihood of ρ', 'Implied factor and probability integral transform', 'Small-sample simulation study', 'What the estimate means', 'Window comparison', 'The data, period by period']) {
    await expect(index.getByRole('link', { name: title })).toBeVisible();
    await expect(page.getByRole('heading', { level: 2, name: title })).toBeVisible();
  }
  await index.getByRole('link', { name: 'Window comparison' }).click();
  await expect(page).toHaveURL(/#review-windows$/);
  const review = page.getByTestId('segment-review');
  await expect(review.getByTestId('segment-summary')).toContainText(/Estimated asset correlation ρ = 0\.\d{4} by binomial-mixture maximum likelihood/);
  await expect(review.getByTestId('forest-chart')).toBeVisible();
  await expect(review.getByText('(chosen)')).toBeVisible();
  await expect(review.getByRole('img', { name: /fitted 50%, 95% and 99% bands/ }).locator('svg')).toBeVisible();
  await expect(review.getByTestId('exceedances')).toContainText(/Quantile exceedances: \d+ of \d+ periods lie above the fitted 95% quantile/);
  await expect(review.getByTestId('profile-chart')).toBeVisible();
  await expect(review.getByTestId('lr-test')).toContainText(/Likelihood-ratio test of ρ = 0: statistic \d+\.\d\d/);
  await expect(review.getByText(/^Dashed red line: the cut-off -?\d+\.\d\d, the maximum less χ²₁\(0\.95\)\/2/)).toBeVisible();
  await expect(review.getByTestId('factor-chart')).toBeVisible();
  // Charts explain themselves: axis labels, the legend of the outlier dots, the band top told from the 99% quantile.
  await expect(review.getByTestId('factor-chart').locator('text', { hasText: 'xₜ (standard deviations)' })).toHaveCount(1);
  await expect(review.getByTestId('factor-chart').locator('text', { hasText: 'PIT (0–1)' })).toHaveCount(1);
  await expect(review.getByTestId('bands-legend')).toContainText('above the fitted 99% quantile (an outlier)');
  await expect(review.getByTestId('band-top-sentence')).toContainText(/its top \(\d+\.\d+%\) is the 99\.5% quantile, above the 99% quantile \(\d+\.\d+%\)/);
  // PIT is spelt out before it is abbreviated.
  await expect(review.getByTestId('section-factor')).toContainText('The probability integral transform (PIT) of a year');
  await expect(review.getByTestId('autocorrelation')).toContainText(/Lag-1 autocorrelation of the implied factor: (-?\d\.\d\d, against ±\d\.\d\d|not computed)/);
  // The three intervals of the likelihood estimate: profile, Wald (with its standard error) and the bootstrap asked for.
  const intervals = review.getByTestId('intervals-table');
  await expect(intervals.getByRole('row', { name: /Profile likelihood \[0\.\d{4}, 0\.\d{4}\]/ })).toBeVisible();
  await expect(intervals.getByRole('row', { name: /Wald \[0\.\d{4}, 0\.\d{4}\] standard error of ρ 0\.\d{4}/ })).toBeVisible();
  await expect(intervals.getByRole('row', { name: /Parametric bootstrap \[0\.\d{4}, 0\.\d{4}\] bias [+−]0\.\d{4}, B = 1000, seed 7/ })).toBeVisible();
  await expect(review.getByTestId('audit-table').getByRole('row', { name: /^Binomial-mixture maximum likelihood 100 \/ 100 / })).toBeVisible();
  await expect(review.getByTestId('implications')).toContainText('99.9% quantile of the yearly default rate');
  await expect(review.getByTestId('implications')).toContainText('Supervisory correlation');
  await expect(review.getByTestId('windows-table')).toContainText('Whole window');
  await expect(review.getByTestId('windows-table')).toContainText('Without the worst period');
  // Every period of the window is a row of the data table (no inner scroll hides any).
  await expect(review.getByTestId('observed-table').locator('tbody tr')).toHaveCount(periods);
  await expect(page.getByTestId('fit-provenance')).toContainText('bootstrap B 1000, seed 7');

  // The pair explorer inside the review follows the correlation at once.
  await review.getByText('Explore two obligors at this estimate').click();
  const joint = review.getByTestId('pair-joint');
  const first = await joint.textContent();
  await review.getByLabel('Asset correlation ρ').fill('0.5');
  await expect(joint).not.toHaveText(first!);

  await keepScreenshot(page, testInfo, 'fit-segment-review', { narrow: true });

  // The API answers the same run.
  const api = await page.request.get(`/api/fits/${fitId}`);
  expect(api.status()).toBe(200);
  const body = await api.json();
  expect(body).toMatchObject({ id: fitId, status: 'succeeded', progress: 100, error: null });
  expect(body.request.bootstrap).toEqual({ replications: 1000, seed: 7 });
  expect(body.results.segments[0].estimates.binomialMle.intervals.bootstrap.replications).toBe(1000);
  expect(body.results.engine.version).toBe(body.engineVersion);
  expect(body.results.segments[0].estimates.binomialMle.intervals.wald.se).toBeGreaterThan(0);
});

test('the fits API refuses viewers (403) and unavailable datasets (404)', async ({ page }) => {
  await signIn(page, 'viewer@fenmoor.example');
  const asViewer = await page.request.post('/api/fits', { data: { datasetId: 1 } });
  expect(asViewer.status()).toBe(403);
  await page.context().clearCookies();
  await signIn(page, 'validator@fenmoor.example');
  const missing = await page.request.post('/api/fits', { data: { datasetId: 987654321 } });
  expect(missing.status()).toBe(404);
  expect((await missing.json()).message).toContain('987654321');
  const bad = await page.request.post('/api/fits', { data: { datasetId: 1, level: 2 } });
  expect(bad.status()).toBe(422);
  const refusal = await bad.json();
  expect(refusal.field).toBe('level');
  expect(refusal.message).toMatch(/interval level must be between 0.5 and 0.999/);
});

test('the pair explorer: two 5% obligors at 0.3 default together with about 0.71% against 0.25%', async ({ page }) => {
  await signIn(page, 'viewer@fenmoor.example');
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Pair explorer' }).click();
  await expect(page.getByTestId('pair-joint')).toHaveText('0.7135%');
  await expect(page.getByTestId('pair-independent')).toHaveText('0.2500%');
  await page.getByLabel('Move the correlation').fill('0.9');
  await expect(page.getByTestId('pair-joint')).toHaveText('3.187%');
  await page.getByLabel('PD of obligor A (%)').fill('0');
  await expect(page.getByLabel('PD of obligor A (%)')).toHaveAttribute('aria-invalid', 'true');
  await expect(page.getByTestId('pair-explorer')).toContainText('The PD of obligor A must lie between 0.0001% and 99.9%.');
  await expect(page.getByTestId('pair-joint')).toHaveCount(0);
});
