import { expect, test, type APIRequestContext, type Page } from '@playwright/test';
import { keepScreenshot, signIn } from './helpers';

/**
 * The maker-checker loop in chromium: an analyst drafts and submits, a validator requests changes,
 * the analyst fixes and resubmits, the validator approves, the scheduler publishes, and a viewer sees the
 * published value in the library. The fit it drafts from is requested through the fits API and
 * computed by the worker, as a person would.
 */

async function finishedFit(request: APIRequestContext): Promise<{ fitId: number; segment: string }> {
  const datasets = (await (await request.get('/api/datasets')).json()).datasets as { id: number; kind: string; status: string; name: string }[];
  // The demo lender's cohort file (other specs upload cohort files of their own).
  const cohort = datasets.find((d) => d.kind === 'cohort' && d.status === 'ready' && d.name.startsWith('Fenmoor'));
  expect(cohort, 'the demo data has a ready cohort dataset').toBeTruthy();
  // A segment with no version on its way (an earlier interrupted run may have left one open).
  const library = (await (await request.get('/api/assumptions')).json()).library as { segment: string; pending: unknown }[];
  const busy = new Set(library.filter((e) => e.pending).map((e) => e.segment));
  const segment = ['SME term loans', 'Prime auto loans', 'Unsecured personal loans', 'Credit cards', 'Owner-occupied mortgages'].find((s) => !busy.has(s))!;
  const res = await request.post('/api/fits', { data: { datasetId: cohort!.id, segments: [segment] } });
  expect(res.status(), await res.text()).toBe(202);
  const { id } = await res.json();
  await expect
    .poll(async () => (await (await request.get(`/api/fits/${id}`)).json()).status, { timeout: 60_000, intervals: [500, 1000] })
    .toBe('succeeded');
  return { fitId: id, segment };
}

async function act(page: Page, button: string, expectState: string) {
  await page.getByRole('button', { name: button, exact: true }).click();
  await expect(page.getByRole('status').filter({ hasText: `now ${expectState}` })).toBeVisible({ timeout: 30_000 });
  await expect(page.getByRole('heading', { level: 1 }).getByTestId('status-badge')).toHaveText(expectState);
}

