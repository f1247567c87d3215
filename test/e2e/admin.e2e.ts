/**
 * Administration through the UI: the four admin screens; a new engine typed in US units (stored in SI), a
 * device for it whose one-time secret is read from the dialog, then readings published over MQTT with those
 * credentials bring the new engine alive on the fleet board and its engine page. A bad capacity is refused
 * on its field. (That an operator is refused these pages is checked in fleet.e2e.ts.)
 */
import assert from 'node:assert/strict';
import { after, before, describe, it } from 'node:test';
import mqtt, { type MqttClient } from 'mqtt';
import type { Browser, Page } from 'playwright-core';
import { ACCOUNTS, fillChecked, launchBrowser, openDialog, pickOption, shot, signIn, startStack, waitUntil, type Stack } from './harness';

// The engine typed into the form, in US units, and what the API must store in SI.
// Conversions: 1 US gal = 3.785411784 L, 1 psi = 6.894757293 kPa (NIST SP 811, appendix B); °C = (°F − 32) / 1.8.
const NEW_ENGINE = {
  name: 'Trial fire-pump engine',
  capacityGal: '52.5', // 198.73 L
  capPsi: '15', // 103.42 kPa
  glycolPercent: '40',
  oilDrainH: '500',
  runHours: '120',
  safeOpenF: '113', // 45 °C
  heaterF: '104', // 40 °C
};

interface ApiEngine {
  id: number;
  name: string;
  siteId: number;
  duty: string;
  capacityL: number;
  capPressureKpa: number;
  coolantFamily: string;
  glycolType: string;
  glycolPercent: number;
  oilDrainIntervalH: number;
  runHours: number;
  safeOpenTempC: number;
  heaterSetpointC: number | null;
  runState: string;
}

