/**
 * The work-order flow with the live safety gate, end to end: the simulator overheats a running engine
 * and an alarm is raised; the planner turns the alarm into a coolant filter change and assigns the
 * technician; the technician starts it and finds the gated steps locked while the engine is hot;
 * the simulator stops the engine, it cools, and the steps unlock by themselves; the technician records
 * the steps, the parts (the filter the additive rule asks for) and a photo; the planner signs off and
 * the service record prints without the app shell. The server refuses a gated step while hot even
 * when the browser is bypassed.
 *
 * The simulator runs 150 times faster than the wall clock, so a cool-down of about an hour of engine
 * time takes about 30 s here; the opening check's wall-clock timings are shortened for this test only
 * (OPENING_MIN_STOPPED_S, OPENING_HOLD_S, as an administrator can set them; the safe defaults are 600 s and 120 s).
 */
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import { after, before, describe, it } from 'node:test';
import type { Browser, BrowserContext, Locator, Page } from 'playwright-core';
import { ACCOUNTS, fillChecked, launchBrowser, openDialog, SHOTS, shot as pageShot, signIn, startStack, type Stack } from './harness';

const OUT = path.resolve(__dirname, '../../test-output');
const SPEED = '150';
const MIN_STOPPED_S = 20;
const HOLD_S = 20;
/**
 * The engine under test: heater set to 39 °C (below the 50 °C safe opening temperature), so the
 * coolant cools past the limit and the pressure falls to 0 kPa gauge (the simulator's expansion
 * pressure is zero below 40 °C). Checked with the simulator's own model: at --speed 60 it is at or
 * below 50 °C about 65 s after the stop and at or below 7 kPa about 80 s after; at --speed 150 in 0.4 of that.
 */
const ENGINE_NAME = 'Intake gen-set south';

interface Step {
  id: number;
  key: string;
  title: string;
  input: 'confirmation' | 'value' | 'photo';
  unit: string | null;
  gated: boolean;
  optional: boolean;
  doneAt: string | null;
  resultValue: number | null;
  resultText: string | null;
}
interface Order {
  id: number;
  status: string;
  engineId: number;
  assigneeId: number | null;
  alarmIds: number[];
  steps: Step[];
  parts: { kind: string; quantity: number; unit: string }[];
  attachments: { id: number; stepId: number | null }[];
}
interface Condition {
  name: string;
  met: boolean;
  value: unknown;
  limit: unknown;
  unit: string;
}
interface Gate {
  clear: boolean;
  conditions: Condition[];
  clearAt: number | null;
  settings: { minStoppedS: number; holdS: number; safeOpenTempC: number };
}

