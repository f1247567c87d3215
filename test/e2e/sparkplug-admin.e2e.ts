/**
 * The administrator gives a gateway its Sparkplug B identity and maps the metric names it already
 * uses to our channels, in Chromium; the gateway (an MQTT client publishing a Sparkplug B NBIRTH, the
 * payload built with shared/sparkplug/encode.ts from the specification's field numbers) then has its
 * named metric stored as the engine's reading, in the mapped unit converted to °C.
 * 180 °F = 82.22 °C (NIST SP 811, t/°C = (t/°F - 32) / 1.8).
 */
import assert from 'node:assert/strict';
import { after, before, describe, it } from 'node:test';
import mqtt, { type MqttClient } from 'mqtt';
import type { Browser, Page } from 'playwright-core';
import { encodeSparkplugPayload } from '../../shared/sparkplug/encode';
import { DataType } from '../../shared/sparkplug/schema';
import { ACCOUNTS, fillChecked, launchBrowser, openDialog, pickOption, shot, signIn, startStack, waitUntil, type Stack } from './harness';

const GROUP = 'plant-basement';
const NODE = 'edge-7';
const METRIC = 'Engine/Coolant/Temp';

interface ApiDevice {
  id: number;
  username: string;
  engineId: number;
  sparkplug: { groupId: string; edgeNodeId: string; deviceId: string | null } | null;
  metricMap: Record<string, unknown> | null;
}

describe('Sparkplug B identity and metric names of a gateway (administrator)', () => {
  let stack: Stack;
  let browser: Browser;
  let page: Page;
  let adminToken: string;
  let engine: { id: number; name: string };
  let device: { username: string; secret: string };
  let client: MqttClient | null = null;

  before(async () => {
    stack = await startStack({ simulate: false });
    browser = await launchBrowser();
    adminToken = await stack.login(ACCOUNTS.admin);
    const engines = await stack.api<{ id: number; siteId: number }[]>('GET', '/api/engines', adminToken);
    const created = await stack.api<{ id: number; name: string }>('POST', '/api/engines', adminToken, {
      siteId: engines.body[0].siteId,
      name: 'Compressor engine north',
      capacityL: 30,
    });
    assert.equal(created.status, 201);
    engine = created.body;
    page = await (await browser.newContext({ viewport: { width: 1366, height: 900 } })).newPage();
  });

  after(async () => {
    await client?.endAsync();
    await browser?.close();
    await stack?.stop();
  });

  it('adds a device with a Sparkplug identity', async () => {
    await signIn(page, stack, ACCOUNTS.admin);
    await page.goto(`${stack.baseUrl}/admin/devices`);
    await page.getByRole('table', { name: 'Devices' }).getByRole('row').nth(1).waitFor();
    await page.getByRole('button', { name: 'Add device' }).click();
    const dlg = await openDialog(page); // the focus inside first: typing before that could land in another field
    await pickOption(page, dlg.getByRole('combobox', { name: /^Engine/ }), engine.name);
    // an edge node alone is not an identity: both are asked for
    await fillChecked(dlg.getByLabel('Edge node id'), NODE);
    await dlg.getByRole('button', { name: 'Add device' }).click();
    await dlg.getByText('Needed for a Sparkplug gateway.').waitFor();
    await fillChecked(dlg.getByLabel('Group id'), GROUP);
    await shot(page, 'sparkplug-01-add-device');
    await dlg.getByRole('button', { name: 'Add device' }).click();

    const secretDlg = page.getByRole('dialog').filter({ hasText: 'Shown only now' });
    await secretDlg.waitFor();
    device = {
      secret: ((await secretDlg.getByTestId('secret').textContent()) ?? '').trim(),
      username: ((await secretDlg.locator('dd code').first().textContent()) ?? '').trim(),
    };
    await secretDlg.getByRole('button', { name: 'I have stored it' }).click();
    await secretDlg.waitFor({ state: 'detached' });
    const row = page.getByRole('table', { name: 'Devices' }).getByRole('row').filter({ hasText: device.username });
    await row.getByText(`${GROUP} / ${NODE}`).waitFor();
    await row.getByText('channel keys as names').waitFor();
  });

  it('maps a metric name the gateway uses to a channel with its unit', async () => {
    const row = page.getByRole('table', { name: 'Devices' }).getByRole('row').filter({ hasText: device.username });
    await row.getByRole('button', { name: 'Metric names' }).click();
    const dlg = await openDialog(page);
    await fillChecked(dlg.getByLabel('Metric name'), METRIC);
    await pickOption(page, dlg.getByRole('combobox', { name: 'Channel' }), 'Coolant temperature (coolant_temp)');
    await pickOption(page, dlg.getByRole('combobox', { name: 'Unit if not sent' }), '°F');
    await shot(page, 'sparkplug-02-metric-names');
    await dlg.getByRole('button', { name: 'Save names' }).click();
    await dlg.waitFor({ state: 'detached' });
    await row.getByText('1 mapped name').waitFor();
    await shot(page, 'sparkplug-03-devices');
    const devices = await stack.api<ApiDevice[]>('GET', '/api/devices', adminToken);
    const d = devices.body.find((x) => x.username === device.username)!;
    assert.deepEqual(d.sparkplug, { groupId: GROUP, edgeNodeId: NODE, deviceId: null });
    assert.deepEqual(d.metricMap, { [METRIC]: { channel: 'coolant_temp', unit: 'degF' } });
  });

  it('the gateway then reports under that name; the value in °F is stored in °C', async () => {
    client = await mqtt.connectAsync(`mqtt://127.0.0.1:${stack.mqttPort}`, {
      username: device.username,
      password: device.secret,
      protocolVersion: 4,
      clientId: `e2e-${device.username}`,
      reconnectPeriod: 0,
    });
    const birth = encodeSparkplugPayload({
      timestamp: Date.now(),
      seq: 0,
      metrics: [
        { name: 'bdSeq', datatype: DataType.Int64, value: 0 },
        { name: METRIC, alias: 1, timestamp: Date.now(), value: 180 },
      ],
    });
    await client.publishAsync(`spBv1.0/${GROUP}/NBIRTH/${NODE}`, Buffer.from(birth), { qos: 0 });
    let latest: number | null = null;
    await waitUntil(
      async () => {
        const e = await stack.api<{ latest: { coolant_temp?: { value: number } } }>('GET', `/api/engines/${engine.id}`, adminToken);
        latest = e.body.latest.coolant_temp?.value ?? null;
        return latest !== null;
      },
      { timeoutMs: 20000, what: 'the mapped metric stored as coolant_temp' },
    );
    assert.ok(Math.abs(latest! - (180 - 32) / 1.8) < 1e-6, `180 °F stored as ${latest} °C`);
  });
});
