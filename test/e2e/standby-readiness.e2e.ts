/**
 * Standby readiness as an operator sees it: the fire-pump engine (standby, jacket-water heater at 43 °C) is held
 * stopped in the simulator and its heater switched off (`heater-failure` scenario); its jacket water falls toward
 * ambient, and once below the 32 °C minimum the fleet board and the engine page both say "Not ready" with the
 * reason in words. The simulator runs at 120x physical time, so the cool-down takes well under a minute.
 * The browser runs in Asia/Tokyo while the site is in America/Chicago: the trend's time axis is labelled in the
 * site's zone (the page's default), not the browser's. 2.4 h of history (10 s steps) is sent first, so the hour is drawn.
 */
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { after, before, describe, it } from 'node:test';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { ACCOUNTS, launchBrowser, shot, signIn, startStack, type Stack } from './harness';

const ENGINE_NAME = 'Fire-pump engine';
/** Cool-down at 120x (about 15-40 s) plus the boards' readiness refresh (30 s fleet, 15 s engine page); a wait, not a timing check. */
const NOT_READY_WAIT_MS = 150_000;
const SHOT_DIR = process.env.SHOT_COPY_DIR; // also copied here when set (to look at them)

describe('standby readiness (heater switched off in the simulator)', () => {
  let stack: Stack;
  let browser: Browser;
  let context: BrowserContext;
  let fleet: Page;
  let enginePage: Page;
  let engineId: number;

  const keep = async (page: Page, name: string) => {
    const file = await shot(page, name);
    if (SHOT_DIR) {
      fs.mkdirSync(SHOT_DIR, { recursive: true });
      fs.copyFileSync(file, path.join(SHOT_DIR, path.basename(file)));
    }
  };

  before(async () => {
    [stack, browser] = await Promise.all([
      startStack({ simulatorArgs: ['--rate', '1', '--speed', '120', '--seed', '7', '--backfill-days', '0.1', '--backfill-step', '10'] }),
      launchBrowser(),
    ]);
    const token = await stack.login(ACCOUNTS.operator);
    const engines = (await stack.api<{ id: number; name: string; duty: string }[]>('GET', '/api/engines', token)).body;
    engineId = engines.find((e) => e.name === ENGINE_NAME)!.id;
    context = await browser.newContext({ viewport: { width: 1366, height: 900 }, timezoneId: 'Asia/Tokyo' });
    fleet = await context.newPage();
    await signIn(fleet, stack, ACCOUNTS.operator);
    enginePage = await context.newPage();
  });

  after(async () => {
    await browser?.close();
    await stack?.stop();
  });

  const tileReadiness = (name: string) => fleet.locator('jw-engine-tile', { hasText: name }).first().locator('[data-testid=readiness]');

  it('shows the standby engine Ready while its heater holds it warm', async () => {
    await stack.control(`/engines/${engineId}/stop`);
    await fleet.goto(`${stack.baseUrl}/fleet`);
    await tileReadiness(ENGINE_NAME).and(fleet.locator('[data-ready=true]')).waitFor({ timeout: 60_000 });
    await enginePage.goto(`${stack.baseUrl}/engines/${engineId}?range=1h`);
    await enginePage.locator('jw-readiness-status [data-ready=true]').waitFor({ timeout: 30_000 });
    assert.match((await enginePage.locator('jw-readiness-status').textContent()) ?? '', /Ready/);
  });

  it('turns "Not ready" with the cold jacket water in words on the fleet board and the engine page when the heater goes off', async () => {
    await stack.control(`/engines/${engineId}/scenario`, { name: 'heater-failure' });
    // the very state asserted: not ready, with the reason in words (text and shape, not colour only)
    await fleet.waitForFunction(
      (name) => {
        const tile = [...document.querySelectorAll('jw-engine-tile')].find((el) => (el.textContent ?? '').includes(name));
        const r = tile?.querySelector('[data-testid=readiness]');
        return r?.getAttribute('data-ready') === 'false' && /Not ready/.test(r.textContent ?? '') && /Jacket water cold/.test(r.textContent ?? '');
      },
      ENGINE_NAME,
      { timeout: NOT_READY_WAIT_MS },
    );
    const tileText = (await tileReadiness(ENGINE_NAME).textContent()) ?? '';
    assert.match(tileText, /Jacket water cold: \d+\.\d °C \(\d+\.\d °F\), below the 32\.0 °C \(89\.6 °F\)/);
    assert.equal(await tileReadiness(ENGINE_NAME).locator('mat-icon').getAttribute('fonticon'), 'report', 'a different shape, not only a colour');
    await keep(fleet, 'standby-fleet-not-ready');

    await enginePage.waitForFunction(
      () => {
        const r = document.querySelector('jw-readiness-status');
        return (
          r?.querySelector('[data-ready=false]') !== null &&
          /Not ready/.test(r?.textContent ?? '') &&
          /Jacket water cold/.test(r?.querySelector('[data-testid=readiness-reasons]')?.textContent ?? '')
        );
      },
      null,
      { timeout: NOT_READY_WAIT_MS },
    );
    await keep(enginePage, 'standby-engine-not-ready');
  });

  it('labels the trend time axis in the site zone, not the browser zone', async () => {
    const page = enginePage;
    await page.locator('jw-trend-chart .apexcharts-xaxis-label').first().waitFor({ timeout: 30_000 });
    // the window line names the site zone: "2026-12-02 10:35 – 2026-12-02 11:35 CST"
    const windowText = ((await page.locator('.window').textContent()) ?? '').replace(/\s+/g, ' ');
    const m = /\d{4}-\d{2}-\d{2} (\d{2}):(\d{2}) – \d{4}-\d{2}-\d{2} (\d{2}):(\d{2}) (C[SD]T)/.exec(windowText);
    assert.ok(m, `window line: ${windowText}`);
    const from = Number(m[1]) * 60 + Number(m[2]);
    const to = Number(m[3]) * 60 + Number(m[4]);
    const labels = (await page.locator('jw-trend-chart .apexcharts-xaxis-label tspan').allTextContents()).map((t) => t.trim()).filter(Boolean);
    assert.ok(labels.length >= 2, `axis labels: ${labels.join(', ')}`);
    for (const label of labels) {
      assert.match(label, /^\d{2}:\d{2}$/, `24 h label: ${label}`);
      const [h, min] = label.split(':').map(Number);
      const at = h * 60 + min;
      const inside = from <= to ? at >= from - 1 && at <= to + 1 : at >= from - 1 || at <= to + 1; // a window across midnight
      assert.ok(inside, `axis label ${label} lies in the window ${windowText} (site zone), not in the browser's zone`);
    }
    await keep(page, 'standby-engine-trend-axis-site-zone');
    // the same page at tablet width
    await page.setViewportSize({ width: 820, height: 1000 });
    await page.locator('jw-readiness-status [data-ready=false]').waitFor();
    await keep(page, 'standby-engine-not-ready-820');
  });
});
