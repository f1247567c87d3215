/**
 * MQTT_URL with Debian's mosquitto 2 as the external broker and MQTT_DEVICE_ACCOUNTS=dynsec: the server keeps
 * device accounts in the broker's dynamic-security plugin (one role per engine), with real processes.
 * Anonymous clients and wrong passwords are refused, a device cannot publish to another engine's topic,
 * a revoke disconnects the device at once, a server killed and restarted collects from its persistent
 * session everything published meanwhile, and a lost broker shows as degraded in /api/health until the
 * server's back-off reconnect succeeds.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import bcrypt from 'bcryptjs';
import mqtt, { type MqttClient } from 'mqtt';
import { loadJwtSecret } from '../../server/auth/jwt-secret';
import { createTokenService } from '../../server/auth/tokens';
import { telemetryTopic } from '../../shared/topics';
import { mosquittoInstalled, startMosquitto, type Mosquitto } from './support/mosquitto';
import { Db, seedFleet, startServerProcess, type ServerProcess } from './support/telemetry-server';
import type { ApiAnswer } from './support/api-answer';
import { Boolean_, Double, encode, UInt64 } from './support/sparkplug-payload';

jest.setTimeout(120_000);

const itBroker = mosquittoInstalled ? it : it.skip; // needs Debian's mosquitto (installed by .ci/run)

let mq: Mosquitto;
let server: ServerProcess;
let dataDir: string;
let db: Db;
let token: string;
let env: Record<string, string>;
const engines: number[] = [];
const devices: { id: number; username: string; secret: string; engineId: number }[] = [];
const clients: MqttClient[] = [];

const waitFor = async <T>(what: string, fn: () => Promise<T>, ok: (v: T) => boolean, ms = 30_000): Promise<T> => {
  const end = Date.now() + ms;
  for (;;) {
    const v = await fn();
    if (ok(v)) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}; last ${JSON.stringify(v)}`);
    await new Promise((r) => setTimeout(r, 50));
  }
};
const api = async (method: string, p: string, body?: unknown) => {
  const res = await fetch(server.url + p, {
    method,
    headers: { 'content-type': 'application/json', authorization: `Bearer ${token}` },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  return { status: res.status, body: (await res.json()) as ApiAnswer };
};
const stored = async (engineId: number) => Number((await db.get<{ n: number }>('SELECT COUNT(*) AS n FROM readings WHERE engine_id = ?', [engineId])).n);
const health = () => server.health();
const sample = (ts: number) => JSON.stringify({ ts, values: { coolant_temp: 70 } });

/** Connects as a device; rejects with the broker's refusal. */
const connect = async (username?: string, password?: string): Promise<MqttClient> => {
  const c = await mqtt.connectAsync(`mqtt://127.0.0.1:${mq.port}`, {
    username,
    password,
    reconnectPeriod: 0,
    connectTimeout: 5000,
    clientId: `t-${Math.random().toString(16).slice(2)}`,
  });
  clients.push(c);
  return c;
};

beforeAll(async () => {
  if (!mosquittoInstalled) return;
  mq = await startMosquitto();
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-mosq-'));
  env = { MQTT_URL: mq.adminUrl, MQTT_DEVICE_ACCOUNTS: 'dynsec', MQTT_CLIENT_ID: 'jw-server-test' };
  server = await startServerProcess({ dataDir, group: true, env });
  db = new Db(server.databaseUrl);
  const fleet = await seedFleet(db, 2, 'mq'); // engines (their seeded devices exist only in the database)
  engines.push(...fleet.map((f) => f.engineId));
  const now = new Date().toISOString();
  const adminId = await db.run(
    `INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, 'admin', FALSE, ?, ?)`,
    ['mq-admin@example.test', 'Broker admin', bcrypt.hashSync('unused-secret-1', 4), now, now],
  );
  token = createTokenService(loadJwtSecret(dataDir)).sign({ id: adminId, email: 'mq-admin@example.test', role: 'admin' });
  await waitFor('server connected to mosquitto', health, (h) => h.status === 'ok' && h.broker?.connected === true);
  for (const engineId of engines) {
    const res = await api('POST', '/api/devices', { engineId, username: `mq-device-${engineId}` });
    expect(res.status).toBe(201);
    devices.push({ id: res.body.id, username: res.body.username, secret: res.body.secret, engineId });
  }
});

afterAll(async () => {
  for (const c of clients) c.end(true);
  await db?.close();
  await server?.stop('SIGKILL');
  await mq?.remove();
  if (dataDir) fs.rmSync(dataDir, { recursive: true, force: true });
});

itBroker('anonymous clients, unknown users and wrong passwords are refused', async () => {
  await expect(connect()).rejects.toThrow(/not authorized|bad user name or password/i);
  await expect(connect('nobody', 'nothing-here')).rejects.toThrow(/not authorized|bad user name or password/i);
  await expect(connect(devices[0].username, devices[0].secret + 'x')).rejects.toThrow(/not authorized|bad user name or password/i);
});

