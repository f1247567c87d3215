/**
 * Alarms end to end, in Chromium against a real server, broker, mail catcher and simulator:
 * the operator watches the alarm list and the fleet board; the simulator's overheat scenario begins on one
 * engine; the alarm appears live (no reload) with its priority as a word and a shape, and the app-bar and
 * tile counts rise; the operator acknowledges it with a note and the history shows it. A planner shelves
 * an alarm with minutes and a reason (an operator has no shelve action). The admin's mail page lists the
 * alarm e-mail the mail catcher received over SMTP.
 */
import assert from 'node:assert/strict';
import { after, before, describe, it } from 'node:test';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { ACCOUNTS, fillChecked, launchBrowser, openDialog, shot, signIn, startStack, waitUntil, type Stack } from './harness';

const HIGH = 'Coolant temperature high';

interface AlarmRow {
  id: number;
  engineId: number;
  engineName: string;
  rule: string;
  state: string;
}

describe('alarms (operator, planner, admin)', () => {
  let stack: Stack;
  let browser: Browser;
  let operator: BrowserContext;
  let list: Page;
  let board: Page;
  let engineId: number;
  let engineName: string;
  let alarm: AlarmRow;

  before(async () => {
    stack = await startStack({ simulatorArgs: ['--rate', '1', '--speed', '30', '--seed', '7'] });
    browser = await launchBrowser();
    operator = await browser.newContext({ viewport: { width: 1366, height: 900 } });
    list = await operator.newPage();
    const token = await stack.login(ACCOUNTS.admin);
    const engines = (await stack.api<{ id: number; name: string }[]>('GET', '/api/engines', token)).body;
    engineId = engines[0].id;
    engineName = engines[0].name;
  });

  after(async () => {
    await browser?.close();
    await stack?.stop();
  });

  const rowOf = (page: Page, title = HIGH) => page.locator('jw-alarm-row', { hasText: title }).filter({ hasText: engineName }).first();
  const appBarCount = async (page: Page) => Number((await page.locator('.alarm-count').first().textContent())?.match(/\d+/)?.[0] ?? NaN);

  it('the operator watches the alarm list and the board; nothing is raised yet', async () => {
    await signIn(list, stack, ACCOUNTS.operator);
    board = await operator.newPage();
    await board.goto(`${stack.baseUrl}/fleet`);
    await board.locator('jw-engine-tile', { hasText: engineName }).first().waitFor({ timeout: 20000 });
    await list.goto(`${stack.baseUrl}/alarms`);
    await list.getByRole('heading', { name: 'Alarms' }).waitFor();
    await list.locator('.alarm-count').first().waitFor({ timeout: 15000 });
    assert.equal(await rowOf(list).count(), 0, 'no overheat alarm before the scenario');
    assert.equal(await appBarCount(list), 0, 'app bar shows no active alarms');
    // marks that a reload would wipe: the alarm must arrive on these same documents
    for (const p of [list, board]) await p.evaluate(() => ((window as unknown as { jwNoReload: boolean }).jwNoReload = true));
    await shot(list, 'alarms-01-list-before');
    await shot(board, 'alarms-02-board-before');
  });

  it('the overheat scenario begins: the alarm appears live with its priority in words and shape, counts rise', async () => {
    await list.bringToFront();
    await stack.control(`/engines/${engineId}/scenario`, { name: 'overheat' });
    const row = rowOf(list);
    await row.waitFor({ timeout: 120000 });
    assert.equal(await list.evaluate(() => (window as unknown as { jwNoReload?: boolean }).jwNoReload), true, 'the list page was not reloaded');
    assert.equal(await row.locator('.priority-text').textContent(), 'Medium');
    const shape = await row
      .locator('.priority mat-icon')
      .evaluate((el) => `${el.getAttribute('fonticon') ?? ''} ${el.getAttribute('data-mat-icon-name') ?? ''} ${el.textContent ?? ''} ${el.className}`);
    assert.match(shape, /diamond/, `medium priority is drawn as a diamond (${shape})`);
    assert.match((await row.locator('.state').textContent()) ?? '', /Unacknowledged/);
    assert.match((await row.locator('.value').textContent()) ?? '', /°C|°F/, 'value shown with a unit');
    await waitUntil(async () => (await appBarCount(list)) >= 1, { timeoutMs: 15000, what: 'app-bar count to rise' });
    await shot(list, 'alarms-03-list-raised');

    // a background tab's rendering is throttled by Chromium: look at the board as the operator would
    await board.bringToFront();
    const tileCount = board.locator('jw-engine-tile', { hasText: engineName }).first().locator('.alarms .jw-num');
    await waitUntil(async () => Number(((await tileCount.textContent({ timeout: 2000 })) ?? '').match(/\d+/)?.[0] ?? 0) >= 1, {
      timeoutMs: 15000,
      what: 'tile alarm count to rise',
    });
    assert.equal(await board.evaluate(() => (window as unknown as { jwNoReload?: boolean }).jwNoReload), true, 'the board was not reloaded');
    assert.ok((await appBarCount(board)) >= 1, 'app bar on the board counts the alarm');
    await shot(board, 'alarms-04-board-raised');

    const token = await stack.login(ACCOUNTS.operator);
    const alarms = (await stack.api<AlarmRow[]>('GET', `/api/alarms?engineId=${engineId}`, token)).body;
    alarm = alarms.find((a) => a.rule === 'coolant_temp_high')!;
    assert.ok(alarm, 'the API lists the same alarm');
  });

  it('the operator has no shelve action; acknowledges with a note; the state text changes; the history shows it', async () => {
    await list.bringToFront();
    const row = rowOf(list);
    assert.equal(await row.locator('button.shelve').count(), 0, 'no shelve button for an operator');
    await row.locator('button.ack').click();
    const dialog = await openDialog(list);
    await dialog.getByRole('heading', { name: 'Acknowledge alarm' }).waitFor();
    await fillChecked(dialog.getByLabel(/Note/), 'Fan belt checked from a distance; load reduced.');
    await shot(list, 'alarms-05-acknowledge-dialog');
    await dialog.locator('button.confirm').click();
    await dialog.waitFor({ state: 'detached' });
    await waitUntil(async () => /Acknowledged/.test((await row.locator('.state').textContent()) ?? ''), {
      timeoutMs: 15000,
      what: 'state text "Acknowledged"',
    });
    assert.equal(await row.locator('button.ack').count(), 0, 'no acknowledge button once acknowledged');
    await shot(list, 'alarms-06-list-acknowledged');

    await row.locator('a.title').click();
    await list.waitForURL(`**/alarms/${alarm.id}`);
    const history = list.locator('table.history');
    await history.waitFor();
    await waitUntil(async () => /Acknowledged/.test((await history.textContent()) ?? ''), { timeoutMs: 10000, what: 'acknowledge in the history' });
    assert.match((await history.textContent()) ?? '', /Unacknowledged\s*→\s*Acknowledged/, 'the transition is in the history');
    assert.match((await history.textContent()) ?? '', /Fan belt checked from a distance/);
    await list.locator('mat-snack-bar-container').waitFor({ state: 'detached', timeout: 10000 }); // so it hides no row
    await shot(list, 'alarms-07-history');
  });

  it('a planner shelves an alarm for some minutes with a reason', async () => {
    const planner = await browser.newContext({ viewport: { width: 1366, height: 900 } });
    const page = await planner.newPage();
    await signIn(page, stack, ACCOUNTS.planner);
    await page.goto(`${stack.baseUrl}/alarms`);
    const row = rowOf(page);
    await row.waitFor({ timeout: 20000 });
    await row.locator('button.shelve').click();
    const dialog = await openDialog(page);
    await dialog.getByRole('heading', { name: 'Shelve alarm' }).waitFor();
    await fillChecked(dialog.getByLabel(/For how long/), '45');
    await fillChecked(dialog.getByLabel(/Reason/), 'Fan motor replacement booked; the technician is on site.');
    await shot(page, 'alarms-08-shelve-dialog');
    await dialog.locator('button.confirm').click();
    await dialog.waitFor({ state: 'detached' });
    await waitUntil(async () => (await rowOf(page).count()) === 0, { timeoutMs: 15000, what: 'the shelved alarm to leave "Now"' });
    await page
      .getByRole('radio', { name: 'On the shelf' })
      .or(page.getByRole('button', { name: 'On the shelf' }))
      .first()
      .click();
    const shelved = rowOf(page);
    await shelved.waitFor({ timeout: 15000 });
    assert.match((await shelved.locator('.state').textContent()) ?? '', /Shelved/);
    assert.match((await shelved.locator('.state').textContent()) ?? '', /until/);
    await shot(page, 'alarms-09-shelved');

    const token = await stack.login(ACCOUNTS.planner);
    const detail = (await stack.api<{ state: string; shelveReason: string }>('GET', `/api/alarms/${alarm.id}`, token)).body;
    assert.equal(detail.state, 'shelved');
    assert.match(detail.shelveReason, /Fan motor replacement/);
    await planner.close();
  });

  it('the admin mail page lists the caught alarm e-mail', async () => {
    const admin = await browser.newContext({ viewport: { width: 1366, height: 900 } });
    const page = await admin.newPage();
    await signIn(page, stack, ACCOUNTS.admin);
    await page.goto(`${stack.baseUrl}/alarms/mail`);
    const mailRow = page.locator('tr', { hasText: HIGH }).filter({ hasText: 'tech@jacketwatch.test' }).first();
    await waitUntil(async () => (await mailRow.count()) > 0 || (await page.reload().then(() => false)), {
      timeoutMs: 30000,
      intervalMs: 2000,
      what: 'the alarm e-mail on the mail page',
    });
    assert.match((await mailRow.textContent()) ?? '', new RegExp(engineName));
    await shot(page, 'alarms-10-admin-mail');
    await admin.close();
  });
});
