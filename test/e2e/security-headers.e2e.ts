/**
 * The built app runs under the server's Content-Security-Policy (no inline script): sign-in renders,
 * the fleet board and an engine page with its chart load, and the browser reports no CSP violation.
 */
import assert from 'node:assert/strict';
import { after, before, describe, it } from 'node:test';
import type { Browser, Page } from 'playwright-core';
import { ACCOUNTS, launchBrowser, signIn, startStack, type Stack } from './harness';

describe('the app under the Content-Security-Policy', () => {
  let stack: Stack;
  let browser: Browser;
  let page: Page;
  const violations: string[] = [];

  before(async () => {
    stack = await startStack({ simulatorArgs: ['--rate', '1', '--speed', '30', '--seed', '5'] });
    browser = await launchBrowser();
    page = await browser.newPage({ viewport: { width: 1366, height: 900 } });
    page.on('console', (m) => {
      if (/Content.Security.Policy|Refused to/i.test(m.text())) violations.push(m.text());
    });
    page.on('pageerror', (e) => {
      if (/Content.Security.Policy|Refused to/i.test(e.message)) violations.push(e.message);
    });
  });

  after(async () => {
    await browser?.close();
    await stack?.stop();
  });

  it('index.html comes with the CSP and is not cached', async () => {
    const res = await fetch(`${stack.baseUrl}/sign-in`);
    assert.match(res.headers.get('content-security-policy') ?? '', /script-src 'self'(;|$)/);
    assert.equal(res.headers.get('cache-control'), 'no-cache');
    const html = await res.text();
    assert.doesNotMatch(html, /<script(?![^>]*\bsrc=)[^>]*>/, 'no inline script in index.html');
    assert.doesNotMatch(html, /\son[a-z]+=/i, 'no inline event handler in index.html');
  });

  it('signs in, shows the fleet board and an engine page with no CSP violation', async () => {
    await page.goto(`${stack.baseUrl}/sign-in`);
    await page.getByRole('button', { name: /sign in/i }).waitFor();
    await signIn(page, stack, ACCOUNTS.operator);
    await page.getByRole('heading', { name: 'Fleet board' }).waitFor();
    await page.locator('jw-engine-tile').first().click();
    await page.waitForURL(/\/engines\/\d+/);
    await page.locator('apx-chart, .apexcharts-canvas').first().waitFor({ timeout: 20000 });
    assert.deepEqual(violations, []);
  });
});
