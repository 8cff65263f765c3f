import http from 'node:http';
import { expect, test, type Page } from '@playwright/test';
import { signIn } from './helpers';

/** Every Content-Security-Policy complaint of the page: console errors and securitypolicyviolation events. */
function watchCsp(page: Page): string[] {
  const problems: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error' && /Content Security Policy|Content-Security-Policy/i.test(m.text())) problems.push(m.text());
  });
  page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
  return problems;
}

async function violations(page: Page): Promise<string[]> {
  return page.evaluate(() => (window as unknown as { __csp?: string[] }).__csp ?? []);
}

test.beforeEach(async ({ page }) => {
  await page.addInitScript(() => {
    const w = window as unknown as { __csp: string[] };
    w.__csp = [];
    document.addEventListener('securitypolicyviolation', (e) => w.__csp.push(`${e.violatedDirective} ${e.blockedURI}`));
  });
});

test('the main pages run under their Content-Security-Policy without a single violation', async ({ page }) => {
  const problems = watchCsp(page);
  await page.goto('/sign-in');
  const res = await page.request.get('/sign-in');
  const csp = res.headers()['content-security-policy'];
  expect(csp).toMatch(/script-src 'self' 'nonce-[^']+' 'strict-dynamic'/);
  expect(csp).toContain("frame-ancestors 'none'");
  expect(res.headers()['permissions-policy']).toContain('geolocation=()');
  await signIn(page, 'analyst@fenmoor.example');
  const pages = ['/', '/data', '/data/upload', '/fits', '/fits/new', '/library', '/queue', '/pairs', '/account'];
  for (const path of pages) {
    await page.goto(path);
    await page.waitForLoadState('networkidle');
    expect(await violations(page), path).toEqual([]);
  }
  // A fit's review (charts) and a dataset's page, reached by their first links.
  await page.goto('/fits');
  await page.locator('a[href^="/fits/"]').filter({ hasNotText: /new|compare/i }).first().click();
  await page.waitForLoadState('networkidle');
  expect(await violations(page)).toEqual([]);
  await page.goto('/data');
  await page.locator('a[href^="/data/"]').filter({ hasNotText: /upload/i }).first().click();
  await page.waitForLoadState('networkidle');
  expect(await violations(page)).toEqual([]);
  // The client islands ran (hydration needs the nonce): the pair explorer computes on input.
  await page.goto('/pairs');
  await page.waitForLoadState('networkidle');
  expect(await violations(page)).toEqual([]);
  expect(problems).toEqual([]);
  // Each page has its own nonce.
  const a = (await page.request.get('/library')).headers()['content-security-policy'];
  const b = (await page.request.get('/library')).headers()['content-security-policy'];
  expect(a).not.toBe(b);
});

test('authenticated JSON is never stored: Cache-Control no-store', async ({ page }) => {
  await signIn(page, 'viewer@fenmoor.example');
  const res = await page.request.get('/api/assumptions');
  expect(res.status()).toBe(200);
  expect(res.headers()['cache-control']).toContain('no-store');
});

test('TRACE and made-up methods are answered 405 with the methods that are served', async ({ baseURL }) => {
  const url = new URL('/api/health', baseURL);
  // (A verb Node's parser does not know at all is refused by Node itself with 400.)
  for (const method of ['TRACE', 'PROPFIND', 'MKCOL', 'LOCK']) {
    const answer = await new Promise<{ status: number; allow: string | undefined; body: string }>((resolve, reject) => {
      const req = http.request({ host: url.hostname, port: url.port, path: url.pathname, method }, (res) => {
        let body = '';
        res.on('data', (c) => (body += c));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, allow: res.headers.allow, body }));
      });
      req.on('error', reject);
      req.end();
    });
    expect(answer.status, method).toBe(405);
    expect(answer.allow).toBe('GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS');
    expect(JSON.parse(answer.body).message).toBe(`The method ${method} is not served here; use one of GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS.`);
  }
});

test('signing out ends the session on the server: a copy of the cookie no longer works', async ({ page, browser }) => {
  await signIn(page, 'validator@fenmoor.example');
  const kept = await page.context().cookies();
  expect(kept.some((c) => c.name.includes('next-auth.session-token'))).toBe(true);
  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page).toHaveURL(/\/sign-in/);
  // Someone who copied the cookie before the sign-out.
  const other = await browser.newContext();
  await other.addCookies(kept);
  const api = await other.request.get('/api/assumptions');
  expect(api.status()).toBe(401);
  const p = await other.newPage();
  await p.goto('/library');
  await expect(p.getByRole('heading', { name: 'Sign in' })).toBeVisible();
  await other.close();
});
