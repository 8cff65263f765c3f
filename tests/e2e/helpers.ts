import { expect, type Page, type TestInfo } from '@playwright/test';

export const DEMO_PASSWORD = process.env.DEMO_PASSWORD ?? 'rhobook-demo';

/** Signs in through the real sign-in page, as a person would. */
export async function signIn(page: Page, email: string, password = DEMO_PASSWORD) {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByTestId('current-user')).toBeVisible();
}

/**
 * Keeps a full-page screenshot of the screen as it is (under test-results/, NAME-1440.png) and, with
 * `narrow`, at 390 px too (NAME-390.png), after checking that the page does not scroll sideways
 * there (tables may scroll inside their own marked box).
 */
export async function keepScreenshot(page: Page, testInfo: TestInfo, name: string, { narrow = false }: { narrow?: boolean } = {}) {
  await page.setViewportSize({ width: 1440, height: 900 });
  await page.screenshot({ path: testInfo.outputPath(`${name}-1440.png`), fullPage: true });
  if (!narrow) return;
  await page.setViewportSize({ width: 390, height: 844 });
  await expect
    .poll(() => page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth), {
      message: `${name} scrolls sideways at 390 px`,
    })
    .toBeLessThanOrEqual(0);
  await page.screenshot({ path: testInfo.outputPath(`${name}-390.png`), fullPage: true });
  await page.setViewportSize({ width: 1440, height: 900 });
}