itBroker('a device stores on its own engine topic; its publish on another engine topic is refused by the broker', async () => {
  const [a, b] = devices;
  const c = await connect(a.username, a.secret);
  const t0 = Date.now() - 60_000;
  await c.publishAsync(telemetryTopic(a.engineId), sample(t0), { qos: 1 });
  await waitFor(
    'own reading stored',
    () => stored(a.engineId),
    (n) => n === 1,
  );
  await c.publishAsync(telemetryTopic(b.engineId), sample(t0 + 1), { qos: 1 }).catch(() => undefined);
  // the next message on its own topic is delivered after the refused one would have been
  await c.publishAsync(telemetryTopic(a.engineId), sample(t0 + 2), { qos: 1 });
  await waitFor(
    'fence stored',
    () => stored(a.engineId),
    (n) => n === 2,
  );
  expect(await stored(b.engineId)).toBe(0);
  expect(mq.log()).toContain(`Denied PUBLISH from ${c.options.clientId}`);
  expect(mq.log()).toContain(`'${telemetryTopic(b.engineId)}'`);
  c.end(true);
});

itBroker(
  'a Sparkplug B gateway account: births and data under its own edge node are stored; another node and the commands are refused by the broker',
  async () => {
    const engineId = engines[1];
    const res = await api('POST', '/api/devices', { engineId, sparkplug: { groupId: 'Waterworks', edgeNodeId: 'gw7', deviceId: 'pump2' } });
    expect(res.status).toBe(201);
    const c = await connect(res.body.username, res.body.secret);
    const before = await stored(engineId);
    const t0 = Date.now() - 20_000;
    const commands: string[] = [];
    c.on('message', (topic) => commands.push(topic));
    await c.subscribeAsync('spBv1.0/Waterworks/NCMD/gw7'); // its own commands: allowed
    await c.publishAsync('spBv1.0/Waterworks/NBIRTH/gw7', encode({ timestamp: t0, seq: 0, metrics: [{ name: 'bdSeq', datatype: UInt64, longValue: 0 }] }));
    await c.publishAsync(
      'spBv1.0/Waterworks/DBIRTH/gw7/pump2',
      encode({ timestamp: t0, seq: 1, metrics: [{ name: 'coolant_temp', alias: 1, datatype: Double, doubleValue: 78 }] }),
    );
    // refused by the broker: another edge node's topic, and a command (only the host sends those)
    await c.publishAsync('spBv1.0/Waterworks/NBIRTH/gw8', encode({ timestamp: t0, seq: 0, metrics: [] }));
    await c.publishAsync(
      'spBv1.0/Waterworks/NCMD/gw7',
      encode({ timestamp: t0, metrics: [{ name: 'Node Control/Rebirth', datatype: Boolean_, booleanValue: true }] }),
    );
    await c.publishAsync('spBv1.0/Waterworks/DDATA/gw7/pump2', encode({ timestamp: t0 + 1000, seq: 2, metrics: [{ alias: 1, doubleValue: 79.5 }] }));
    await waitFor(
      'birth and data stored',
      () => stored(engineId),
      (n) => n === before + 2,
    );
    const denied = mq
      .log()
      .split('\n')
      .filter((l) => l.includes(`Denied PUBLISH from ${c.options.clientId}`));
    expect(denied.some((l) => l.includes("'spBv1.0/Waterworks/NBIRTH/gw8'"))).toBe(true);
    expect(denied.some((l) => l.includes("'spBv1.0/Waterworks/NCMD/gw7'"))).toBe(true);
    expect(commands).toEqual([]); // its own forged command never reached it
    c.end(true);
  },
);

itBroker("the Sparkplug host's STATE (retained, online) and its rebirth command reach a gateway: the server's account may publish them", async () => {
  const res = await api('POST', '/api/devices', { engineId: engines[1], sparkplug: { groupId: 'Waterworks', edgeNodeId: 'gw9' } });
  expect(res.status).toBe(201);
  const c = await connect(res.body.username, res.body.secret);
  const seen: string[] = [];
  c.on('message', (topic, payload) => seen.push(topic.includes('/STATE/') ? `${topic} ${payload.toString()}` : topic));
  await c.subscribeAsync(['spBv1.0/Waterworks/NCMD/gw9', 'spBv1.0/STATE/+']); // allowed by its role
  await waitFor(
    'the retained STATE',
    async () => seen,
    (xs) => xs.some((x) => x.startsWith('spBv1.0/STATE/jacketwatch {"online":true,')),
  );
  // data before any birth: the host asks this node to rebirth
  await c.publishAsync('spBv1.0/Waterworks/NDATA/gw9', encode({ timestamp: Date.now() - 1000, seq: 3, metrics: [{ alias: 1, doubleValue: 70 }] }));
  await waitFor(
    'the rebirth command',
    async () => seen,
    (xs) => xs.includes('spBv1.0/Waterworks/NCMD/gw9'),
  );
  expect(mq.log()).not.toMatch(/Denied PUBLISH from jacketwatch-sparkplug-host/);
  c.end(true);
});