/** A real PNG: 24 x 16 pixels, RGB, a grey filter body on a light base, deflated with zlib. */
function makePng(): Buffer {
  const w = 24,
    h = 16;
  const crcTable = Array.from({ length: 256 }, (_, n) => {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    return c >>> 0;
  });
  const crc = (buf: Buffer) => {
    let c = 0xffffffff;
    for (const b of buf) c = crcTable[(c ^ b) & 0xff] ^ (c >>> 8);
    return (c ^ 0xffffffff) >>> 0;
  };
  const chunk = (type: string, data: Buffer) => {
    const len = Buffer.alloc(4);
    len.writeUInt32BE(data.length);
    const body = Buffer.concat([Buffer.from(type, 'ascii'), data]);
    const sum = Buffer.alloc(4);
    sum.writeUInt32BE(crc(body));
    return Buffer.concat([len, body, sum]);
  };
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(w, 0);
  ihdr.writeUInt32BE(h, 4);
  ihdr.writeUInt8(8, 8); // bit depth
  ihdr.writeUInt8(2, 9); // RGB
  const raw = Buffer.alloc((w * 3 + 1) * h);
  for (let y = 0; y < h; y++) {
    raw[y * (w * 3 + 1)] = 0; // filter: none
    for (let x = 0; x < w; x++) {
      const body = x > 6 && x < 17 && y > 2;
      const v = body ? 90 : 225;
      raw.set([v, v, body ? 100 : 230], y * (w * 3 + 1) + 1 + x * 3);
    }
  }
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', zlib.deflateSync(raw)),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

/** Full-page screenshot from the top (a scrolled page would draw the app bar mid-page). */
async function shot(page: Page, name: string): Promise<void> {
  await page.evaluate(() => window.scrollTo(0, 0));
  await pageShot(page, name);
}

/** Screenshot of one part of the page: the opening check and the gated step, readable at full size. */
async function shotOf(target: Locator, name: string): Promise<void> {
  fs.mkdirSync(SHOTS, { recursive: true });
  await target.scrollIntoViewIfNeeded();
  await target.screenshot({ path: path.join(SHOTS, `${name}.png`) });
}

/** Poll an async check until it gives a value (condition wait, not a fixed sleep). */
async function until<T>(check: () => Promise<T | null | undefined | false>, timeoutMs: number, what: string): Promise<T> {
  const end = Date.now() + timeoutMs;
  let last: unknown = null;
  while (Date.now() < end) {
    try {
      const v = await check();
      if (v) return v;
    } catch (err) {
      last = err;
    }
    await new Promise((r) => setTimeout(r, 500));
  }
  throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}${last ? `: ${String(last)}` : ''}`);
}

describe('work order with the live opening check (planner and technician)', () => {
  let stack: Stack;
  let browser: Browser;
  let plannerCtx: BrowserContext;
  let techCtx: BrowserContext;
  let planner: Page;
  let tech: Page;
  let engineId: number;
  let alarmId: number;
  let orderId: number;
  let techToken: string;
  let plannerToken: string;
  let order: Order;
  let stoppedAt = 0;

  const gatedSteps = () => order.steps.filter((s) => s.gated);
  const stepItem = (page: Page, s: Step): Locator => page.locator('li.step').nth(order.steps.findIndex((x) => x.id === s.id));
  const reloadOrder = async () => (order = (await stack.api<Order>('GET', `/api/work-orders/${orderId}`, techToken)).body);
  const gate = async () => (await stack.api<Gate>('GET', `/api/engines/${engineId}/opening-check`, techToken)).body;

  before(async () => {
    fs.mkdirSync(OUT, { recursive: true });
    stack = await startStack({
      simulatorArgs: ['--rate', '1', '--speed', SPEED, '--seed', '7'],
      env: { OPENING_MIN_STOPPED_S: String(MIN_STOPPED_S), OPENING_HOLD_S: String(HOLD_S) },
    });
    plannerToken = await stack.login(ACCOUNTS.planner);
    techToken = await stack.login(ACCOUNTS.technician);
    const engines = (await stack.api<{ id: number; name: string; heaterSetpointC: number | null }[]>('GET', '/api/engines', plannerToken)).body;
    const engine = engines.find((e) => e.name === ENGINE_NAME);
    assert.ok(engine, `demo engine ${ENGINE_NAME} exists`);
    engineId = engine.id;
    browser = await launchBrowser();
    plannerCtx = await browser.newContext({ viewport: { width: 1366, height: 900 } });
    techCtx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    planner = await plannerCtx.newPage();
    tech = await techCtx.newPage();
  });

  after(async () => {
    await browser?.close();
    await stack?.stop();
  });

  it('raises an alarm when the simulator overheats the running engine', async () => {
    await stack.control(`/engines/${engineId}/scenario`, { name: 'overheat' });
    type Alarm = { id: number; engineId: number; ruleKey?: string; title: string };
    const alarm = await until(
      async () => {
        const res = await stack.api<Alarm[] | { alarms: Alarm[] }>('GET', `/api/alarms?engineId=${engineId}`, plannerToken);
        const list = Array.isArray(res.body) ? res.body : res.body.alarms;
        return list.find((a) => /coolant temperature/i.test(a.title));
      },
      60000,
      'a coolant temperature alarm on the overheating engine',
    );
    alarmId = alarm.id;
  });

  it('the planner turns the alarm into a filter change from the alarm page and assigns the technician', async () => {
    await signIn(planner, stack, ACCOUNTS.planner);
    await planner.goto(`${stack.baseUrl}/alarms`);
    await planner
      .locator('jw-alarm-row', { hasText: ENGINE_NAME })
      .first()
      .getByRole('link', { name: /coolant temperature/i })
      .click();
    await planner.waitForURL(/\/alarms\/\d+$/);
    alarmId = Number(new URL(planner.url()).pathname.split('/').pop()); // the alarm the planner opened
    await planner.getByRole('heading', { name: /coolant temperature/i }).waitFor();
    await shot(planner, 'wo-01-alarm');

    // a short dialog first: the kind suggested by the alarm's rule, the technician and the due date
    await planner.getByRole('button', { name: /create work order/i }).click();
    const dialog = await openDialog(planner);
    await dialog.getByText(/^Alarm #\d+/).waitFor();
    await dialog.getByRole('heading', { name: new RegExp(ENGINE_NAME) }).waitFor();
    // an overheating engine suggests a leak check (shared/alarms/work-kind.ts); here the planner picks the filter change
    await assertSelectShows(planner, 'Kind of work', /leak check/i);
    await dialog.getByRole('combobox', { name: 'Kind of work' }).click();
    await planner.getByRole('option', { name: /coolant filter change/i }).click();
    await dialog.getByRole('combobox', { name: 'Assign to' }).click();
    await planner.getByRole('option', { name: 'Tobias Renwick' }).click();
    await fillChecked(dialog.getByLabel('Due date'), '12/24/2026');
    await shot(planner, 'wo-02-create-dialog-from-alarm');
    await planner.setViewportSize({ width: 820, height: 900 });
    await shot(planner, 'wo-02a-create-dialog-820');
    const box = await dialog.boundingBox();
    assert.ok(box && box.x >= 0 && box.x + box.width <= 820, `the dialog fits 820 px (${JSON.stringify(box)})`);
    await planner.setViewportSize({ width: 1366, height: 900 });
    await dialog.getByRole('button', { name: 'Create', exact: true }).click();
    await planner.waitForURL(/\/work\/\d+$/);
    orderId = Number(new URL(planner.url()).pathname.split('/').pop());
    await planner.getByRole('heading', { name: new RegExp(`#${orderId}`) }).waitFor();

    await reloadOrder();
    assert.equal(order.engineId, engineId);
    assert.equal(order.status, 'planned', 'a planner’s order is planned at once');
    assert.ok(order.assigneeId, 'assigned');
    assert.equal((order as unknown as { dueDate: string | null }).dueDate, '2026-12-24', 'the due date from the dialog, whole');
    assert.equal((order as unknown as { kind: string }).kind, 'filter-change');
    assert.ok(order.alarmIds.includes(alarmId), `alarm #${alarmId} linked to the order`);
    assert.ok(gatedSteps().length >= 1, 'the filter change has gated steps');
    await planner.getByText('Assignee: Tobias Renwick').waitFor();
    await shot(planner, 'wo-03-order-planned');
  });

  it('the technician opens it from My work, starts it and finds the gated step locked while hot', async () => {
    await signIn(tech, stack, ACCOUNTS.technician);
    await tech.goto(`${stack.baseUrl}/work/mine`);
    const card = tech.getByRole('link', { name: new RegExp(`^Work order ${orderId}:`) });
    await card.waitFor();
    await shot(tech, 'wo-04-my-work');
    await card.click();
    await tech.waitForURL(new RegExp(`/work/${orderId}$`));
    await tech.getByRole('button', { name: 'Start work' }).click();
    await tech.getByText('In progress', { exact: true }).first().waitFor();
    // marker: if the page reloads, it is gone
    await tech.evaluate(() => ((window as unknown as { jwNoReload: boolean }).jwNoReload = true));

    // lockout/tagout is confirmed on the step that says to lock out, and carried to the gated steps
    const lock = stepItem(
      tech,
      order.steps.find((s) => s.key === 'stop-and-lock-out')!,
    );
    await lock.getByRole('button', { name: /Mark done/ }).click();
    await lock.locator('.badge.done').waitFor();
    const first = stepItem(tech, gatedSteps()[0]);
    await first.getByText(/Lockout\/tagout confirmed on step \d+/).waitFor();
    const panel = tech.getByRole('region', { name: 'Opening check' });
    await panel.getByText('Not clear: keep the cooling system closed').waitFor();
    await panel.locator('li', { hasText: 'Coolant cool enough' }).getByText('Not met').waitFor();
    await panel.locator('li', { hasText: 'Lockout/tagout confirmed' }).getByText('Met', { exact: true }).waitFor({ timeout: 15000 });
    const hotText = await panel.locator('.live').innerText();
    const hot = Number(/Coolant\s*([\d.]+)\s*°C/.exec(hotText)?.[1]);
    assert.ok(hot > 50, `live coolant temperature shown above the limit (${hotText})`);
    assert.equal((await first.locator('.badge').innerText()).trim().replace(/^lock\s*/, ''), 'Locked');
    assert.ok(await first.getByRole('button', { name: /Locked/ }).isDisabled(), 'the step button is locked');
    await shot(tech, 'wo-05-locked-running-hot');
    await shotOf(tech.locator('.gate'), 'wo-05a-gate-running-hot');
    await shotOf(first, 'wo-05b-gated-step-locked');
  });

  it('the server refuses the gated step while hot when the browser is bypassed (409 with the conditions)', async () => {
    const g = await gate();
    assert.equal(g.settings.minStoppedS, MIN_STOPPED_S, 'the route uses OPENING_MIN_STOPPED_S');
    assert.equal(g.settings.holdS, HOLD_S, 'the route uses OPENING_HOLD_S');
    const step = gatedSteps()[0];
    const res = await stack.api<{ error: string; conditions: Condition[]; objections: { name: string }[] }>(
      'POST',
      `/api/work-orders/${orderId}/steps/${step.id}/complete`,
      techToken,
      { lockoutConfirmed: true },
    );
    assert.equal(res.status, 409);
    const names = res.body.conditions.map((c) => c.name);
    assert.ok(names.includes('coolant-temperature'), `unmet conditions named: ${names.join(', ')}`);
    assert.ok(names.includes('engine-stopped'), 'the engine is still running');
    const temp = res.body.conditions.find((c) => c.name === 'coolant-temperature')!;
    assert.ok(Number(temp.value) > Number(temp.limit), 'the refusal carries the value and the limit');
    await reloadOrder();
    assert.equal(order.steps.find((s) => s.id === step.id)!.doneAt, null, 'the step was not recorded');
  });

  it('stops the engine: still locked, with a predicted clear time while it cools', async () => {
    await stack.control(`/engines/${engineId}/stop`);
    stoppedAt = Date.now();
    const panel = tech.getByRole('region', { name: 'Opening check' });
    await panel.getByText(/Forecast: clear in about \d+ min/).waitFor({ timeout: 45000 });
    const text = await panel.innerText();
    assert.match(text, /Not clear/);
    assert.match(text, /Coolant\s*[\d.]+\s*°C/);
    const g = await gate();
    assert.equal(g.clear, false);
    assert.ok(g.clearAt && g.clearAt > Date.now(), 'the server predicts a clear time in the future');
    const first = stepItem(tech, gatedSteps()[0]);
    assert.match(await first.locator('.badge').innerText(), /Locked/);
    await shot(tech, 'wo-06-locked-cooling-predicted');
    await shotOf(tech.locator('.gate'), 'wo-06a-gate-cooling-predicted');

    // still refused by the server while it cools
    const res = await stack.api('POST', `/api/work-orders/${orderId}/steps/${gatedSteps()[0].id}/complete`, techToken, { lockoutConfirmed: true });
    assert.equal(res.status, 409);
  });

  it('unlocks by itself, without a reload, once the check is clear and held', async () => {
    const first = stepItem(tech, gatedSteps()[0]);
    // what the server predicts while it cools (printed for the report; the prediction is an aid, not a gate)
    const predictions: string[] = [];
    const predictedAt: number[] = [];
    let clearSeenAt: number | undefined; // when the server first answered "clear" (polled every 2 s)
    const note = (g: Gate) => {
      const value = (name: string) => Number(g.conditions.find((c) => c.name === name)?.value).toFixed(1);
      if (g.clearAt && !g.clear) predictedAt.push(g.clearAt);
      if (g.clear) clearSeenAt ??= Date.now();
      const what = g.clear ? 'clear' : g.clearAt ? `clear in ${Math.round((g.clearAt - Date.now()) / 1000)} s` : 'no prediction';
      predictions.push(`${Math.round((Date.now() - stoppedAt) / 1000)} s: ${what} (${value('coolant-temperature')} °C, ${value('coolant-pressure')} kPa)`);
    };
    const watch = setInterval(() => {
      void gate().then(note, () => undefined);
    }, 2000);
    try {
      await first.locator('.badge', { hasText: 'Unlocked' }).waitFor({ timeout: 4 * 60000 });
    } finally {
      clearInterval(watch);
      console.log(`# predictions after the stop: ${predictions.join('; ')}`);
    }
    const unlockedAt = Date.now();
    const took = Math.round((unlockedAt - stoppedAt) / 1000);
    // the prediction may be pessimistic, never much too early: it must not invite opening before the check clears.
    // Compared with when the server said clear (not when the page showed it, which a busy machine delays);
    // slack: the server is asked every 2 s and the readings arrive once a second.
    const clearedAt = Math.min(clearSeenAt ?? Infinity, unlockedAt);
    assert.ok(predictedAt.length >= 3, `predictions seen while cooling: ${predictions.join('; ')}`);
    for (const t of predictedAt) assert.ok(t >= clearedAt - 15000, `a prediction ${Math.round((clearedAt - t) / 1000)} s before the actual clear`);
    assert.ok(took >= MIN_STOPPED_S + HOLD_S, `not before the engine was stopped ${MIN_STOPPED_S} s and held ${HOLD_S} s (took ${took} s)`);
    assert.equal(await tech.evaluate(() => (window as unknown as { jwNoReload?: boolean }).jwNoReload), true, 'the page was not reloaded');
    const panel = tech.getByRole('region', { name: 'Opening check' });
    await panel.getByText('Clear: the cooling system may be opened').waitFor();
    const g = await gate();
    const temp = g.conditions.find((c) => c.name === 'coolant-temperature')!;
    assert.ok(Number(temp.value) <= g.settings.safeOpenTempC, `coolant at or below ${g.settings.safeOpenTempC} °C (${String(temp.value)})`);
    await shot(tech, 'wo-07-unlocked');
    await shotOf(tech.locator('.gate'), 'wo-07a-gate-clear');
    await shotOf(first, 'wo-07b-gated-step-unlocked');
    console.log(`# unlocked ${took} s after the stop`);
  });

  it('the technician records the steps, the parts the additive rule asks for and a photo, and completes the order', async () => {
    // the latest additive test decides the filter: in range -> charged (shared/coolant/additive.ts)
    const test = await stack.api<{ decision: { additive: { filter: 'charged' | 'blank' | null } | null } }>(
      'POST',
      `/api/engines/${engineId}/coolant-tests`,
      techToken,
      { method: 'strip', scaUnitsPerGal: 2.0, glycolPercent: 45, notes: 'strip test before the filter change' },
    );
    assert.equal(test.status, 201, JSON.stringify(test.body));
    const filter = test.body.decision.additive?.filter;
    assert.equal(filter, 'charged', 'additive in range: the rule asks for a charged filter');

    const values: Record<string, number> = { 'fit-filter': 0.75, refill: 1.5 };
    // a draft survives a reload: typed, saved on the server as typed, and there again after the reload
    const fit = stepItem(
      tech,
      order.steps.find((s) => s.key === 'fit-filter')!,
    );
    await fit.getByLabel('Value').fill('0.75');
    await fit.getByLabel('Remark').fill('three quarters of a turn');
    await fit.getByText('Draft saved').waitFor();
    await until(
      async () => {
        const o = (await stack.api<Order>('GET', `/api/work-orders/${orderId}`, techToken)).body;
        const st = o.steps.find((s) => s.key === 'fit-filter')!;
        return st.resultValue === 0.75 && st.resultText === 'three quarters of a turn' && st.doneAt === null;
      },
      10000,
      'the draft on the server',
    );
    await tech.reload();
    await stepItem(
      tech,
      order.steps.find((s) => s.key === 'fit-filter')!,
    )
      .getByLabel('Remark')
      .waitFor();
    assert.equal(
      await stepItem(
        tech,
        order.steps.find((s) => s.key === 'fit-filter')!,
      )
        .getByLabel('Value')
        .inputValue(),
      '0.75',
      'the drafted value after a reload',
    );
    assert.equal(
      await stepItem(
        tech,
        order.steps.find((s) => s.key === 'fit-filter')!,
      )
        .getByLabel('Remark')
        .inputValue(),
      'three quarters of a turn',
      'the drafted remark after a reload',
    );
    await shot(tech, 'wo-07c-draft-after-reload');
    for (const s of order.steps) {
      if (s.optional && s.input !== 'photo') continue;
      if (s.key === 'stop-and-lock-out') continue; // done above
      const li = stepItem(tech, s);
      if (s.input === 'value' && s.key !== 'fit-filter') await li.getByLabel('Value').fill(String(values[s.key] ?? 1));
      if (s.input === 'photo') {
        await li.locator('input[type=file]').setInputFiles({ name: 'fitted-filter.png', mimeType: 'image/png', buffer: makePng() });
        await li.locator('jw-attachment-thumb').waitFor();
      }
      if (s.key === 'remove-filter') await li.getByLabel('Remark').fill('old gasket came off with the filter');
      await li.getByRole('button', { name: /Mark done/ }).click();
      await li.locator('.badge.done').waitFor();
    }
    await reloadOrder();
    assert.equal(order.steps.find((s) => s.key === 'fit-filter')?.resultValue, 0.75);
    for (const s of gatedSteps()) assert.ok(s.doneAt, `gated step ${s.key} done`);

    await tech.getByRole('combobox', { name: 'What' }).click();
    await tech.getByRole('option', { name: filter === 'charged' ? 'Charged filter' : 'Blank filter' }).click();
    await tech.getByLabel('Quantity').fill('1');
    await tech.getByLabel('Description').fill('spin-on coolant filter');
    await tech.getByRole('button', { name: 'Record' }).click();
    await tech
      .locator('table.parts')
      .getByText(filter === 'charged' ? 'Charged filter' : 'Blank filter')
      .waitFor();
    await tech.getByRole('combobox', { name: 'What' }).click();
    await tech.getByRole('option', { name: 'Coolant' }).click();
    await tech.getByLabel('Quantity').fill('1.5');
    await tech.getByLabel('Description').fill('premixed 50/50 ethylene glycol');
    await tech.getByRole('button', { name: 'Record' }).click();
    await tech.getByRole('row', { name: /^Coolant 1\.5 L/ }).waitFor();
    await shot(tech, 'wo-08-steps-and-parts-recorded');

    await tech.getByRole('button', { name: /send for sign-off/ }).click();
    await tech.getByText('Waiting for sign-off', { exact: true }).first().waitFor();
    await shot(tech, 'wo-09-waiting-sign-off');
    await reloadOrder();
    assert.equal(order.status, 'waiting-sign-off');
    assert.deepEqual(order.parts.map((p) => p.kind).sort(), ['coolant', 'filter-charged']);
    assert.equal(order.attachments.filter((a) => a.stepId === order.steps.find((s) => s.key === 'photo')!.id).length, 1, 'the photo is on its step');
  });

  it('the planner signs off and the service record prints without the app shell', async () => {
    await planner.goto(`${stack.baseUrl}/work/${orderId}`);
    await planner.getByRole('button', { name: 'Sign off and close' }).click();
    await planner.getByText('Closed', { exact: true }).first().waitFor();
    await shot(planner, 'wo-10-signed-off');
    assert.equal((await stack.api<Order>('GET', `/api/work-orders/${orderId}`, plannerToken)).body.status, 'closed');

    await planner.goto(`${stack.baseUrl}/work/${orderId}/record`);
    const record = planner.locator('.jw-record');
    await record.getByText('Charged filter').waitFor();
    const text = await record.innerText();
    assert.match(text, /0\.75 turns/);
    assert.match(text, /Opening check clear at/);
    assert.match(text, /old gasket came off with the filter/);
    assert.ok(await planner.locator('mat-toolbar.app-bar').isVisible(), 'on screen the shell is there');

    await planner.emulateMedia({ media: 'print' });
    assert.equal(await planner.locator('mat-toolbar.app-bar').isVisible(), false, 'print hides the app bar');
    assert.equal(await planner.locator('mat-sidenav').isVisible(), false, 'print hides the navigation');
    assert.ok(await record.isVisible());
    await shot(planner, 'wo-11-record-print');
    const pdfFile = path.join(OUT, 'work-order-record.pdf');
    await planner.pdf({ path: pdfFile, format: 'A4', printBackground: true });
    const pdf = fs.readFileSync(pdfFile);
    assert.ok(pdf.length > 5000, `PDF has content (${pdf.length} bytes)`);
    assert.equal(pdf.subarray(0, 5).toString('latin1'), '%PDF-');
    await planner.emulateMedia({ media: 'screen' });
  });
});

/** A Material select shows the wanted option as its value (pre-filled from the link). */
async function assertSelectShows(page: Page, label: string, want: string | RegExp): Promise<void> {
  const select = page.getByRole('combobox', { name: label });
  const matches = (t: string) => (typeof want === 'string' ? t.includes(want) : want.test(t));
  await until(async () => matches(await select.innerText()), 10000, `${label} showing ${String(want)}`);
}
