import { readFile } from 'node:fs/promises';
import { expect, test, type Page } from '@playwright/test';
import { pdfText } from '../support/pdf-text';
import { keepScreenshot, signIn } from './helpers';

/**
 * Governance in chromium on the demo organisation: the review packs (both printable pages, with
 * screenshots of their print view, and both PDFs downloaded and read back with pdf.js), the
 * evidence flag with its backtest, the findings, the consuming model with its webhook deliveries,
 * and the Method page the reports link to.
 */

async function download(page: Page, linkName: string): Promise<Buffer> {
  const [dl] = await Promise.all([page.waitForEvent('download', { timeout: 60_000 }), page.getByRole('link', { name: linkName, exact: true }).click()]);
  return readFile((await dl.path())!);
}

test('the review packs: printable pages and PDFs with the data, the decisions, the findings and the engine version', async ({ page }, testInfo) => {
  test.setTimeout(180_000);
  await signIn(page, 'validator@fenmoor.example');

  // The Overview shows the findings and the values whose evidence has aged.
  await expect(page.getByTestId('findings-summary')).toContainText('unresolved');
  await expect(page.getByTestId('aged-evidence')).toContainText('SME term loans v1');

  // The SME value: flagged (its dataset was restated with 2025) with the backtest beside the flag.
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Library', exact: true }).click();
  await page.getByTestId('library-row-SME term loans').getByRole('link', { name: 'SME term loans' }).click();
  await expect(page.getByTestId('version-cautions')).toContainText('has been superseded by dataset');
  await expect(page.getByTestId('backtest-result')).toContainText('2025:');
  const versionUrl = page.url();

  // Its report as a printable page; the print view leaves out the application's frame.
  await page.getByTestId('report-links').getByRole('link', { name: 'Report', exact: true }).click();
  await expect(page.getByRole('article', { name: 'Assumption report' })).toContainText('SME term loans, version 1');
  await expect(page.getByRole('article', { name: 'Assumption report' })).toContainText('Decision history');
  await expect(page.getByRole('link', { name: 'The methodology' })).toHaveAttribute('href', '/method');
  await page.emulateMedia({ media: 'print' });
  await expect(page.getByRole('navigation', { name: 'Main' })).toBeHidden();
  await keepScreenshot(page, testInfo, 'assumption-report-print');
  await page.emulateMedia({ media: 'screen' });

  // The PDF, read back with pdf.js.
  const assumptionPdf = await pdfText(await download(page, 'Download PDF'));
  for (const s of [
    'ASSUMPTION REPORT',
    'SME term loans, version 1',
    'Engine version',
    'Seeds',
    'Margins of conservatism',
    'Decision history',
    'approve',
    'Validation findings on this version, its fit and its dataset',
    'Evidence and monitoring',
    'Backtest on the new years',
    'Models that use this assumption',
    'Economic capital model',
    'Definition of default',
    '90 days past due or unlikely to pay',
    'no tail dependence',
    'Default rate by year, with the fitted bands',
    'Profile likelihood of rho',
  ]) {
    expect(assumptionPdf.text, s).toContain(s);
  }
  expect(assumptionPdf.pages.every((p) => /method: http:\/\/127\.0\.0\.1:\d+\/method · page \d+ of \d+/.test(p))).toBe(true);

  // The fit report of the fit the value was drawn from.
  await page.goto(versionUrl);
  const fitHref = await page.getByRole('link', { name: /^fit \d+$/ }).first().getAttribute('href');
  await page.goto(`${fitHref}/report`);
  await expect(page.getByRole('article', { name: 'Fit report' })).toContainText('Estimates and intervals');
  await page.emulateMedia({ media: 'print' });
  await keepScreenshot(page, testInfo, 'fit-report-print');
  await page.emulateMedia({ media: 'screen' });
  const fitPdf = await pdfText(await download(page, 'Download PDF'));
  for (const s of ['FIT REPORT', 'Segment SME term loans', 'Segment Prime auto loans', 'Every estimator at the 95% level', 'Binomial', 'Diagnostics', 'Likelihood-ratio test of rho = 0', 'Cautions', 'Dataset SHA-256']) {
    expect(fitPdf.text, s).toContain(s);
  }

  // The Method page the reports link to.
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Method', exact: true }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Rhobook methodology' })).toBeVisible();
  await expect(page.getByRole('heading', { name: /binomialMle/ })).toBeVisible();
});

test('findings and the consuming model: the demo finding, a high one that blocks, and the webhook deliveries', async ({ page }, testInfo) => {
  await signIn(page, 'validator@fenmoor.example');
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Findings', exact: true }).click();
  const unresolved = page.getByRole('table', { name: 'Unresolved findings' });
  await expect(unresolved).toContainText('No house-price downturn in the window');
  await expect(unresolved).toContainText('General estimation-error margin of 0 not justified');
  await unresolved.getByRole('link', { name: 'No house-price downturn in the window' }).click();
  await expect(page.getByRole('table', { name: 'History of the finding' })).toContainText('recorded');
  await keepScreenshot(page, testInfo, 'finding');

  // The version it is on lists it, and the model that uses the auto and SME values has its deliveries.
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Models', exact: true }).click();
  await page.getByRole('table', { name: 'Consuming models' }).getByRole('link', { name: 'Economic capital model' }).click();
  await expect(page.getByTestId('model-assumptions')).toContainText('SME term loans');
  const deliveries = page.getByRole('table', { name: 'Webhook deliveries' });
  await expect(deliveries).toContainText('assumption.published');
  // The worker sends them to the app's own receiver, which checks the signature.
  await expect
    .poll(
      async () => {
        await page.reload();
        return page.getByRole('table', { name: 'Webhook deliveries' }).textContent();
      },
      { timeout: 45_000, intervals: [2000] },
    )
    .toContain('signature valid');
  await keepScreenshot(page, testInfo, 'consuming-model');
});
