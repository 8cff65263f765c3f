import { expect, test } from '@playwright/test';
import { DEMO_PASSWORD, signIn } from './helpers';

test('an anonymous visitor is sent to the sign-in page', async ({ page }) => {
  await page.goto('/admin');
  await expect(page).toHaveURL(/\/sign-in\?callbackUrl=%2Fadmin/);
  await expect(page.getByRole('heading', { name: 'Sign in' })).toBeVisible();
});

test('each demo account signs in and sees its role', async ({ page }) => {
  for (const [email, label] of [
    ['analyst@fenmoor.example', 'Analyst'],
    ['validator@fenmoor.example', 'Validator'],
    ['viewer@fenmoor.example', 'Viewer'],
    ['admin@fenmoor.example', 'Administrator'],
  ] as const) {
    await signIn(page, email);
    await expect(page.getByTestId('current-user')).toContainText(label);
    await expect(page.getByRole('heading', { name: 'Overview' })).toBeVisible();
    await page.getByRole('button', { name: 'Sign out' }).click();
    await expect(page).toHaveURL(/\/sign-in/);
  }
});

test('a callback to another host stays on Rhobook, after signing in and for a visitor already signed in', async ({ page, baseURL }) => {
  const own = new URL(baseURL!).origin;
  // /%5C decodes to a backslash, which browsers read as a slash: //evil.example/phish.
  await page.goto('/sign-in?callbackUrl=/%5Cevil.example/phish');
  await page.getByLabel('E-mail').fill('analyst@fenmoor.example');
  await page.getByLabel('Password').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByTestId('current-user')).toBeVisible();
  expect(new URL(page.url()).origin).toBe(own);
  expect(new URL(page.url()).pathname).toBe('/');
  // Signed in already: the page redirects at once, to the home page of this application.
  await page.goto('/sign-in?callbackUrl=/%09/evil.example');
  await expect(page.getByRole('heading', { name: 'Overview' })).toBeVisible();
  expect(new URL(page.url()).origin).toBe(own);
  expect(new URL(page.url()).pathname).toBe('/');
  // An ordinary path is kept.
  await page.goto('/sign-in?callbackUrl=%2Fqueue');
  await expect(page).toHaveURL(`${own}/queue`);
});

test('a wrong password gets a clear refusal', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('analyst@fenmoor.example');
  await page.getByLabel('Password').fill('not the password');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByText('The e-mail or password is not right, or the account is not active.')).toBeVisible();
  await expect(page).toHaveURL(/\/sign-in/);
});

test('a viewer is refused the admin screen and the admin API', async ({ page }) => {
  await signIn(page, 'viewer@fenmoor.example');
  await expect(page.getByRole('link', { name: 'Admin', exact: true })).toHaveCount(0);
  const res = await page.goto('/admin');
  expect(res?.status()).toBe(403);
  await expect(page.getByRole('heading', { name: 'Not allowed' })).toBeVisible();
  const api = await page.request.get('/api/admin/users');
  expect(api.status()).toBe(403);
  const body = await api.json();
  expect(body.code).toBe('forbidden:users:manage');
});

test('an admin creates a user, who can then sign in; deactivation locks them out', async ({ page, browser }) => {
  await signIn(page, 'admin@fenmoor.example');
  await page.getByRole('link', { name: 'Admin', exact: true }).click();
  const form = page.getByRole('form', { name: 'Create a user' });
  await form.getByLabel('E-mail').fill('new.analyst@fenmoor.example');
  await form.getByLabel('Name').fill('Nell Ashby');
  await form.getByLabel('Role').selectOption('analyst');
  await form.getByLabel('Initial password (10 characters or more)').fill('a fine long password');
  await form.getByRole('button', { name: 'Create user' }).click();
  await expect(page.getByRole('status').filter({ hasText: 'Created new.analyst@fenmoor.example' })).toBeVisible();

  const other = await browser.newContext();
  const p2 = await other.newPage();
  await signIn(p2, 'new.analyst@fenmoor.example', 'a fine long password');

  const row = page.getByTestId('user-row-new.analyst@fenmoor.example');
  await row.getByRole('button', { name: 'Deactivate' }).click();
  await expect(row.getByText('deactivated', { exact: true })).toBeVisible();

  // The deactivated user's next request finds them signed out.
  await p2.goto('/');
  await expect(p2).toHaveURL(/\/sign-in/);
  await other.close();
});

test('health answers without signing in', async ({ request }) => {
  const res = await request.get('/api/health');
  expect(res.status()).toBe(200);
  const body = await res.json();
  expect(body.db).toBe('ok');
  expect(body.worker).toHaveProperty('lastHeartbeat');
});
