import { expect, test } from '@playwright/test';
import { keepScreenshot, signIn } from './helpers';

// A small cohort file with a unique segment name, so that the test can run against a database
// that already holds the demo data (and again, without tripping the duplicate-file check).
function cohortFile(tag: string): string {
  let csv = 'segment,period,obligors,defaults\n';
  for (let y = 2010; y <= 2021; y++) csv += `E2E segment ${tag},${y},${1000 + 10 * (y - 2010)},${5 + ((y * 7) % 11)}\n`;
  return csv;
}

const shots = process.env.E2E_SCREENSHOTS;

test('an analyst uploads a cohort file, sees the report of a broken one, and opens the dataset with its chart', async ({ page }, testInfo) => {
  const tag = Date.now().toString(36);
  await signIn(page, 'analyst@fenmoor.example');
  await page.getByRole('link', { name: 'Data', exact: true }).click();
  await expect(page.getByRole('heading', { name: 'Data', exact: true })).toBeVisible();
  await page.getByRole('link', { name: 'Upload a file' }).click();
  await expect(page.getByRole('heading', { name: 'Upload a file' })).toBeVisible();

  // A broken file: defaults above obligors on line 3, a negative count on line 4.
  await page.getByLabel('Cohort counts').check();
  await page.locator('#upload-file').setInputFiles({
    name: 'broken.csv',
    mimeType: 'text/csv',
    buffer: Buffer.from(`segment,period,obligors,defaults\nBroken ${tag},2015,100,3\nBroken ${tag},2016,50,51\nBroken ${tag},2017,-4,1\n`),
  });
  await page.getByRole('button', { name: 'Upload and validate' }).click();
  await expect(page.getByRole('alert').filter({ hasText: 'The file was not accepted: 2 errors' })).toBeVisible();
  const report = page.getByTestId('report-table');
  await expect(report.getByRole('row').filter({ hasText: 'defaults-exceed-obligors' })).toContainText('3');
  await expect(report.getByRole('row').filter({ hasText: 'negative-count' })).toContainText('4');
  const csvLink = page.getByRole('link', { name: 'Download the report (CSV)' });
  const csv = await page.request.get((await csvLink.getAttribute('href'))!);
  expect(csv.status()).toBe(200);
  expect(await csv.text()).toContain('defaults-exceed-obligors');
  if (shots) await page.screenshot({ path: `${shots}/upload-rejected.png`, fullPage: true });

  // A good file.
  await page.locator('#upload-file').setInputFiles({ name: `good-${tag}.csv`, mimeType: 'text/csv', buffer: Buffer.from(cohortFile(tag)) });
  await expect(page.getByTestId('chosen-file')).toContainText(`good-${tag}.csv`);
  await page.getByLabel('Name (default: the file name)').fill(`E2E cohorts ${tag}`);
  await page.getByRole('button', { name: 'Upload and validate' }).click();
  // An accepted file opens its dataset page, its data check report shown first.
  await expect(page).toHaveURL(/\/data\/\d+\?uploaded=1$/);
  await expect(page.getByTestId('upload-accepted')).toHaveText(/^Accepted: 12 cohort rows in 1 segment, with 0 warnings\. Its data check report is right below\.$/);
  await expect(page.getByRole('heading', { name: 'Data check report' })).toBeVisible();
  await expect(page.getByRole('navigation', { name: 'Breadcrumb' })).toContainText(`Data/E2E cohorts ${tag}`);

  await expect(page.getByRole('heading', { name: new RegExp(`E2E cohorts ${tag}`) })).toBeVisible();
  await expect(page.getByRole('heading', { name: `E2E segment ${tag}` })).toBeVisible();
  const chart = page.getByTestId('default-rate-chart');
  await expect(chart).toBeVisible();
  await expect(chart.locator('svg path').first()).toBeVisible();
  // The period table shows every year (no inner scroll), and its rows come as CSV.
  await expect(page.getByRole('table', { name: `Obligors and defaults by period, E2E segment ${tag}` }).getByRole('row')).toHaveCount(13);
  const segCsv = await page.request.get((await page.getByRole('link', { name: 'these rows as CSV' }).getAttribute('href'))!);
  expect((await segCsv.text()).split('\r\n').filter((l) => l.startsWith(`E2E segment ${tag},`))).toHaveLength(12);
  await keepScreenshot(page, testInfo, 'dataset-after-upload', { narrow: true });

  // From the dataset to a fit without a dead end.
  await page.getByTestId('fit-this-dataset').click();
  await expect(page).toHaveURL(/\/fits\/new\?datasetId=\d+$/);
  await expect(page.getByLabel('Dataset')).toHaveValue(page.url().split('=').pop()!);
  await expect(page.getByRole('group', { name: 'Segments' })).toContainText(`E2E segment ${tag}`);
  await page.goBack();

  // The list shows it, and filtering finds it.
  await page.getByRole('navigation', { name: 'Breadcrumb' }).getByRole('link', { name: 'Data' }).click();
  await page.getByLabel('Find (name, file, hash, uploader)').fill(tag);
  await expect(page.getByTestId('datasets-table').getByRole('link', { name: `E2E cohorts ${tag}` })).toBeVisible();
  if (shots) await page.screenshot({ path: `${shots}/data.png`, fullPage: true });
});

test('a viewer reads datasets but is refused the upload page and the upload API', async ({ page }) => {
  await signIn(page, 'viewer@fenmoor.example');
  await page.getByRole('link', { name: 'Data', exact: true }).click();
  await expect(page.getByRole('link', { name: 'Upload a file' })).toHaveCount(0);
  const res = await page.goto('/data/upload');
  expect(res?.status()).toBe(403);
  const api = await page.request.post('/api/datasets', { multipart: { kind: 'cohort', file: { name: 'x.csv', mimeType: 'text/csv', buffer: Buffer.from('segment,period,obligors,defaults\nA,2015,10,1\n') } } });
  expect(api.status()).toBe(403);
  expect((await api.json()).code).toBe('forbidden:datasets:upload');
});
