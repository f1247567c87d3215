/**
 * The operator's first look: sign in, see the demo fleet on the board, see a value change live while
 * the simulator publishes; search the board by name and fold sites away; an operator is refused the
 * administration pages.
 */
import assert from 'node:assert/strict';
import { after, before, describe, it } from 'node:test';
import type { Browser, Locator, Page } from 'playwright-core';
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

  const tileNames = async () => (await page.locator('jw-engine-tile .name').allTextContents()).map((t) => t.trim());
  const shown = () => page.getByTestId('shown-count');
  const siteGroup = (name: string): Locator => page.getByTestId('site-group').filter({ has: page.locator('.site-name', { hasText: name }) });
  const waitForTiles = (count: number) => page.waitForFunction((n) => document.querySelectorAll('jw-engine-tile').length === n, count, { timeout: 15000 });

  it('narrows the board by engine or site name, and the address keeps the search over a reload', async () => {
    const all = await page.locator('jw-engine-tile').count();
    const search = page.getByLabel('Search engines or sites');
    // a site's name finds its engines; case does not matter
    await search.fill('RIDGEBACK');
    await waitForTiles(3);
    assert.deepEqual((await tileNames()).sort(), ['Booster pump engine', 'Ridgeback gen-set 1', 'Ridgeback gen-set 2']);
    assert.equal((await shown().textContent())?.trim(), `3 of ${all} engines shown`);
    await page.waitForURL((url) => url.searchParams.get('q') === 'RIDGEBACK');

    // every word must be found, in the engine's name or its site's
    await search.fill('intake gen-set');
    await waitForTiles(2);
    assert.deepEqual((await tileNames()).sort(), ['Intake gen-set north', 'Intake gen-set south']);
    await page.waitForURL((url) => url.searchParams.get('q') === 'intake gen-set');

    // a site filter stands in the address beside the search
    await page.getByRole('option', { name: 'Saltmarsh Reservoir Intake' }).click();
    await page.waitForURL((url) => url.searchParams.has('site') && url.searchParams.get('q') === 'intake gen-set');

    await page.reload();
    await page.getByRole('heading', { name: 'Fleet board' }).waitFor();
    await waitForTiles(2);
    assert.equal(await page.getByLabel('Search engines or sites').inputValue(), 'intake gen-set');
    // the chip is drawn first and marked selected a render later: wait for the selected chip itself
    await page.getByRole('option', { name: 'Saltmarsh Reservoir Intake', selected: true }).waitFor();
    assert.deepEqual((await tileNames()).sort(), ['Intake gen-set north', 'Intake gen-set south']);

    // nothing found: the board says what to do, and one click brings every engine back
    await page.getByLabel('Search engines or sites').fill('no such engine');
    const empty = page.getByTestId('fleet-empty');
    await empty.waitFor();
    await shot(page, 'fleet-search-empty');
    assert.match(
      (await empty.textContent()) ?? '',
      /No engine or site name contains “no such engine” among the engines these filters show\. Check the spelling/,
    );
    await empty.getByRole('button', { name: 'show all engines' }).click();
    await waitForTiles(all);
    await page.waitForURL((url) => !url.searchParams.has('q') && !url.searchParams.has('site'));
    assert.equal(await page.getByLabel('Search engines or sites').inputValue(), '');
  });

  it('folds a site away: its tiles go, its header counts its abnormal engines, and it stays folded after a reload', async () => {
    const all = await page.locator('jw-engine-tile').count();
    const works = siteGroup('Hollowmere Treatment Works');
    const toggle = works.getByTestId('site-toggle');
    assert.equal(await toggle.getAttribute('aria-expanded'), 'true');
    const inSite = await works.locator('jw-engine-tile').count();
    // what the tiles themselves show as abnormal, just before folding
    const abnormalOnTiles = await works.evaluate(
      (group) =>
        [...group.querySelectorAll('jw-engine-tile')].filter((t) =>
          t.querySelector('.tile.has-alarms, .tile.stale, [data-ready=false], [data-testid=freeze-short]'),
        ).length,
    );
    await toggle.click();
    await waitForTiles(all - inSite);
    assert.equal(await toggle.getAttribute('aria-expanded'), 'false');
    assert.equal(await works.locator('jw-engine-tile').count(), 0);
    const state = works.getByTestId('site-abnormal');
    const said = ((await state.textContent()) ?? '').replace(/\s+/g, ' ').trim();
    if (abnormalOnTiles === 0) assert.equal(said, `All ${inSite} engines normal`);
    else assert.match(said, new RegExp(`^${abnormalOnTiles} of ${inSite} engines abnormal: .+`));
    assert.equal(await state.getAttribute('data-abnormal'), String(abnormalOnTiles));

    // the keyboard folds another site
    const ridge = siteGroup('Ridgeback Booster Station').getByTestId('site-toggle');
    await ridge.focus();
    await page.keyboard.press('Enter');
    await waitForTiles(all - inSite - 3);
    assert.equal(await ridge.getAttribute('aria-expanded'), 'false');
    await shot(page, 'fleet-folded-1366');
    await page.setViewportSize({ width: 820, height: 1180 });
    await shot(page, 'fleet-folded-820');
    await page.setViewportSize({ width: 1366, height: 900 });

    await page.reload();
    await page.getByRole('heading', { name: 'Fleet board' }).waitFor();
    await waitForTiles(all - inSite - 3);
    assert.equal(await siteGroup('Hollowmere Treatment Works').getByTestId('site-toggle').getAttribute('aria-expanded'), 'false');
    assert.equal(await siteGroup('Ridgeback Booster Station').getByTestId('site-toggle').getAttribute('aria-expanded'), 'false');

    await page.getByRole('button', { name: 'Expand all' }).click();
    await waitForTiles(all);
    await page.reload();
    await page.getByRole('heading', { name: 'Fleet board' }).waitFor();
    await waitForTiles(all);
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
