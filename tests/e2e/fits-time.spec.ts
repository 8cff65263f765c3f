import { expect, test } from '@playwright/test';
import { keepScreenshot, signIn } from './helpers';

// Needs the seeded demo data and a running worker (npm test starts both). The demo fit (the seed's,
// the first run) ran every model; the run started here adds the break test's bootstrap.

test("the review shows the models side by side and the stability across the window; the new-fit form asks for the break test's p-value", async ({ page }, testInfo) => {
  test.setTimeout(240_000);
  await signIn(page, 'analyst@fenmoor.example');
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Fits' }).click();
  await page.getByRole('link', { name: 'New fit' }).click();
  const datasetSelect = page.getByLabel('Dataset');
  const cohortOption = datasetSelect.locator('option', { hasText: 'annual cohorts' });
  await datasetSelect.selectOption((await cohortOption.first().getAttribute('value'))!);
  const boxes = page.getByRole('group', { name: 'Segments' }).getByRole('checkbox');
  const n = await boxes.count();
  for (let i = 1; i < n; i++) await boxes.nth(i).uncheck();
  const segmentName = ((await boxes.nth(0).locator('..').textContent()) ?? '').split(/\d{4}–/)[0].trim();

  // Both models by default, a 10-year rolling window; the break test's p-value on request.
  const models = page.getByRole('group', { name: 'Models' });
  await expect(models.getByLabel(/Independent years/)).toBeChecked();
  await expect(models.getByLabel(/A persistent factor \(AR\(1\)\)/)).toBeChecked();
  await expect(page.getByLabel('Rolling window (years)')).toHaveValue('10');
  await page.getByLabel('Rolling window (years)').fill('8');
  await page.getByLabel('p-value of the break test').check();
  await page.getByLabel('Break test replications').fill('20');
  await page.getByLabel('Break test seed').fill('5');
  await page.getByLabel('Parametric bootstrap of the likelihood estimate').uncheck();
  await keepScreenshot(page, testInfo, 'new-fit-models', { narrow: true });
  // A wrong window length is refused before anything is sent.
  await page.getByLabel('Rolling window (years)').fill('2');
  await page.getByRole('button', { name: 'Start the fit' }).click();
  // the refusal is said at the field, which is marked
  await expect(page.getByLabel('Rolling window (years)')).toHaveAttribute('aria-invalid', 'true');
  await expect(page.getByText('Give a whole number of years from 3 to 50 for the rolling window.')).toBeVisible();
  await page.getByLabel('Rolling window (years)').fill('8');
  await page.getByRole('button', { name: 'Start the fit' }).click();

  await page.waitForURL(/\/fits\/\d+$/);
  const fitId = Number(page.url().split('/').pop());
  await expect(page.getByTestId('segments-overview')).toBeVisible({ timeout: 180_000 });
  await expect(page.getByTestId('fit-provenance')).toContainText('models independent years and a persistent factor (AR(1)) · break test B 20, seed 5');
  await page.getByTestId('overview-row-0').getByRole('link', { name: segmentName, exact: true }).click();
  await expect(page).toHaveURL(new RegExp(`/fits/${fitId}/segments/`));

  const index = page.getByRole('navigation', { name: 'Sections of this review' });
  for (const title of ['Independent years and a persistent factor', 'Stability across the window']) {
    await expect(index.getByRole('link', { name: title })).toBeVisible();
    await expect(page.getByRole('heading', { level: 2, name: title })).toBeVisible();
  }
  const review = page.getByTestId('segment-review');
  // The two models side by side, the test of independent years, the profile of phi.
  const table = review.getByTestId('models-table');
  await expect(table.getByRole('row', { name: /^Independent years .* 0\.\d{4} .*0 \(assumed\) \[0\.\d{4}, 0\.\d{4}\]/ })).toBeVisible();
  await expect(table.getByRole('row', { name: /^Persistent factor, AR\(1\) .* 0\.\d{4} .*\[0\.\d{4}, 0\.\d{4}\]/ })).toBeVisible();
  await expect(review.getByTestId('lr-test-phi')).toContainText(/Likelihood-ratio test of independent years \(φ = 0\): statistic \d+\.\d\d, p-value/);
  await expect(review.getByTestId('phi-profile-chart')).toBeVisible();
  await expect(review.getByTestId('lr-test-phi0')).toContainText('Persistence of the factor');
  // Every estimator with its interval in the forest chart and the estimates table.
  await expect(review.getByTestId('estimates-table').getByRole('row', { name: /^Vasicek closed-form maximum likelihood .*chi-square|^Vasicek closed-form maximum likelihood .*none: / })).toBeVisible();
  await expect(review.getByTestId('estimates-table').getByRole('row', { name: /^Maximum likelihood with a persistent \(AR\(1\)\) factor 0\.\d{4} .*profile/ })).toBeVisible();
  // Stability: the break test in a sentence with its bootstrap p-value, the jackknife and rolling charts.
  await expect(review.getByTestId('break-test')).toContainText(/Break test: the largest likelihood-ratio statistic .* is \d+\.\d\d, with the second part starting in \d{4}\. Its bootstrap p-value is \d\.\d{3} \(20 panels simulated without a break\)/);
  await expect(review.getByTestId('jackknife-chart')).toBeVisible();
  await expect(review.getByTestId('jackknife-sentence')).toContainText(/^Leaving out \d{4} moves the likelihood estimate most: ρ becomes 0\.\d{4}/);
  await expect(review.getByTestId('rolling-chart')).toBeVisible();
  await expect(review.getByTestId('rolling-sentence')).toContainText('on every window of 8 years');
  await index.getByRole('link', { name: 'Independent years and a persistent factor' }).click();
  await keepScreenshot(page, testInfo, 'fit-segment-time', { narrow: true });

  // The API answers the same blocks under the CLI's names.
  const body = await (await page.request.get(`/api/fits/${fitId}`)).json();
  const seg = body.results.segments[0];
  expect(seg.models).toEqual(['independent', 'ar1']);
  expect(Object.keys(seg.estimates.ar1Mle)).toEqual(expect.arrayContaining(['rho', 'pd', 'phi', 'logLik', 'status', 'intervals', 'phiInterval', 'lrTestPhi0']));
  expect(seg.stability.breakTest).toMatchObject({ status: 'ok', replications: 20, seed: 5 });
  expect(seg.stability.rolling.window).toBe(8);
  expect(Object.keys(seg.timing.stages)).toEqual(expect.arrayContaining(['binomialMle', 'ar1Mle', 'diagnostics', 'stability.breakTest']));
});
