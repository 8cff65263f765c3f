import { expect, test } from '@playwright/test';
import { keepScreenshot, signIn } from './helpers';

/**
 * The pair explorer's Student t copula: its joint default probability beside the Gaussian one, and
 * no result while nu is invalid. Expected figures from tests/fixtures/copula/pair-t-fixtures.json
 * (SciPy 1.17, make_pair_t.py): at p1 = p2 = 1%, rho 0.3, nu 4 the t joint default is
 * 0.0019110276 (quad over V; multivariate_t.cdf 0.0019110313), the Gaussian one 0.00055632849, the
 * tail dependence 0.16175748, the default correlations 0.18293208 and 0.04609379.
 */
test('the pair explorer offers the t copula: nu 4, rho 0.3, two 1% obligors default together with 0.1911% against 0.05563% under the Gaussian copula', async ({ page }, testInfo) => {
  await signIn(page, 'viewer@fenmoor.example');
  await page.goto('/pairs');
  await expect(page.getByTestId('pair-joint')).toHaveText('0.7135%');
  await page.getByRole('radio', { name: /Student t/ }).check();
  await page.getByLabel('PD of obligor A (%)').fill('1');
  await page.getByLabel('PD of obligor B (%)').fill('1');
  await page.getByLabel('Asset correlation ρ').fill('0.3');
  const nu = page.getByLabel('Degrees of freedom ν (above 2)');
  await nu.fill('4');
  await expect(page.getByTestId('pair-t-joint')).toHaveText('0.1911%');
  await expect(page.getByTestId('pair-joint')).toHaveText('0.05563%');
  await expect(page.getByTestId('pair-t-tail')).toHaveText('0.1618');
  await expect(page.getByTestId('pair-tail')).toHaveText('0.0000');
  await expect(page.getByTestId('pair-t-default-correlation')).toHaveText('0.1829');
  await expect(page.getByTestId('pair-default-correlation')).toHaveText('0.0461');
  // 0.0019110276 / 0.00055632849 = 3.4351
  await expect(page.getByTestId('pair-t-ratio')).toHaveText('3.44 times');
  await expect(page.getByTestId('pair-density-t')).toBeVisible();
  await expect(page.getByTestId('pair-density')).toBeVisible();
  await keepScreenshot(page, testInfo, 'pairs-t', { narrow: true });

  // A decimal comma is refused as in the other fields; nu at or below 2 marks the field and shows no result.
  await nu.fill('4,5');
  await expect(page.getByTestId('pair-explorer')).toContainText('Write the decimal with a point (4.5), not a comma.');
  await nu.fill('1.5');
  await expect(nu).toHaveAttribute('aria-invalid', 'true');
  await expect(page.getByTestId('pair-explorer')).toContainText('The degrees of freedom ν must be above 2');
  await expect(page.getByTestId('pair-invalid')).toContainText('no result is shown until every field holds a usable number');
  await expect(page.getByTestId('pair-t-joint')).toHaveCount(0);
  await expect(page.getByTestId('pair-results')).toHaveCount(0);
  await expect(page.getByTestId('pair-densities')).toHaveCount(0);
  await keepScreenshot(page, testInfo, 'pairs-t-invalid', { narrow: true });

  // Back to the Gaussian copula: nu is not asked for and the Gaussian figures return.
  await page.getByRole('radio', { name: 'Gaussian', exact: true }).check();
  await expect(nu).toHaveCount(0);
  await expect(page.getByTestId('pair-joint')).toHaveText('0.05563%');
  await expect(page.getByTestId('pair-t-joint')).toHaveCount(0);
});
