import { expect, test } from '@playwright/test';
import { keepScreenshot, signIn } from './helpers';

// Needs the seeded demo data and a running worker (npm test starts both). A fit of one demo segment
// that challenges the Gaussian copula with small B and R, then its segment review.

test('a fit can challenge the Gaussian copula; the segment review shows the laws side by side, the test, the power and the tail chart', async ({ page }, testInfo) => {
  test.setTimeout(300_000);
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
  await page.getByRole('group', { name: 'Models' }).getByLabel(/A persistent factor \(AR\(1\)\)/).uncheck();
  await page.getByLabel('Parametric bootstrap of the likelihood estimate').uncheck();

  await page.getByLabel(/Challenge the Gaussian copula/).check();
  // B and R default to 200 each
  await expect(page.getByLabel('Test replications (B)')).toHaveValue('200');
  await expect(page.getByLabel('Power replications (R)')).toHaveValue('200');
  // too few replications are refused at the field before anything is sent
  await page.getByLabel('Test replications (B)').fill('5');
  await page.getByRole('button', { name: 'Start the fit' }).click();
  await expect(page.getByLabel('Test replications (B)')).toHaveAttribute('aria-invalid', 'true');
  await expect(page.getByText('Give a whole number of test replications from 20 to 2,000.')).toBeVisible();
  await page.getByLabel('Test replications (B)').fill('20');
  await page.getByLabel('Power replications (R)').fill('20');
  await page.getByLabel('Copula seed').fill('11');
  await keepScreenshot(page, testInfo, 'new-fit-copula', { narrow: true });
  await page.getByRole('button', { name: 'Start the fit' }).click();

  await page.waitForURL(/\/fits\/\d+$/);
  const fitId = Number(page.url().split('/').pop());
  await expect(page.getByTestId('segments-overview')).toBeVisible({ timeout: 240_000 });
  await expect(page.getByTestId('fit-provenance')).toContainText('mixing laws t copula, beta, logit-normal: test B 20, power R 20, seed 11');
  await page.getByTestId('overview-row-0').getByRole('link', { name: segmentName, exact: true }).click();
  await expect(page).toHaveURL(new RegExp(`/fits/${fitId}/segments/`));

  const title = 'Mixing laws: the Gaussian copula challenged';
  const index = page.getByRole('navigation', { name: 'Sections of this review' });
  await expect(index.getByRole('link', { name: title })).toBeVisible();
  const section = page.getByTestId('section-mixing-laws');
  await expect(section.getByRole('heading', { level: 2, name: title })).toBeVisible();
  const table = section.getByTestId('mixing-laws-table');
  await expect(table.getByRole('row')).toHaveCount(5);
  await expect(table.getByRole('row', { name: /^Gaussian copula \(probit-normal\) ρ 0\.\d{4}, PD \d/ })).toBeVisible();
  await expect(table.getByRole('row', { name: /^Student-t copula ρ \d\.\d{4}, PD .*ν (\d+\.\d\d|∞ \(Gaussian limit\))/ })).toBeVisible();
  await expect(table.getByRole('row', { name: /^Beta mixing .*equivalent ρ \d\.\d{4} \[/ })).toBeVisible();
  await expect(table.getByRole('row', { name: /^Logit-normal mixing .*equivalent ρ \d\.\d{4} \[/ })).toBeVisible();
  await expect(section).toContainText('BIC uses the number of years');
  const test_ = section.getByTestId('mixing-law-test');
  await expect(test_).toContainText(/Its bootstrap p-value is \d\.\d{4} \(\d+ panels simulated under the fitted Gaussian model/);
  await expect(test_).toContainText('Asymptotic p-value (the 50:50 mixture of χ²₀ and χ²₁, Self & Liang 1987)');
  await expect(section.getByTestId('mixing-law-power')).toContainText(/^Power: of \d+ panels simulated from a t copula with ν = \d+\.\d\d/);
  await expect(section.getByTestId('mixing-laws-chart')).toBeVisible();
  await expect(section.getByTestId('mixing-laws-chart').locator('path[data-law]')).toHaveCount(4);
  await expect(section).not.toContainText('NaN');
  // Each law's probability integral transform, year by year, with its uniformity test in a sentence
  const pit = section.getByTestId('mixing-law-pit');
  await expect(pit).toContainText("The probability integral transform (PIT) of each year's default count under each law");
  await expect(pit.getByTestId('mixing-law-pit-table').getByRole('columnheader')).toHaveText(['Year', 'Defaults', 'Gaussian copula (probit-normal)', 'Student-t copula', 'Beta mixing', 'Logit-normal mixing']);
  await expect(pit.getByTestId('mixing-law-pit-table').getByRole('row').nth(1)).toHaveText(/^\d{4}[\d,]+ of [\d,]+(0\.\d{3}|1\.000)/);
  await expect(pit).toContainText(/Under the Gaussian copula: Kolmogorov-Smirnov D = 0\.\d{3}, p = [\d.e-]+ \(exact, on the randomised PIT drawn with seed 11\)/);
  await expect(pit).toContainText(/Under logit-normal mixing: Kolmogorov-Smirnov D = /);
  await index.getByRole('link', { name: title }).click();
  await keepScreenshot(page, testInfo, 'fit-segment-copula', { narrow: true });
  await pit.screenshot({ path: testInfo.outputPath('fit-segment-copula-pit-1440.png') });

  // The API answers the blocks under the engine's names.
  const body = await (await page.request.get(`/api/fits/${fitId}`)).json();
  const seg = body.results.segments[0];
  expect(Object.keys(seg.estimates.tCopula)).toEqual(expect.arrayContaining(['rho', 'pd', 'nu', 'logLik', 'status', 'intervals', 'nuInterval']));
  expect(seg.modelComparison.laws.map((l: { law: string }) => l.law)).toEqual(['gaussian', 't', 'beta', 'logitNormal']);
  expect(seg.modelComparison.lrTestGaussianVsT.replications + seg.modelComparison.lrTestGaussianVsT.failed).toBe(20);
  for (const l of seg.modelComparison.laws) expect(l.pit).toMatchObject({ method: 'mid', uniformity: { test: 'kolmogorov-smirnov', seed: 11 } });
});
