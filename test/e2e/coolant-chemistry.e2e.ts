/**
 * Coolant chemistry end to end, in Chromium against a real server with the demo seed:
 * - the admin sets a site's lowest expected temperature (shown and typed in the user's units);
 * - a technician records a test with low nitrite and a freeze point short of that site's design low, and sees
 *   both findings with their actions; the fleet board flags the engine in words and with a snowflake;
 * - a technician records a top-up as a work-order step (volume, what it was) and sees the additive estimate.
 *
 * Sources beside each check: limits nitrite >= 800 ppm (common practice, from memory; admin setting), freeze margin
 * 5 K below the design low (common practice); °F = °C x 1.8 + 32 (NIST SP 811, appendix B); top-up estimate by the
 * mass balance of mixing C1V1 + C2V2 = C3V3 (any general chemistry text).
 */
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { after, before, describe, it } from 'node:test';
import type { Browser, Page } from 'playwright-core';
import { ACCOUNTS, fillChecked, launchBrowser, openDialog, pickOption, shot, signIn, startStack, type Stack } from './harness';

interface SiteRow {
  id: number;
  name: string;
  designLowTempC: number | null;
}
interface EngineRow {
  id: number;
  name: string;
  siteId: number;
  capacityL: number;
  freezeProtection?: { status: string; freezePointC: number; requiredC: number };
}
interface UserRow {
  id: number;
  role: string;
  email: string;
}

/** Screenshots also kept under /tmp/wt-chem for looking at them. */
const LOOK = '/tmp/wt-chem';
async function look(page: Page, name: string): Promise<void> {
  await shot(page, name);
  // what the user sees at this scroll position (the full page is in test-output/screenshots)
  fs.mkdirSync(LOOK, { recursive: true });
  await page.screenshot({ path: path.join(LOOK, `${name}.png`) });
}
/** The same screen at 1366 px and at 820 px wide. */
async function lookBoth(page: Page, name: string): Promise<void> {
  const was = page.viewportSize() ?? { width: 1366, height: 900 };
  await page.setViewportSize({ width: 1366, height: 900 });
  await look(page, `${name}-1366`);
  await page.setViewportSize({ width: 820, height: 1180 });
  await look(page, `${name}-820`);
  await page.setViewportSize(was);
}

