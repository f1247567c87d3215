/**
 * The alarm screens of administrators and planners, in Chromium against a real server, broker and simulator:
 * the admin lowers the high-temperature limit of the overheating engine, previews it over the stored readings
 * and sees the alarms it would have raised (the same ones the preview API gives for that limit), then saves the
 * override and the engine's rules carry it; a planner adds, changes and deletes an on-call shift; the
 * performance page shows the figures GET /api/alarms/performance gives for the same period.
 */
import assert from 'node:assert/strict';
import { after, before, describe, it } from 'node:test';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { ACCOUNTS, fillChecked, launchBrowser, openDialog, pickOption, shot, signIn, startStack, waitUntil, type Stack } from './harness';

const RULE = 'coolant_temp_high';
const TITLE = 'Coolant temperature high';
/** Below the profile's 98 °C and well under what the overheat scenario reaches. */
const LOWER_LIMIT_C = 85;

interface Preview {
  alarms: { raisedAt: string; value: number | null; message: string }[];
}
interface RuleView {
  key: string;
  overridden: boolean;
  params: Record<string, unknown>;
}
interface Shift {
  id: number;
  userId: number;
  startsAt: string;
  endsAt: string;
}
interface Performance {
  total: number;
  max10Min: number;
  mostFrequent: { key: string; count: number }[];
}