describe('administration (admin)', () => {
  let stack: Stack;
  let browser: Browser;
  let page: Page;
  let adminToken: string;
  let engine: ApiEngine;
  let device: { username: string; secret: string };
  let client: MqttClient | null = null;
  let publisher: NodeJS.Timeout | null = null;

  before(async () => {
    [stack, browser] = await Promise.all([startStack({ simulate: false }), launchBrowser()]);
    adminToken = await stack.login(ACCOUNTS.admin);
    page = await browser.newPage({ viewport: { width: 1366, height: 900 } });
    page.setDefaultTimeout(30000); // the machine is shared: generous, but well under the test's own budget
    await signIn(page, stack, ACCOUNTS.admin);
  });

  after(async () => {
    if (publisher) clearInterval(publisher);
    await client?.endAsync().catch(() => undefined);
    await browser?.close();
    await stack?.stop();
  });

  it('shows the users and sites screens', async () => {
    await page.goto(`${stack.baseUrl}/admin/users`);
    const users = page.getByRole('table', { name: 'Users' });
    const userRow = (email: string) => users.getByRole('row').filter({ has: page.getByRole('cell', { name: email, exact: true }) });
    await userRow(ACCOUNTS.operator).waitFor();
    for (const email of Object.values(ACCOUNTS)) assert.equal(await userRow(email).count(), 1, email);
    await shot(page, 'admin-users');

    await page.getByRole('tab', { name: 'Sites' }).click();
    const sites = (await stack.api<{ name: string }[]>('GET', '/api/sites', adminToken)).body;
    const table = page.getByRole('table', { name: 'Sites' });
    for (const s of sites) await table.getByRole('row').filter({ hasText: s.name }).first().waitFor();
    await shot(page, 'admin-sites');
  });

  it('adds an engine typed in US units, refusing a bad capacity on its field', async () => {
    await page.goto(`${stack.baseUrl}/settings`);
    await page.locator('mat-button-toggle', { hasText: 'US customary' }).locator('button').click();
    await page.getByText('200 L shows as 52.8').waitFor();

    await page.goto(`${stack.baseUrl}/admin/engines`);
    await page.getByRole('table', { name: 'Engines' }).getByRole('row').nth(1).waitFor();
    await page.getByRole('button', { name: 'Add engine' }).click();
    const dlg = await openDialog(page); // open, and the focus inside: typing before that could land in another field
    await dlg.getByRole('heading', { name: 'Add an engine' }).waitFor();

    const sites = (await stack.api<{ id: number; name: string }[]>('GET', '/api/sites', adminToken)).body;
    const site = sites[sites.length - 1];
    const choose = (label: RegExp, option: string) => pickOption(page, dlg.getByRole('combobox', { name: label }), option, { exact: true });
    await fillChecked(dlg.getByLabel(/^Name/), NEW_ENGINE.name);
    await choose(/^Site/, site.name);
    await choose(/^Duty/, 'Standby');
    await choose(/^Coolant/, 'Conventional (with SCA)');
    await choose(/^Glycol$/, 'Propylene glycol');
    await fillChecked(dlg.getByLabel(/^Glycol by volume/), NEW_ENGINE.glycolPercent);
    const capacity = dlg.getByLabel(/^Cooling-system capacity/);
    // The inputs say their unit: the user's US units.
    const field = (label: string) => dlg.locator('mat-form-field').filter({ hasText: label });
    assert.match((await field('Cooling-system capacity').textContent()) ?? '', /US gal/);
    assert.match((await field('Pressure cap rating').textContent()) ?? '', /psi/);
    assert.match((await field('Coolant safe to open below').textContent()) ?? '', /°F/);

    // A capacity beyond the limit (5000 L = 1320.86 US gal) is refused on the field, in the field's unit.
    await fillChecked(capacity, '2000');
    await dlg.getByRole('button', { name: 'Add engine' }).click();
    const capError = field('Cooling-system capacity').locator('mat-error');
    await capError.waitFor();
    assert.match((await capError.textContent()) ?? '', /At most 1320\.8\d? US gal/);
    await fillChecked(capacity, '0');
    await dlg.getByRole('button', { name: 'Add engine' }).click();
    await capError.filter({ hasText: /At least/ }).waitFor();
    assert.equal(
      (await stack.api<ApiEngine[]>('GET', '/api/engines', adminToken)).body.some((e) => e.name === NEW_ENGINE.name),
      false,
      'nothing stored',
    );
    await shot(page, 'admin-engine-form-bad-capacity');

    await fillChecked(capacity, NEW_ENGINE.capacityGal);
    await fillChecked(dlg.getByLabel(/^Pressure cap rating/), NEW_ENGINE.capPsi);
    await fillChecked(dlg.getByLabel(/^Oil-drain interval/), NEW_ENGINE.oilDrainH);
    await fillChecked(dlg.getByLabel(/^Run hours/), NEW_ENGINE.runHours);
    await fillChecked(dlg.getByLabel(/^Coolant safe to open below/), NEW_ENGINE.safeOpenF);
    await dlg.getByLabel('Has a jacket-water heater').check();
    await fillChecked(dlg.getByLabel(/^Heater setpoint/), NEW_ENGINE.heaterF);
    await capError.waitFor({ state: 'detached' }); // the capacity error is gone
    await shot(page, 'admin-engine-form');
    await dlg.getByRole('button', { name: 'Add engine' }).click();
    await dlg.waitFor({ state: 'detached' });

    const row = page.getByRole('table', { name: 'Engines' }).getByRole('row').filter({ hasText: NEW_ENGINE.name });
    await row.waitFor();
    assert.match((await row.textContent()) ?? '', /52\.5\d? US gal/);
    await shot(page, 'admin-engines');

    const found = (await stack.api<ApiEngine[]>('GET', '/api/engines', adminToken)).body.find((e) => e.name === NEW_ENGINE.name);
    assert.ok(found, 'engine stored');
    engine = found;
    // Stored in SI whatever the form's units.
    assert.equal(engine.siteId, site.id);
    assert.equal(engine.duty, 'standby');
    assert.equal(engine.coolantFamily, 'conventional');
    assert.equal(engine.glycolType, 'propylene');
    assert.equal(engine.glycolPercent, 40);
    assert.ok(Math.abs(engine.capacityL - 52.5 * 3.785411784) < 0.01, `capacity ${engine.capacityL} L`);
    assert.ok(Math.abs(engine.capPressureKpa - 15 * 6.894757293) < 0.01, `cap ${engine.capPressureKpa} kPa`);
    assert.equal(engine.oilDrainIntervalH, 500);
    assert.equal(engine.runHours, 120);
    assert.ok(Math.abs(engine.safeOpenTempC - 45) < 0.01, `safe to open ${engine.safeOpenTempC} °C`);
    assert.ok(engine.heaterSetpointC !== null && Math.abs(engine.heaterSetpointC - 40) < 0.01, `heater ${engine.heaterSetpointC} °C`);
  });

  it('adds a device for it and shows its secret once', async () => {
    await page.getByRole('tab', { name: 'Devices' }).click();
    await page.getByRole('table', { name: 'Devices' }).getByRole('row').nth(1).waitFor();
    await shot(page, 'admin-devices');
    await page.getByRole('button', { name: 'Add device' }).click();
    const dlg = await openDialog(page);
    await pickOption(page, dlg.getByRole('combobox', { name: /^Engine/ }), NEW_ENGINE.name, { exact: true });
    await dlg.getByRole('button', { name: 'Add device' }).click();

    const secretDlg = page.getByRole('dialog').filter({ hasText: 'Shown only now' });
    await secretDlg.waitFor();
    const secret = ((await secretDlg.getByTestId('secret').textContent()) ?? '').trim();
    const username = ((await secretDlg.locator('dd code').first().textContent()) ?? '').trim();
    assert.ok(secret.length >= 16, `a secret is shown (${secret.length} characters)`);
    assert.ok(username.length >= 3, 'its user name is shown');
    device = { username, secret };
    await shot(page, 'admin-device-secret');
    await secretDlg.getByRole('button', { name: 'I have stored it' }).click();
    await secretDlg.waitFor({ state: 'detached' });

    const row = page.getByRole('table', { name: 'Devices' }).getByRole('row').filter({ hasText: username });
    await row.waitFor();
    assert.match((await row.textContent()) ?? '', new RegExp(`${NEW_ENGINE.name}.*Active.*never`));
    // The secret lives only in that dialog: the list never carries it.
    const devices = JSON.stringify((await stack.api('GET', '/api/devices', adminToken)).body);
    assert.ok(!devices.includes(secret), 'GET /api/devices does not return the secret');
  });

  it('brings the new engine alive when its device publishes over MQTT', async () => {
    const url = `mqtt://127.0.0.1:${stack.mqttPort}`;
    // A wrong secret is refused by the broker.
    await assert.rejects(
      mqtt.connectAsync(url, { username: device.username, password: device.secret + 'x', protocolVersion: 4, reconnectPeriod: 0, connectTimeout: 5000 }),
    );
    client = await mqtt.connectAsync(url, {
      username: device.username,
      password: device.secret,
      protocolVersion: 4,
      clientId: `e2e-${device.username}`,
      reconnectPeriod: 0,
    });
    const topic = `jw/v1/engines/${engine.id}/telemetry`;
    const publish = () =>
      client!.publishAsync(
        topic,
        JSON.stringify({
          ts: Date.now(),
          values: { coolant_temp: 82.4, coolant_pressure: 96.5, coolant_conductivity: 2400, engine_speed: 1800, ambient_temp: { value: 68, unit: 'degF' } },
        }),
        { qos: 1 },
      );
    await publish();
    publisher = setInterval(() => void publish().catch(() => undefined), 1000);

    await waitUntil(async () => (await stack.api<ApiEngine>('GET', `/api/engines/${engine.id}`, adminToken)).body.runState === 'running', {
      timeoutMs: 20000,
      what: 'the new engine running by its readings',
    });

    await page.goto(`${stack.baseUrl}/fleet`);
    const tile = page.locator('jw-engine-tile', { hasText: NEW_ENGINE.name });
    await tile.filter({ hasText: 'Running' }).waitFor({ timeout: 30000 });
    const tileText = (await tile.textContent()) ?? '';
    // 82.4 °C = 180.3 °F; 96.5 kPa = 14.0 psi (US units chosen above).
    assert.match(tileText, /180\.3\s?°F/);
    assert.match(tileText, /14\.0\s?psi/);
    await tile.scrollIntoViewIfNeeded();
    await shot(page, 'admin-new-engine-on-fleet-board');

    await tile.locator('a').click();
    await page.getByRole('heading', { level: 1, name: NEW_ENGINE.name }).waitFor();
    const values = page.locator('jw-live-values');
    await values.filter({ hasText: '180.3' }).waitFor({ timeout: 30000 });
    const text = (await values.textContent()) ?? '';
    assert.match(text, /180\.3\s?°F/);
    assert.match(text, /14\.0\s?psi/);
    assert.match(text, /2,400\s?µS\/cm/);
    assert.match(text, /1,800\s?rpm/);
    assert.match(text, /68\.0\s?°F/, 'a value sent in °F is stored in °C and shown in °F again');
    await page.getByRole('status').filter({ hasText: 'Running' }).waitFor();
    const facts = (await page.locator('dl.facts').textContent()) ?? '';
    assert.match(facts, /52\.5\d?\s?US gal/);
    assert.match(facts, /Propylene glycol 40 %/);
    await shot(page, 'admin-new-engine-page');

    // The device list now tells when it was last seen.
    await page.goto(`${stack.baseUrl}/admin/devices`);
    const row = page.getByRole('table', { name: 'Devices' }).getByRole('row').filter({ hasText: device.username });
    await row.waitFor();
    assert.doesNotMatch((await row.textContent()) ?? '', /never/);
  });
});