describe('coolant chemistry: design low, findings, fleet flag, top-up step', () => {
  let stack: Stack;
  let browser: Browser;
  let ridge: SiteRow;
  let engine: EngineRow;

  before(async () => {
    // a short stop and hold for the top-up's cap-off step (the safe defaults are 600 s and 120 s)
    stack = await startStack({ env: { OPENING_MIN_STOPPED_S: '5', OPENING_HOLD_S: '5' } });
    browser = await launchBrowser();
    const token = await stack.login(ACCOUNTS.admin);
    ridge = (await stack.api<SiteRow[]>('GET', '/api/sites', token)).body.find((s) => s.name === 'Ridgeback Booster Station')!;
    engine = (await stack.api<EngineRow[]>('GET', '/api/engines', token)).body.find((e) => e.name === 'Ridgeback gen-set 1')!;
    assert.ok(ridge && engine, 'demo site and engine');
  });

  after(async () => {
    await browser?.close();
    await stack?.stop();
  });

  it('admin: the site list shows the demo design low in °F; changing it in °F stores °C', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1366, height: 900 } });
    const page = await ctx.newPage();
    await signIn(page, stack, ACCOUNTS.admin);
    await page.evaluate(() =>
      localStorage.setItem('jw.preferences', JSON.stringify({ temperature: 'degF', pressure: 'psi', volume: 'gal', theme: 'light', timeZone: 'site' })),
    );
    await page.goto(`${stack.baseUrl}/admin/sites`);
    const row = page.locator('tr', { hasText: ridge.name });
    // demo: -30 °C = -22.0 °F (NIST SP 811: -30 x 1.8 + 32)
    await row.locator('[data-test=design-low-cell]', { hasText: '-22.0 °F' }).waitFor({ timeout: 15000 });
    await row.getByRole('button', { name: `Change ${ridge.name}` }).click();
    const dialog = await openDialog(page);
    const field = dialog.getByLabel('Lowest expected temperature');
    assert.equal(await field.inputValue(), '-22');
    // the margin is shown in the user's unit: 5 K = 9 °F
    await dialog.getByText('at least 9 °F below it').waitFor();
    await lookBoth(page, 'chem-1-site-dialog-degF');
    await fillChecked(field, '-13'); // (-13 - 32) / 1.8 = -25 °C
    await dialog.getByRole('button', { name: 'Save changes' }).click();
    await dialog.waitFor({ state: 'detached' });
    await row.locator('[data-test=design-low-cell]', { hasText: '-13.0 °F' }).waitFor({ timeout: 15000 });
    await lookBoth(page, 'chem-2-sites-page');
    const token = await stack.login(ACCOUNTS.admin);
    const stored = (await stack.api<SiteRow[]>('GET', '/api/sites', token)).body.find((s) => s.id === ridge.id)!;
    assert.equal(stored.designLowTempC, -25);
    // the margin setting, on the additive tab, in °F as well
    await page.goto(`${stack.baseUrl}/admin/additive`);
    const margin = page.locator('input[formcontrolname=freezeMargin]');
    await page.waitForFunction(() => (document.querySelector('input[formcontrolname=freezeMargin]') as HTMLInputElement | null)?.value === '9');
    assert.equal(await margin.inputValue(), '9');
    await margin.scrollIntoViewIfNeeded();
    await lookBoth(page, 'chem-3-limits-margin-degF');
    await ctx.close();
  });

  it('technician: low nitrite and a freeze point short of the design low: both findings with their actions, and the fleet flag', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1366, height: 900 } });
    const page = await ctx.newPage();
    await signIn(page, stack, ACCOUNTS.technician);
    await page.goto(`${stack.baseUrl}/engines/${engine.id}/coolant`);
    await page.getByRole('heading', { name: `Coolant of ${engine.name}` }).waitFor();
    await pickOption(page, page.getByLabel('Method'), 'Refractometer');
    await page.getByLabel('Freeze point', { exact: true }).fill('-24');
    await page.getByLabel('Nitrite', { exact: true }).fill('500');
    await page.getByRole('button', { name: 'Save test' }).click();
    await page.getByRole('heading', { name: /^Saved .*decision on record/ }).waitFor({ timeout: 15000 });

    // nitrite 500 ppm < 800 ppm (default low limit, common practice)
    const nitrite = page.locator('[data-test=finding-nitritePpm]').last();
    await nitrite.waitFor();
    const nitriteText = (await nitrite.textContent()) ?? '';
    assert.match(nitriteText, /Nitrite: Low/);
    assert.match(nitriteText, /cavitation/);
    assert.match(nitriteText, /Action\s+Add supplemental coolant additive/);
    // design low -25 °C less the 5 K margin = -30 °C; -24 °C is warmer: short
    const freeze = page.locator('[data-test=finding-freezeProtection]').last();
    const freezeText = (await freeze.textContent()) ?? '';
    assert.match(freezeText, /Freeze protection: Short of the design low/);
    assert.match(freezeText, /-30\.0 °C/);
    assert.match(freezeText, /Action\s+Raise the glycol to at least \d+(\.\d)? % by volume/);
    await nitrite.scrollIntoViewIfNeeded();
    await lookBoth(page, 'chem-4-findings');

    await page.goto(`${stack.baseUrl}/`);
    const tile = page.locator('jw-engine-tile', { hasText: engine.name });
    const flag = tile.locator('[data-testid=freeze-short]');
    await flag.waitFor({ timeout: 15000 });
    const flagText = (await flag.textContent())?.replace(/\s+/g, ' ').trim() ?? '';
    assert.match(flagText, /Freeze protection short/);
    assert.match(flagText, /freezes at -24\.0 °C, needs -30\.0 °C or colder \(test \d{4}-\d{2}-\d{2} \d{2}:\d{2} MST\)/);
    assert.equal(await flag.locator('mat-icon').getAttribute('fonticon'), 'ac_unit');
    // the filter shows only the engines short of protection
    await page.getByTestId('freeze-filter').click();
    await page.waitForFunction((name) => {
      const tiles = Array.from(document.querySelectorAll('jw-engine-tile'));
      return tiles.length > 0 && tiles.every((t) => !!t.querySelector('[data-testid=freeze-short]')) && tiles.some((t) => (t.textContent ?? '').includes(name));
    }, engine.name);
    await lookBoth(page, 'chem-5-fleet-freeze-flag');
    const token = await stack.login(ACCOUNTS.technician);
    const listed = (await stack.api<EngineRow[]>('GET', '/api/engines', token)).body.find((e) => e.id === engine.id)!;
    assert.equal(listed.freezeProtection?.status, 'short');
    assert.equal(listed.freezeProtection!.requiredC, -30);
    await ctx.close();
  });

  it('technician: the top-up step records 8 L of plain water and shows the additive estimate', async () => {
    const plannerToken = await stack.login(ACCOUNTS.planner);
    const people = (await stack.api<UserRow[]>('GET', '/api/people?role=technician', plannerToken)).body;
    const tech = people.find((p) => p.email === ACCOUNTS.technician)!;
    const created = await stack.api<{ id: number }>('POST', '/api/work-orders', plannerToken, {
      engineId: engine.id,
      kind: 'top-up',
      assigneeId: tech.id,
      dueDate: '2026-12-20',
    });
    assert.equal(created.status, 201);
    const techToken = await stack.login(ACCOUNTS.technician);
    assert.equal((await stack.api('POST', `/api/work-orders/${created.body.id}/transition`, techToken, { to: 'in-progress' })).status, 200);

    const ctx = await browser.newContext({ viewport: { width: 1366, height: 900 } });
    const page = await ctx.newPage();
    await signIn(page, stack, ACCOUNTS.technician);
    await page.goto(`${stack.baseUrl}/work/${created.body.id}`);
    const form = page.locator('[data-test=top-up-form]');
    await form.waitFor({ timeout: 15000 });
    // coolant goes in only with the cap off: the step waits for the cap-off step, and says which
    const order = (await stack.api<{ steps: { id: number; key: string; position: number }[] }>('GET', `/api/work-orders/${created.body.id}`, techToken)).body;
    const capOff = order.steps.find((s) => s.key === 'relieve-pressure')!;
    await page
      .locator('[data-test=waits-add]')
      .getByText(`Waits: do step ${capOff.position} first: Relieve the pressure and take off the filler cap.`)
      .waitFor();
    assert.ok(await form.getByRole('button', { name: 'Record top-up and mark done' }).isDisabled(), 'recording waits for the cap-off step');
    await page.locator('[data-test=waits-add]').scrollIntoViewIfNeeded();
    await lookBoth(page, 'chem-5-top-up-waits');
    // the technician locks out, then takes the cap off once the live opening check clears (the standby engine is
    // stopped and warm; stop and hold are 5 s here)
    const stepItem = (key: string) => page.locator('li.step').nth(order.steps.findIndex((x) => x.key === key));
    const lockItem = stepItem('stop-and-lock-out');
    await lockItem.getByRole('button', { name: 'Mark done' }).click();
    await lockItem.locator('.badge.done').waitFor();
    const capItem = stepItem('relieve-pressure');
    await capItem.getByRole('button', { name: 'Mark done' }).click({ timeout: 60_000 }); // enabled when the check is clear
    await capItem.locator('.badge.done').waitFor();
    await page.locator('[data-test=waits-add]').waitFor({ state: 'detached', timeout: 15000 });
    await fillChecked(form.getByLabel('Volume added'), '8');
    await pickOption(page, form.getByLabel('What was added'), 'Plain water');
    await form.getByText('Plain water dilutes both the glycol').waitFor();
    await form.scrollIntoViewIfNeeded();
    await lookBoth(page, 'chem-6-top-up-step');
    await form.getByRole('button', { name: 'Record top-up and mark done' }).click();
    const estimate = page.locator('[data-test=top-up-step-estimate]');
    await estimate.waitFor({ timeout: 15000 });
    await estimate.scrollIntoViewIfNeeded();
    await lookBoth(page, 'chem-7-top-up-estimate');
    // the last test (above) has nitrite 500 ppm and no additive units: 500 x (1 - 8 / capacity) by mass balance
    const expected = 500 * (1 - 8 / engine.capacityL);
    assert.match((await estimate.textContent()) ?? '', new RegExp(`Nitrite estimated at ${expected.toFixed(0)} ppm`));
    assert.match((await estimate.textContent()) ?? '', /test the coolant now/);
    const answer = (
      await stack.api<{ topUps: { volumeL: number; liquid: string; workOrderId: number }[] }>('GET', `/api/engines/${engine.id}/coolant-top-ups`, techToken)
    ).body;
    assert.equal(answer.topUps[0].volumeL, 8);
    assert.equal(answer.topUps[0].liquid, 'water');
    assert.equal(answer.topUps[0].workOrderId, created.body.id);
    // and on the engine's coolant page
    await page.goto(`${stack.baseUrl}/engines/${engine.id}/coolant`);
    const card = page.locator('[data-test=top-up-estimate]');
    await card.getByText(/Additive probably low: test now/).waitFor({ timeout: 15000 });
    await card.scrollIntoViewIfNeeded();
    await lookBoth(page, 'chem-8-coolant-page-estimate');
    await ctx.close();
  });
});