test('draft, request changes, fix, approve; the scheduler publishes; a viewer sees the published value', async ({ browser }, testInfo) => {
  const analystCtx = await browser.newContext();
  const analyst = await analystCtx.newPage();
  await signIn(analyst, 'analyst@fenmoor.example');
  const { fitId, segment } = await finishedFit(analyst.request);

  // The analyst drafts from the fit.
  await analyst.goto(`/library/new?fitId=${fitId}&segment=${encodeURIComponent(segment)}`);
  const form = analyst.getByRole('form', { name: 'Draft an assumption' });
  await expect(form.getByLabel('Fit and segment')).toHaveValue(`${fitId}|${segment}`);
  await form.getByLabel('Margin: Data and method deficiencies').fill('0.01');
  await form.getByLabel('Rationale: Data and method deficiencies').fill('Fifteen annual cohorts only.');
  await form.getByLabel('Rationale: Changes in lending or recovery practice').fill('No change in underwriting over the window.');
  await form.getByLabel('Rationale: General estimation error').fill('Placeholder.');
  await form.getByLabel('Intended uses').fill('Economic capital and stress testing.');
  await form.getByLabel('Limitations').fill('Valid only with the fitted PD and the 90-days-past-due default definition.');
  await form.getByRole('button', { name: 'Save draft' }).click();
  await expect(analyst).toHaveURL(/\/library\/versions\/\d+$/, { timeout: 60_000 });
  const versionUrl = analyst.url();
  await act(analyst, 'Submit for review', 'submitted');

  // The validator finds it in the queue and requests changes.
  const validatorCtx = await browser.newContext();
  const validator = await validatorCtx.newPage();
  await signIn(validator, 'validator@fenmoor.example');
  await validator.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Queue', exact: true }).click();
  await validator.getByRole('table', { name: 'Queue' }).getByRole('link', { name: segment }).first().click();
  await expect(validator).toHaveURL(versionUrl, { timeout: 60_000 });
  // The version page carries the frozen review of its segment: the validator need not leave it.
  const evidence = validator.getByTestId('version-evidence');
  await expect(evidence.getByRole('heading', { level: 2, name: `Evidence: the review of ${segment} from fit #${fitId}` })).toBeVisible();
  await expect(evidence.getByTestId('forest-chart')).toBeVisible();
  await expect(evidence.getByTestId('profile-chart')).toBeVisible();
  await expect(evidence.getByRole('navigation', { name: 'Sections of this review' }).getByRole('link', { name: 'Small-sample simulation study' })).toBeVisible();
  await keepScreenshot(validator, testInfo, 'version-with-evidence');
  await act(validator, 'Start review', 'in review');
  await validator.getByRole('button', { name: 'Request changes', exact: true }).click();
  // The refusal is said at the comment field, which is marked and takes the focus.
  const commentField = validator.getByLabel(/^Comment/);
  await expect(commentField).toHaveAttribute('aria-invalid', 'true');
  await expect(commentField).toBeFocused();
  await expect(validator.locator('#transition-comment-error')).toHaveText('Say why when you request changes: a comment is required.');
  await validator.getByLabel(/^Comment/).fill('Justify the general estimation error margin: the estimate is biased low at this T.');
  await act(validator, 'Request changes', 'draft');

  // The analyst sees the request in the queue, fixes the margin and resubmits.
  await analyst.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Queue', exact: true }).click();
  await expect(analyst.getByRole('table', { name: 'Queue' })).toContainText('Justify the general estimation error margin');
  await analyst.goto(versionUrl);
  await analyst.getByRole('link', { name: /^Edit/ }).click();
  const edit = analyst.getByRole('form', { name: 'Edit the draft' });
  await edit.getByLabel('Margin: General estimation error').fill('0.03');
  await edit.getByLabel('Rationale: General estimation error').fill('Downward bias of the ML estimate at T = 15, about 0.02 to 0.03.');
  await edit.getByLabel('Final value (empty: estimate plus margins)').fill('');
  await edit.getByRole('button', { name: 'Save changes' }).click();
  await expect(analyst).toHaveURL(versionUrl, { timeout: 60_000 });
  const published = (await analyst.getByTestId('final-value').textContent())!.trim();
  await act(analyst, 'Submit for review', 'submitted');

  // The validator approves with a conclusion, after a confirmation that shows what is approved;
  // the scheduler publishes it (effective today): nobody is offered a Publish button.
  await validator.goto(versionUrl);
  await act(validator, 'Start review', 'in review');
  await expect(validator.getByTestId('publication-note')).toContainText('publishes on');
  await validator.getByLabel(/^Comment/).fill('Margins justified against the profile interval; approved for economic capital.');
  await validator.getByRole('button', { name: 'Approve', exact: true }).click();
  const dialog = validator.getByRole('dialog', { name: new RegExp(`Approve ${segment} version`) });
  await expect(dialog.getByTestId('decision-facts')).toContainText(published);
  await expect(dialog.getByTestId('decision-facts')).toContainText('Effective date');
  await expect(dialog).toContainText('no tail dependence');
  await dialog.getByRole('button', { name: 'Approve now' }).click();
  await expect(validator.getByRole('status').filter({ hasText: 'now approved' })).toBeVisible({ timeout: 30_000 });
  await expect(validator.getByRole('button', { name: 'Publish', exact: true })).toHaveCount(0);
  await expect
    .poll(
      async () => {
        await validator.reload();
        return validator.getByRole('heading', { level: 1 }).getByTestId('status-badge').textContent();
      },
      { timeout: 45_000, intervals: [2000] },
    )
    .toBe('published');
  await expect(validator.getByTestId('publication-note')).toContainText('Published on');
  await expect(validator.getByRole('table', { name: 'Audit trail' })).toContainText('request-changes');

  // A viewer reads the published value in the library.
  const viewerCtx = await browser.newContext();
  const viewer = await viewerCtx.newPage();
  await signIn(viewer, 'viewer@fenmoor.example');
  await viewer.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Library', exact: true }).click();
  const row = viewer.getByTestId(`library-row-${segment}`);
  await expect(row.getByTestId('library-value')).toHaveText(published);
  expect(published).toMatch(/^0\.\d{4}$/);
  await expect(row).toContainText('published');
  await row.getByRole('link', { name: segment }).click();
  await expect(viewer.getByTestId('final-value')).toHaveText(published);
  await expect(viewer.getByRole('region', { name: 'Cautions', exact: true })).toContainText('no tail dependence');

  for (const c of [analystCtx, validatorCtx, viewerCtx]) await c.close();
});