describe('alarm screens of admins and planners', () => {
  let stack: Stack;
  let browser: Browser;
  let adminToken: string;
  let engineId: number;
  let engineName: string;
  const contexts: BrowserContext[] = [];

  before(async () => {
    stack = await startStack({ simulatorArgs: ['--rate', '1', '--speed', '30', '--seed', '7'] });
    browser = await launchBrowser();
    adminToken = await stack.login(ACCOUNTS.admin);
    const engines = (await stack.api<{ id: number; name: string }[]>('GET', '/api/engines', adminToken)).body;
    engineId = engines[0].id;
    engineName = engines[0].name;
    // the fault begins now; its readings are stored like any others, so the preview reads them back
    await stack.control(`/engines/${engineId}/scenario`, { name: 'overheat' });
    await waitUntil(
      async () => {
        const alarms = (await stack.api<{ engineId: number; rule: string }[]>('GET', `/api/alarms?state=all&engineId=${engineId}`, adminToken)).body;
        return alarms.some((a) => a.rule === RULE);
      },
      { timeoutMs: 90000, what: `the overheat scenario to raise ${RULE} on ${engineName}` },
    );
  });

  after(async () => {
    for (const c of contexts) await c.close().catch(() => undefined);
    await browser?.close();
    await stack?.stop();
  });

  async function pageAs(email: string, width = 1366): Promise<Page> {
    const ctx = await browser.newContext({ viewport: { width, height: 900 } });
    contexts.push(ctx);
    const page = await ctx.newPage();
    await signIn(page, stack, email);
    return page;
  }

  it('admin previews a lower high-temperature limit on one engine, sees the alarms it would raise, and saves the override', async () => {
    const page = await pageAs(ACCOUNTS.admin);
    await page.goto(`${stack.baseUrl}/alarms/rules`);
    await page.getByRole('heading', { name: 'Alarm rules' }).waitFor();
    // the default profile is named in the chooser, not left blank
    await waitUntil(async () => /Default profile/.test((await page.getByLabel('Rules of').textContent()) ?? ''), {
      timeoutMs: 10000,
      what: 'the chooser to name the default profile',
    });

    await page.getByLabel('Rules of').click();
    await page.getByRole('option', { name: `${engineName}: its own overrides` }).click();
    // the engine's own rules, not the profile's still on the page while they load (typing there would be lost)
    const panel = page
      .locator(`mat-accordion[data-rules-of="${engineId}"] mat-expansion-panel`)
      .filter({ has: page.locator('mat-panel-title', { hasText: new RegExp(`^\\s*${TITLE}`) }) });
    await panel.locator('mat-expansion-panel-header').click();
    const limit = panel.getByLabel('Limit');
    await limit.waitFor();
    assert.match((await panel.locator('mat-form-field', { hasText: 'Limit' }).first().textContent()) ?? '', /°C/, 'the limit field shows its unit');
    await fillChecked(limit, String(LOWER_LIMIT_C));
    await panel.locator('.changed').waitFor(); // the draft holds the edit
    await panel.getByRole('button', { name: /Preview/ }).click();
    const result = panel.getByRole('status').filter({ hasText: /would have been raised/ });
    await result.waitFor({ timeout: 30000 });
    await shot(page, 'alarms-admin-01-rule-preview');

    const shownCount = Number(((await result.locator('strong').first().textContent()) ?? '').match(/\d+/)?.[0] ?? NaN);
    const items = await result.locator('li').allTextContents();
    assert.ok(shownCount >= 1, `the lower limit would have raised at least one alarm (page says ${shownCount})`);
    assert.ok(items.length >= 1, 'the raised alarms are listed');
    for (const text of items) assert.match(text, new RegExp(`above high limit ${LOWER_LIMIT_C} °C`), `listed alarm is one of the lower limit: ${text}`);

    // the same question to the API, and the profile's limit for comparison: the lower limit raises no later
    const ask = (params?: Record<string, number>) =>
      stack.api<Preview>('POST', '/api/rules/preview', adminToken, { engineId, rule: RULE, ...(params ? { params } : {}) });
    const lower = (await ask({ limit: LOWER_LIMIT_C })).body;
    const profile = (await ask()).body;
    assert.ok(Math.abs(lower.alarms.length - shownCount) <= 1, `page shows ${shownCount} alarms, the API ${lower.alarms.length}`);
    assert.ok(profile.alarms.length >= 1, 'the profile limit raises the overheat too');
    assert.ok(Date.parse(lower.alarms[0].raisedAt) < Date.parse(profile.alarms[0].raisedAt), 'the lower limit raises earlier than the profile limit');

    await page.getByRole('button', { name: /Save changes/ }).click();
    await page.getByText('Rules saved').waitFor({ timeout: 10000 });
    await panel.getByText(/own setting/).waitFor();
    await shot(page, 'alarms-admin-02-rule-saved');
    const rules = (await stack.api<{ rules: RuleView[] }>('GET', `/api/rules/engines/${engineId}`, adminToken)).body.rules;
    const saved = rules.find((r) => r.key === RULE);
    assert.ok(saved?.overridden, 'the engine has its own setting of the rule');
    assert.equal(saved?.params.limit, LOWER_LIMIT_C, 'the override carries the lower limit, in °C');
    const profileRule = (await stack.api<{ rules: RuleView[] }>('GET', '/api/rules', adminToken)).body.rules.find((r) => r.key === RULE);
    assert.notEqual(profileRule?.params.limit, LOWER_LIMIT_C, 'the default profile is unchanged');
  });

  it('planner adds an on-call shift, changes it and deletes it', async () => {
    const plannerToken = await stack.login(ACCOUNTS.planner);
    const page = await pageAs(ACCOUNTS.planner, 820);
    await page.goto(`${stack.baseUrl}/alarms/on-call`);
    await page.getByRole('heading', { name: 'On-call rota' }).waitFor();
    // the week view: one site's week in its zone, 24-hour times
    await page.locator('jw-rota-week-view li.day').first().waitFor();
    assert.equal(await page.locator('jw-rota-week-view li.day').count(), 7, 'seven days in the week');
    const sitePick = page.getByRole('combobox', { name: 'Site of the week shown' });
    await waitUntil(async () => !!((await sitePick.textContent()) ?? '').trim(), { timeoutMs: 10000, what: 'the site of the week chosen' });
    const siteName = ((await sitePick.textContent()) ?? '').trim();
    const sites = (await stack.api<{ id: number; name: string; timeZone: string }[]>('GET', '/api/sites', plannerToken)).body;
    const site = sites.find((s) => s.name === siteName);
    assert.ok(site, `the week is of a site (${siteName})`);
    assert.ok(await page.getByText(`Times in ${site.timeZone}`).isVisible(), "the week names the site's zone");
    assert.doesNotMatch((await page.locator('jw-rota-week-view').textContent()) ?? '', /\b(AM|PM)\b/, 'no 12-hour times');
    await shot(page, 'alarms-admin-03a-rota-week');
    const wall = (iso: string) => {
      // the instant of a wall-clock time in the site's zone
      const guess = Date.parse(`${iso}:00Z`);
      const p = Object.fromEntries(
        new Intl.DateTimeFormat('en-US', {
          timeZone: site.timeZone,
          hourCycle: 'h23',
          year: 'numeric',
          month: '2-digit',
          day: '2-digit',
          hour: '2-digit',
          minute: '2-digit',
        })
          .formatToParts(guess)
          .map((x) => [x.type, x.value]),
      );
      const shown = Date.parse(`${p.year}-${p.month}-${p.day}T${p.hour}:${p.minute}:00Z`);
      return new Date(guess - (shown - guess)).toISOString();
    };
    await page.getByRole('button', { name: /New shift/ }).click();
    const dialog = await openDialog(page);
    await pickOption(page, dialog.getByLabel('Site', { exact: true }), new RegExp(siteName));
    await pickOption(page, dialog.getByLabel('On call'), /technician/);
    await fillChecked(dialog.getByLabel('From'), '2030-03-04 07:00');
    await fillChecked(dialog.getByLabel('Until'), '2030-03-04 19:00');
    // nobody else is on call that day: the uncovered hours are named before saving
    await dialog
      .getByRole('status', { name: 'Warnings before saving' })
      .getByText(/Nobody on call at this site from 2030-03-04 00:00 to 2030-03-04 07:00/)
      .waitFor();
    await shot(page, 'alarms-admin-03-shift-dialog');
    await dialog.getByRole('button', { name: 'Save anyway' }).click();
    const row = page.locator('tr', { hasText: 'Just saved' });
    await row.waitFor({ timeout: 10000 });
    assert.match((await row.textContent()) ?? '', /2030-03-04/, 'the shift in the one date style');
    await shot(page, 'alarms-admin-04-shift-saved');

    const mine = async () =>
      (await stack.api<Shift[]>('GET', `/api/oncall?from=${Date.parse('2030-03-01T00:00:00Z')}`, plannerToken)).body.filter(
        (s) => s.startsAt === wall('2030-03-04T07:00'),
      );
    const created = await mine();
    assert.equal(created.length, 1, 'the shift is in the rota');
    assert.equal(Date.parse(created[0].endsAt) - Date.parse(created[0].startsAt), 12 * 3600_000);

    await row.getByRole('button', { name: /Change shift/ }).click();
    const change = await openDialog(page);
    await fillChecked(change.getByLabel('Until'), '2030-03-04 21:00');
    await change.getByRole('button', { name: /^Save/ }).click();
    await change.waitFor({ state: 'detached' });
    await waitUntil(async () => (await mine())[0]?.endsAt === wall('2030-03-04T21:00'), { timeoutMs: 10000, what: 'the changed end of the shift' });

    await page
      .locator('tr', { hasText: 'Just saved' })
      .getByRole('button', { name: /Delete shift/ })
      .click();
    await page.getByRole('button', { name: 'Delete', exact: true }).click();
    await page.getByText('Shift deleted').waitFor({ timeout: 10000 });
    assert.equal((await mine()).length, 0, 'the shift is gone from the rota');
  });

  it('the performance page shows the figures the API gives for the same period', async () => {
    const page = await pageAs(ACCOUNTS.planner);
    const asked = page.waitForResponse((r) => r.url().includes('/api/alarms/performance') && r.ok());
    await page.goto(`${stack.baseUrl}/alarms/performance`);
    const url = new URL((await asked).url());
    await page.getByText('alarms raised').waitFor();
    await shot(page, 'alarms-admin-05-performance');

    const from = url.searchParams.get('from');
    const to = url.searchParams.get('to');
    const report = (await stack.api<Performance>('GET', `/api/alarms/performance?from=${from}&to=${to}`, adminToken)).body;
    assert.ok(report.total >= 1, 'the overheat alarm is counted');
    const figure = async (label: string) => Number(((await page.locator('mat-card', { hasText: label }).locator('.big').textContent()) ?? '').trim());
    assert.equal(await figure('alarms raised'), report.total);
    assert.equal(await figure('alarms in the busiest 10 minutes'), report.max10Min);
    const rows = page.locator('table').first().locator('tr[mat-row]');
    assert.equal(await rows.count(), report.mostFrequent.length, 'one row per most frequent alarm');
    const first = await rows.first().locator('td').allTextContents();
    assert.equal(Number(first[1].trim()), report.mostFrequent[0].count, 'top count matches');
    assert.ok(first[0].startsWith(report.mostFrequent[0].key.split('/')[0]), `top row names the engine (${first[0]})`);
    assert.ok(!first[0].includes('_'), `the rule is named in words, not by its key (${first[0]})`);
  });
});
