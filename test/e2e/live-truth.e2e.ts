/**
 * The screen tells the truth when live data stops: with the server killed while pages are open, the
 * connection banner says since when, the live values turn stale (data-stale="true", "last hh:mm · n s ago")
 * on the engine page and the fleet board, and everything recovers by itself when the server returns on the
 * same ports and data. The trend range lives in the address: the back button and a reload keep it.
 */
import assert from 'node:assert/strict';
import { after, before, describe, it } from 'node:test';
import type { Browser, Page } from 'playwright-core';
import { ACCOUNTS, launchBrowser, shot, signIn, startStack, type Stack } from './harness';

const ENGINE_ID = 1;
/** Stale floor 30 s + one clock tick (5 s) + the time the socket needs to notice: generous, it is a wait, not a timing check. */
const STALE_WAIT_MS = 90_000;

describe('live truth (server stopped and back)', () => {
  let stack: Stack;
  let browser: Browser;
  let enginePage: Page;
  let fleetPage: Page;
  let errorPage: Page;
  let engineName: string;

  before(async () => {
    [stack, browser] = await Promise.all([startStack({ simulatorArgs: ['--rate', '1', '--speed', '30', '--seed', '9'] }), launchBrowser()]);
    const token = await stack.login(ACCOUNTS.operator);
    engineName = (await stack.api<{ name: string }>('GET', `/api/engines/${ENGINE_ID}`, token)).body.name;
    // Without the app's service worker (a first visit, or a browser that refuses workers): a list that cannot load
    // must say so. With the worker, the last list comes from its cache, marked stale (offline.e2e.ts covers the worker).
    const context = await browser.newContext({ viewport: { width: 1366, height: 900 }, serviceWorkers: 'block' });
    enginePage = await context.newPage();
    await signIn(enginePage, stack, ACCOUNTS.operator);
    fleetPage = await context.newPage(); // same context: same session
    errorPage = await context.newPage();
  });

  after(async () => {
    await browser?.close();
    await stack?.stop();
  });

  const tile = (page: Page) => page.locator('jw-engine-tile', { hasText: engineName }).first().locator('mat-card');

  it('shows current values without a stale mark while data flows', async () => {
    await enginePage.goto(`${stack.baseUrl}/engines/${ENGINE_ID}`);
    await enginePage.waitForFunction(
      () => /\d\s?°C/.test(document.querySelector('jw-live-values')?.textContent ?? '') && !document.querySelector('jw-live-values [data-stale]'),
      null,
      { timeout: 30000 },
    );
    await fleetPage.goto(`${stack.baseUrl}/fleet`);
    await tile(fleetPage).waitFor({ timeout: 20000 });
    await fleetPage.waitForFunction(
      (name) => {
        const t = [...document.querySelectorAll('jw-engine-tile')].find((el) => (el.textContent ?? '').includes(name));
        return !!t && /°C/.test(t.textContent ?? '') && !t.querySelector('[data-stale]');
      },
      engineName,
      { timeout: 30000 },
    );
    assert.equal(await enginePage.locator('[data-test=connection-banner]').count(), 0, 'no banner while live');
    // The engine's home below the trend loads when scrolled to: its alarms, due work and last coolant test, with links.
    // (scroll past it to the recent readings below; with a short trend it may already be in view and loaded)
    await enginePage.getByRole('heading', { name: /Recent readings/ }).scrollIntoViewIfNeeded();
    await enginePage.locator('[data-test=engine-coolant-test] a[href="/engines/1/coolant"]').waitFor({ timeout: 20000 });
    await enginePage.locator('[data-test=engine-alarms] a[href^="/alarms"]').first().waitFor();
    await enginePage.locator('[data-test=engine-due]').filter({ hasNotText: 'Loading…' }).waitFor({ timeout: 20000 });
    await shot(enginePage, 'live-truth-engine-home');
    // A third page has the fleet board's code loaded and sits on the alarm list.
    await errorPage.goto(`${stack.baseUrl}/fleet`);
    await errorPage.locator('jw-engine-tile').first().waitFor({ timeout: 20000 });
    await errorPage.locator('a[href="/alarms"]').first().click();
    await errorPage.getByRole('heading', { name: 'Alarms', level: 1 }).waitFor();
  });

  it('says "Live data lost since" and marks the values stale when the server stops', async () => {
    await stack.killServer();
    for (const page of [enginePage, fleetPage]) {
      await page.locator('[data-test=connection-banner]').waitFor({ timeout: 30000 });
      assert.match((await page.locator('[data-test=connection-banner]').textContent()) ?? '', /Live data lost since \d{2}:\d{2}:\d{2} \S+/);
    }
    // Values stop being "now" within the expected interval and say how old they are.
    await enginePage.locator('jw-live-values [data-stale="true"]').first().waitFor({ timeout: STALE_WAIT_MS });
    await enginePage.locator('[data-test=now-stale]').waitFor({ timeout: 10000 });
    const liveText = (await enginePage.locator('jw-live-values').textContent()) ?? '';
    assert.match(liveText, /Not current: last \d{2}:\d{2} \S+ · \d+ (s|min) ago/, 'the age in words');
    assert.doesNotMatch(liveText, /Within normal/, 'no stale value is judged as current');
    await shot(enginePage, 'live-truth-engine-stale');

    await fleetPage.waitForFunction(
      (name) => {
        const t = [...document.querySelectorAll('jw-engine-tile')].find((el) => (el.textContent ?? '').includes(name));
        return t?.querySelector('mat-card')?.getAttribute('data-stale') === 'true';
      },
      engineName,
      { timeout: STALE_WAIT_MS },
    );
    assert.match((await tile(fleetPage).textContent()) ?? '', /last \d{2}:\d{2} \S+ · \d+ (s|min) ago/);
    await shot(fleetPage, 'live-truth-fleet-stale');

    // Opening the fleet board now: its list cannot load, and it says so with a retry.
    await errorPage.locator('a[href="/fleet"]').first().click();
    await errorPage.locator('[data-test=load-error]').waitFor({ timeout: 30000 });
    assert.match((await errorPage.locator('[data-test=load-error]').textContent()) ?? '', /could not be loaded.*Retry/s);
    await shot(errorPage, 'live-truth-fleet-load-error');
  });

  it('recovers by itself when the server returns', async () => {
    await stack.restartServer();
    for (const page of [enginePage, fleetPage]) await page.locator('[data-test=connection-banner]').waitFor({ state: 'detached', timeout: 60000 });
    // The simulator reconnects to the broker and publishes again: fresh values lose their stale mark.
    // (values shown, none stale: an empty panel would also have no stale mark)
    await enginePage.waitForFunction(
      () =>
        /\d\s?°[CF]/.test(document.querySelector('jw-live-values')?.textContent ?? '') &&
        !document.querySelector('jw-live-values [data-stale]') &&
        !document.querySelector('[data-test=now-stale]'),
      null,
      { timeout: 60000 },
    );
    await fleetPage.waitForFunction(
      (name) => {
        const t = [...document.querySelectorAll('jw-engine-tile')].find((el) => (el.textContent ?? '').includes(name));
        return !!t && !t.querySelector('[data-stale]');
      },
      engineName,
      { timeout: 60000 },
    );
    assert.equal(await fleetPage.locator('[data-test=load-error]').count(), 0, 'no old error left on the board');
    // The error that no longer applies goes away by itself, and the board fills.
    await errorPage.locator('[data-test=load-error]').waitFor({ state: 'detached', timeout: 60000 });
    await errorPage.locator('jw-engine-tile').first().waitFor({ timeout: 30000 });
    await shot(enginePage, 'live-truth-engine-recovered');
    await shot(fleetPage, 'live-truth-fleet-recovered');
  });

  it('keeps the trend range in the address: back and reload return to it', async () => {
    const page = enginePage;
    const checked = () =>
      page
        .locator('jw-range-picker .mat-button-toggle-checked')
        .textContent()
        .then((t) => (t ?? '').trim());
    await page.locator('jw-range-picker mat-button-toggle', { hasText: 'Last 7 days' }).locator('button').click();
    await page.waitForURL((url) => url.searchParams.get('range') === '7d');
    await page.locator('jw-range-picker mat-button-toggle', { hasText: 'Last hour' }).locator('button').click();
    await page.waitForURL((url) => url.searchParams.get('range') === '1h');
    await page.locator('mat-chip-option', { hasText: 'Engine speed' }).click();
    await page.waitForURL((url) => (url.searchParams.get('channels') ?? '').includes('engine_speed'));

    await page.goBack(); // undo the channel
    await page.waitForURL((url) => url.searchParams.get('range') === '1h' && !url.searchParams.has('channels'));
    await page.goBack(); // back to 7 days
    await page.waitForURL((url) => url.searchParams.get('range') === '7d');
    await page.waitForFunction(() => document.querySelector('jw-range-picker .mat-button-toggle-checked')?.textContent?.trim() === 'Last 7 days');
    assert.equal(await checked(), 'Last 7 days');

    await page.reload();
    await page.waitForFunction(() => document.querySelector('jw-range-picker .mat-button-toggle-checked')?.textContent?.trim() === 'Last 7 days', null, {
      timeout: 20000,
    });
    await shot(page, 'live-truth-range-after-reload');
  });
});
