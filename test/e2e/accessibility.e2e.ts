/**
 * Accessibility in Chromium against the real server and simulator: axe-core (WCAG 2.2 A/AA rules) on
 * every main screen, none of its serious or critical findings allowed; and the main flows with the
 * keyboard only: sign in, acknowledge an alarm, complete a work-order step.
 */
import assert from 'node:assert/strict';
import { after, before, describe, it } from 'node:test';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { axeViolations, describeFindings, serious, type AxeFinding } from './a11y';
import { ACCOUNTS, DEMO_PASSWORD, launchBrowser, shot, signIn, startStack, waitUntil, type Stack } from './harness';

describe('accessibility (axe on every main screen, keyboard flows)', () => {
  let stack: Stack;
  let browser: Browser;
  let ctx: BrowserContext;
  let page: Page;
  let engineId: number;
  let orderId: number;
  const all: Record<string, AxeFinding[]> = {};

  before(async () => {
    stack = await startStack({ simulatorArgs: ['--rate', '1', '--speed', '30', '--seed', '7'] });
    browser = await launchBrowser();
    ctx = await browser.newContext({ viewport: { width: 1366, height: 900 } });
    page = await ctx.newPage();
    const token = await stack.login(ACCOUNTS.planner);
    const engines = (await stack.api<{ id: number; name: string }[]>('GET', '/api/engines', token)).body;
    engineId = engines[0].id;
    const techs = (await stack.api<{ id: number; email: string }[]>('GET', '/api/work-orders/assignees', token)).body;
    const tech = techs.find((u) => u.email === ACCOUNTS.technician) ?? techs[0];
    const order = await stack.api<{ id: number }>('POST', '/api/work-orders', token, { engineId, kind: 'leak-check', assigneeId: tech.id });
    assert.equal(order.status, 201, JSON.stringify(order.body));
    orderId = order.body.id;
    // an alarm to acknowledge later, raised by the simulator while the screens are checked
    await stack.control(`/engines/${engineId}/scenario`, { name: 'overheat' });
  });

  after(async () => {
    const total = Object.values(all).reduce((n, l) => n + l.length, 0);
    const bad = Object.values(all).reduce((n, l) => n + serious(l).length, 0);
    console.log(`axe: ${total} violations (${bad} serious or critical) on ${Object.keys(all).length} screens`);
    for (const [screen, list] of Object.entries(all)) if (list.length) console.log(`  ${screen}:\n${describeFindings(list).replace(/^/gm, '    ')}`);
    await browser?.close();
    await stack?.stop();
  });

  /** Open a screen, wait for what it shows, run axe, keep the findings. */
  async function check(name: string, url: string, ready: (p: Page) => Promise<unknown>): Promise<void> {
    await page.goto(`${stack.baseUrl}${url}`);
    await ready(page);
    // Rows a data source emits are in the DOM one render before their bindings (aria-labels) are: an
    // auto-retrying assertion, so a screen still settling is checked again; a real finding stays and fails.
    await waitUntil(
      async () => {
        all[name] = await axeViolations(page);
        return serious(all[name]).length === 0;
      },
      { timeoutMs: 8000, what: `${name} without serious axe findings` },
    ).catch(() => undefined); // the assertion below names what stayed
    await shot(page, `a11y-${name}`);
    const bad = serious(all[name]);
    assert.equal(bad.length, 0, `${name}: serious or critical axe findings\n${describeFindings(bad)}`);
  }

  it('the sign-in page', async () => {
    await check('sign-in', '/sign-in', (p) => p.getByLabel('Password', { exact: true }).waitFor());
  });

  describe('as a planner', () => {
    before(async () => {
      await signIn(page, stack, ACCOUNTS.planner);
    });
    it('fleet board', () => check('fleet', '/fleet', (p) => p.locator('jw-engine-tile').first().waitFor({ timeout: 20000 })));
    it('fleet board searched, with a site folded', () =>
      check('fleet-folded', '/fleet?q=gen-set', async (p) => {
        await p.locator('jw-engine-tile').first().waitFor({ timeout: 20000 });
        await p.getByTestId('site-toggle').first().click();
        await p.getByTestId('site-abnormal').first().waitFor();
      }));
    it('engine page', () => check('engine', `/engines/${engineId}`, (p) => p.locator('jw-live-values').first().waitFor({ timeout: 20000 })));
    it('alarm list', () => check('alarms', '/alarms', (p) => p.getByRole('heading', { name: 'Alarms' }).waitFor()));
    it('work-order list', () =>
      check('work-list', '/work', (p) =>
        p
          .getByText(/Leak check/i)
          .first()
          .waitFor({ timeout: 20000 }),
      ));
    it('one work order', () => check('work-order', `/work/${orderId}`, (p) => p.locator('.step, jw-work-step').first().waitFor({ timeout: 20000 })));
    it('service due list', () => check('due', '/due', (p) => p.locator('table').first().waitFor({ timeout: 20000 })));
    it('engine coolant page', () => check('coolant', `/engines/${engineId}/coolant`, (p) => p.getByRole('heading').first().waitFor({ timeout: 20000 })));
    it('calculators', () => check('calculators', '/calculators', (p) => p.getByRole('heading').first().waitFor({ timeout: 20000 })));
  });

  describe('as an admin', () => {
    before(async () => {
      await ctx.clearCookies();
      await page.evaluate(() => localStorage.clear());
      await signIn(page, stack, ACCOUNTS.admin);
    });
    it('administration (users)', () =>
      check('admin-users', '/admin/users', (p) =>
        p
          .getByRole('button', { name: /^Change / })
          .first()
          .waitFor({ timeout: 20000 }),
      ));
  });

  describe('with the keyboard only (technician)', () => {
    let kb: Page;
    before(async () => {
      kb = await (await browser.newContext({ viewport: { width: 1366, height: 900 } })).newPage();
    });

    /** Press Tab until `target` has the focus (at most `max` presses); fails naming what had it last. */
    async function tabTo(target: ReturnType<Page['locator']>, what: string, max = 120): Promise<void> {
      for (let i = 0; i < max; i++) {
        if (await target.evaluate((el) => el === document.activeElement || el.contains(document.activeElement)).catch(() => false)) return;
        await kb.keyboard.press('Tab');
      }
      const last = await kb.evaluate(() => document.activeElement?.outerHTML.slice(0, 200) ?? 'nothing');
      assert.fail(`${what}: not reached with ${max} presses of Tab; focus on ${last}`);
    }

    it('signs in', async () => {
      await kb.goto(`${stack.baseUrl}/sign-in`);
      await tabTo(kb.getByLabel(/e-?mail/i), 'e-mail field');
      await kb.keyboard.type(ACCOUNTS.technician);
      await tabTo(kb.getByLabel('Password', { exact: true }), 'password field', 5);
      await kb.keyboard.type(DEMO_PASSWORD);
      await kb.keyboard.press('Enter');
      await kb.waitForURL((url) => !url.pathname.startsWith('/sign-in'), { timeout: 20000 });
    });

    it('acknowledges an alarm', async () => {
      await kb.goto(`${stack.baseUrl}/alarms`);
      const row = kb.locator('jw-alarm-row', { hasText: 'Coolant temperature high' }).first();
      await row.waitFor({ timeout: 120000 });
      await tabTo(row.locator('button.ack'), 'Acknowledge button');
      await kb.keyboard.press('Enter');
      const dialog = kb.locator('mat-dialog-container.mdc-dialog--open:not(.mdc-dialog--opening)').last();
      await dialog.waitFor({ timeout: 15000 });
      await kb.waitForFunction(() => !!document.activeElement?.closest('mat-dialog-container'), null, { timeout: 15000 });
      await tabTo(dialog.getByLabel(/Note/), 'note field', 10);
      await kb.keyboard.type('Checked on site; load reduced.');
      await tabTo(dialog.locator('button.confirm'), 'confirm button', 10);
      await kb.keyboard.press('Enter');
      await dialog.waitFor({ state: 'detached' });
      await waitUntil(async () => /Acknowledged/.test((await row.locator('.state').textContent()) ?? ''), {
        timeoutMs: 15000,
        what: 'state text "Acknowledged"',
      });
    });

    it('completes a step of a work order', async () => {
      const techToken = await stack.login(ACCOUNTS.technician);
      const started = await stack.api('POST', `/api/work-orders/${orderId}/transition`, techToken, { to: 'in-progress' });
      assert.equal(started.status, 200, JSON.stringify(started.body));
      const order = (await stack.api<{ steps: { id: number; key: string; gated: boolean; input: string }[] }>('GET', `/api/work-orders/${orderId}`, techToken))
        .body;
      const index = order.steps.findIndex((s) => !s.gated && s.input === 'confirmation');
      assert.ok(index >= 0, 'an ungated confirmation step');
      await kb.goto(`${stack.baseUrl}/work/${orderId}`);
      const step = kb.locator('li.step').nth(index);
      const done = step.getByRole('button', { name: /Mark done/ });
      await done.waitFor({ timeout: 20000 });
      await tabTo(done, 'Mark done button');
      await kb.keyboard.press('Enter');
      await step.locator('.badge.done').waitFor({ timeout: 15000 });
      await shot(kb, 'a11y-keyboard-step-done');
    });
  });
});
