/**
 * The operator's first look: sign in, see the demo fleet on the board, see a value change live while
 * the simulator publishes; an operator is refused the administration pages.
 */
import assert from 'node:assert/strict';
import { after, before, describe, it } from 'node:test';
import type { Browser, Page } from 'playwright-core';
import { ACCOUNTS, launchBrowser, shot, signIn, startStack, type Stack } from './harness';

describe('fleet board (operator)', () => {
  let stack: Stack;
  let browser: Browser;
  let page: Page;

  before(async () => {
    stack = await startStack({ simulatorArgs: ['--rate', '2', '--speed', '30', '--seed', '11'] });
    browser = await launchBrowser();
    page = await browser.newPage({ viewport: { width: 1366, height: 900 } });
  });

  after(async () => {
    await browser?.close();
    await stack?.stop();
  });

  it('signs in and lands on the fleet board with every demo engine', async () => {
    await signIn(page, stack, ACCOUNTS.operator);
    assert.match(new URL(page.url()).pathname, /^\/fleet/);
    await page.getByRole('heading', { name: 'Fleet board' }).waitFor();
    // The side navigation is a named landmark whose link to the current screen says so.
    const nav = page.getByRole('navigation', { name: 'Main navigation' });
    await nav.locator('a[aria-current="page"]', { hasText: 'Fleet board' }).waitFor();
    assert.equal(await nav.locator('a[aria-current="page"]').count(), 1, 'one current screen');
    assert.ok(await nav.getByRole('link', { name: 'Alarms', exact: true }).isVisible());
    const token = await stack.login(ACCOUNTS.operator);
    const engines = (await stack.api<{ name: string }[]>('GET', '/api/engines', token)).body;
    assert.ok(engines.length >= 8, `demo fleet has ${engines.length} engines`);
    for (const e of engines) await page.locator('jw-engine-tile', { hasText: e.name }).first().waitFor({ timeout: 15000 });
  });

  it('shows values with units and updates them live', async () => {
    const tiles = page.locator('jw-engine-tile');
    await page.waitForFunction(() => /°C|°F/.test(document.querySelector('jw-engine-tile')?.textContent ?? ''), null, { timeout: 20000 });
    const before = await tiles.allTextContents();
    assert.ok(
      before.some((t) => /kPa|psi|bar/.test(t)),
      'pressure shown with a unit',
    );
    // Wait for any tile to show other values (the "last 11:15 MST · 12 min ago" text alone does not count).
    // No named functions inside page functions: tsx's keepNames would wrap them in a __name() the page lacks.
    await page.waitForFunction(
      (initial) =>
        [...document.querySelectorAll('jw-engine-tile')].some(
          (el, i) => (el.textContent ?? '').replace(/last .* ago/, '') !== (initial[i] ?? '').replace(/last .* ago/, ''),
        ),
      before,
      { timeout: 30000, polling: 500 },
    );
    await shot(page, 'fleet-board');
  });

  it('refuses the administration pages to an operator', async () => {
    await page.goto(`${stack.baseUrl}/admin/users`);
    // The role guard shows a page that says so, at the address asked for; the admin screens never render.
    await page.getByRole('heading', { name: 'This page is for administrators' }).waitFor({ timeout: 15000 });
    assert.equal(new URL(page.url()).pathname, '/admin/users', 'the address stays, so a reload asks again');
    await shot(page, 'not-allowed-operator');
    assert.equal(await page.getByRole('heading', { name: 'Administration' }).count(), 0);
    assert.equal(await page.locator('jw-users-page').count(), 0);
    const token = await stack.login(ACCOUNTS.operator);
    assert.equal((await stack.api('GET', '/api/users', token)).status, 403);
    // The way home works.
    await page.getByRole('link', { name: 'To the fleet board' }).click();
    await page.getByRole('heading', { name: 'Fleet board' }).waitFor();
  });

  it('shows a not-found page with a way home for an unknown address', async () => {
    await page.goto(`${stack.baseUrl}/no-such-page/42`);
    await page.getByRole('heading', { name: 'There is no page at this address' }).waitFor({ timeout: 15000 });
    assert.equal(new URL(page.url()).pathname, '/no-such-page/42');
    assert.match((await page.locator('[data-test=not-found]').textContent()) ?? '', /\/no-such-page\/42/);
    await shot(page, 'not-found');
    await page.getByRole('link', { name: 'To the fleet board' }).click();
    await page.getByRole('heading', { name: 'Fleet board' }).waitFor();
  });
});