itBroker('server killed: what devices publish meanwhile waits in its persistent session and is stored once after the restart', async () => {
  const a = devices[0];
  const before = await stored(a.engineId);
  await server.stop('SIGKILL');
  const c = await connect(a.username, a.secret);
  const t0 = Date.now() - 30_000;
  const N = 300;
  for (let i = 0; i < N; i++) await c.publishAsync(telemetryTopic(a.engineId), sample(t0 + i * 10), { qos: 1 }); // each acknowledged by the broker
  c.end(true);
  server = await startServerProcess({ dataDir, ports: server.ports, group: true, env });
  await waitFor(
    'every reading published while the server was down',
    () => stored(a.engineId),
    (n) => n === before + N,
  );
  expect(await db.all('SELECT ts FROM readings WHERE engine_id = ? GROUP BY channel, ts HAVING COUNT(*) > 1', [a.engineId])).toEqual([]);
});

itBroker('revoking a device disconnects it at once and it cannot come back', async () => {
  const b = devices[1];
  const c = await connect(b.username, b.secret);
  const closed = new Promise<void>((resolve) => c.once('close', () => resolve()));
  const res = await api('POST', `/api/devices/${b.id}/revoke`);
  expect(res.status).toBe(200);
  await closed;
  await expect(connect(b.username, b.secret)).rejects.toThrow(/not authorized|bad user name or password/i);
});

itBroker('a lost broker shows as degraded in /api/health; the server reconnects with back-off when it is back', async () => {
  await mq.stop();
  const down = await waitFor('degraded', health, (h) => h.status === 'degraded');
  expect(down.broker).toMatchObject({ connected: false });
  expect(down.broker!.lastError).toEqual(expect.any(String));
  await mq.restart();
  await waitFor('connected again', health, (h) => h.status === 'ok' && h.broker?.connected === true, 60_000);
  // and readings flow again
  const a = devices[0];
  const before = await stored(a.engineId);
  const c = await connect(a.username, a.secret);
  await c.publishAsync(telemetryTopic(a.engineId), sample(Date.now() - 1000), { qos: 1 });
  await waitFor(
    'stored after the reconnect',
    () => stored(a.engineId),
    (n) => n === before + 1,
  );
  c.end(true);
});

itBroker("the server's own credentials refused: degraded with the broker's reason, retried with back-off", async () => {
  const other = await startServerProcess({
    group: true,
    env: { ...env, MQTT_URL: mq.adminUrl.replace(mq.admin.password, 'wrong-password'), MQTT_CLIENT_ID: 'jw-server-refused' },
  });
  try {
    const h1 = await waitFor('refused', other.health, (h) => h.status === 'degraded' && /authori[sz]ed|password/i.test(h.broker?.lastError ?? ''));
    const h2 = await waitFor('a longer wait after more refusals', other.health, (h) => h.broker!.retryInMs > h1.broker!.retryInMs);
    expect(h2.broker!.connected).toBe(false);
  } finally {
    await other.stop('SIGKILL');
    fs.rmSync(other.dataDir, { recursive: true, force: true });
  }
});

itBroker('two servers in one shared-subscription group on one database: each message is taken by one of them, every reading stored once', async () => {
  await server.stop('SIGKILL');
  const shared = { ...env, MQTT_SHARED_GROUP: 'jw' };
  const a = await startServerProcess({ dataDir, group: true, env: { ...shared, MQTT_CLIENT_ID: 'jw-server-a' } });
  const b = await startServerProcess({ dataDir, group: true, env: { ...shared, MQTT_CLIENT_ID: 'jw-server-b' } });
  server = a; // stopped by afterAll
  try {
    for (const s of [a, b]) await waitFor('connected', s.health, (h) => h.broker?.connected === true);
    const d = devices[0];
    const before = await stored(d.engineId);
    const c = await connect(d.username, d.secret);
    const N = 200;
    const t0 = Date.now() - 20_000;
    for (let i = 0; i < N; i++) await c.publishAsync(telemetryTopic(d.engineId), sample(t0 + i * 10), { qos: 1 });
    c.end(true);
    await waitFor(
      'every reading stored',
      () => stored(d.engineId),
      (n) => n === before + N,
    );
    const [ha, hb] = [await a.health(), await b.health()];
    // the broker handed each message to one server only: nothing arrived twice, both took a share
    expect(ha.ingest.received + hb.ingest.received).toBe(N);
    expect(ha.ingest.duplicate + hb.ingest.duplicate).toBe(0);
    expect(Math.min(ha.ingest.received, hb.ingest.received)).toBeGreaterThan(0);
  } finally {
    await b.stop('SIGKILL');
  }
});
