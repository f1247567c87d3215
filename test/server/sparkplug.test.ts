/**
 * Gateways speaking Sparkplug B (Eclipse Sparkplug 3.0) against a real server process: real MQTT port,
 * mqtt.js clients, real SQLite file. Test payloads are built independently of the server's decoder:
 * with protobufjs from the JSON descriptor below (written here from the specification's field numbers,
 * not from the server's schema text), and once as hand-assembled protobuf bytes.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import mqtt, { type MqttClient } from 'mqtt';
import bcrypt from 'bcryptjs';
import { loadJwtSecret } from '../../server/auth/jwt-secret';
import { createTokenService } from '../../server/auth/tokens';
import { Db, seedFleet, startServerProcess, type SeededDevice, type ServerProcess } from './support/telemetry-server';
import { until } from './support/until';
import { apiCall, rejectionCounts, storedReadings } from './support/device-api';
import { Boolean_, decode, Double, encode, Float, Int32, UInt64, withUnit } from './support/sparkplug-payload';

let server: ServerProcess;
let db: Db;
let fleet: SeededDevice[];
let adminToken: string;
const clients: MqttClient[] = [];

const api = (method: string, p: string, body?: unknown) => apiCall(server.url, adminToken, method, p, body);

interface Gateway {
  id: number;
  username: string;
  secret: string;
}
const register = async (engineId: number, sparkplug: { groupId: string; edgeNodeId: string; deviceId?: string }): Promise<Gateway> => {
  const res = await api('POST', '/api/devices', { engineId, sparkplug });
  expect(res.status).toBe(201);
  expect(res.body).toMatchObject({ engineId, sparkplug: { ...sparkplug, deviceId: sparkplug.deviceId ?? null } });
  expect(typeof res.body.username).toBe('string');
  expect(typeof res.body.secret).toBe('string');
  return { id: res.body.id, username: res.body.username, secret: res.body.secret };
};

const connect = async (g: Gateway, extra: mqtt.IClientOptions = {}): Promise<MqttClient> => {
  const c = await mqtt.connectAsync(`mqtt://127.0.0.1:${server.mqttPort}`, {
    username: g.username,
    password: g.secret,
    reconnectPeriod: 0,
    connectTimeout: 5000,
    ...extra,
  });
  clients.push(c);
  return c;
};

const readings = (engineId: number) => storedReadings(db, engineId);
const rejections = (deviceId: number) => rejectionCounts(db, deviceId);

const engine = async (id: number) => (await api('GET', `/api/engines/${id}`)).body;

beforeAll(async () => {
  server = await startServerProcess();
  db = new Db(server.databaseUrl);
  fleet = await seedFleet(db, 7, 'sp');
  const now = new Date().toISOString();
  const adminId = await db.run(
    `INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, 'admin', FALSE, ?, ?)`,
    ['sp-admin@example.test', 'Test admin', bcrypt.hashSync('not-used-here', 4), now, now],
  );
  adminToken = createTokenService(loadJwtSecret(server.dataDir)).sign({ id: adminId, email: 'sp-admin@example.test', role: 'admin' });
});

afterAll(async () => {
  await Promise.all(clients.map((c) => c.endAsync(true).catch(() => undefined)));
  await server?.stop('SIGTERM');
  await db?.close();
});

test('a Sparkplug identity is validated; a device record with one answers 201 with username and secret', async () => {
  const bad = await api('POST', '/api/devices', { engineId: fleet[0].engineId, sparkplug: { groupId: 'Plant/A', edgeNodeId: 'gw1' } });
  expect(bad.status).toBe(400);
  expect(bad.body.field).toBe('sparkplug.groupId');
  const missing = await api('POST', '/api/devices', { engineId: fleet[0].engineId, sparkplug: { groupId: 'PlantA' } });
  expect(missing.status).toBe(400);
  expect(missing.body.field).toBe('sparkplug.edgeNodeId');
  await register(fleet[0].engineId, { groupId: 'Dup', edgeNodeId: 'gw', deviceId: 'e1' });
  const dup = await api('POST', '/api/devices', { engineId: fleet[1].engineId, sparkplug: { groupId: 'Dup', edgeNodeId: 'gw', deviceId: 'e1' } });
  expect(dup.status).toBe(409);
});

test('contract: DBIRTH and DDATA by our channel keys are stored as readings of the engine, also when DDATA gives only the alias; units converted; a seq gap is counted; DDEATH marks the data lost at once', async () => {
  const d = fleet[1];
  const gw = await register(d.engineId, { groupId: 'PlantA', edgeNodeId: 'gw1', deviceId: 'genset1' });
  const c = await connect(gw);
  const base = Date.now() - 30_000;
  await c.publishAsync(
    'spBv1.0/PlantA/NBIRTH/gw1',
    encode({
      timestamp: base,
      seq: 0,
      metrics: [
        { name: 'bdSeq', datatype: UInt64, longValue: 0 },
        { name: 'Node Control/Rebirth', datatype: Boolean_, booleanValue: false },
      ],
    }),
    { qos: 1 },
  );
  await c.publishAsync(
    'spBv1.0/PlantA/DBIRTH/gw1/genset1',
    encode({
      timestamp: base,
      seq: 1,
      metrics: [
        { name: 'coolant_temp', alias: 1, datatype: Double, doubleValue: 80.0 },
        { name: 'coolant_pressure', alias: 2, datatype: Float, floatValue: 15, ...withUnit('psi') },
        { name: 'engine_speed', alias: 3, datatype: Int32, intValue: 1800 },
      ],
    }),
    { qos: 1 },
  );
  await c.publishAsync(
    'spBv1.0/PlantA/DDATA/gw1/genset1',
    encode({
      timestamp: base + 1000,
      seq: 2,
      metrics: [
        { alias: 1, doubleValue: 85.5 },
        { alias: 2, floatValue: 14 },
      ],
    }),
    { qos: 1 },
  );
  const rows = await until(
    '5 readings',
    () => readings(d.engineId),
    (r) => r.length === 5,
  );
  expect(rows[0]).toEqual({ channel: 1, ts: base, value: 80, quality: 0 });
  expect(rows[1].channel).toBe(2);
  expect(rows[1].value).toBeCloseTo(15 * 6.894757, 3); // NIST SP 811 B.8: 1 psi = 6.894 757 kPa
  expect(rows[2]).toEqual({ channel: 4, ts: base, value: 1800, quality: 0 });
  expect(rows[3]).toEqual({ channel: 1, ts: base + 1000, value: 85.5, quality: 0 }); // alias only
  expect(rows[4].value).toBeCloseTo(14 * 6.894757, 3); // the unit of the birth applies to the alias
  expect((await rejections(gw.id)).sparkplug_seq_gap).toBeUndefined();

  // seq 9 where 3 is due: counted, the good reading kept
  await c.publishAsync('spBv1.0/PlantA/DDATA/gw1/genset1', encode({ timestamp: Date.now(), seq: 9, metrics: [{ alias: 3, intValue: 1500 }] }), { qos: 1 });
  await until(
    'gap counted',
    () => rejections(gw.id),
    (r) => r.sparkplug_seq_gap === 1,
  );
  await until(
    '6 readings',
    () => readings(d.engineId),
    (r) => r.length === 6,
  );
  expect((await engine(d.engineId)).runState).toBe('running');

  await c.publishAsync('spBv1.0/PlantA/DDEATH/gw1/genset1', encode({ timestamp: Date.now(), seq: 10, metrics: [] }), { qos: 1 });
  const lost = await until(
    'engine data lost',
    () => engine(d.engineId),
    (e) => e.runState === 'no-data',
  );
  expect(lost.latest.engine_speed).toMatchObject({ value: 1500, quality: 1 });
  expect(lost.latest.coolant_temp.quality).toBe(1);
  // a standby engine whose data is declared lost is not ready to start (its state is not known)
  if (lost.duty === 'standby') expect(lost.readiness).toMatchObject({ ready: false });
  // and the no-data alarm is raised now, not after its silence limit
  const alarm = await until(
    'no-data alarm',
    () => db.get('SELECT rule, active, message FROM alarms WHERE engine_id = ? AND rule = ?', [d.engineId, 'no_data']),
    (a) => !!a,
  );
  expect(Boolean(alarm.active)).toBe(true); // 1 on SQLite, true on PostgreSQL
  expect(alarm.message).toMatch(/reported its data lost/);
});

test('data for an unknown alias is counted and asks the edge node for a rebirth (NCMD Node Control/Rebirth = true)', async () => {
  const d = fleet[2];
  const gw = await register(d.engineId, { groupId: 'PlantB', edgeNodeId: 'gw2' });
  const c = await connect(gw);
  const ncmd = new Promise<{ topic: string; payload: Buffer }>((resolve) => c.on('message', (topic, payload) => resolve({ topic, payload })));
  const granted = await c.subscribeAsync('spBv1.0/PlantB/NCMD/gw2', { qos: 0 });
  expect(granted[0].qos).toBe(0);
  // as after our own restart: data arrives for a session we never saw born
  await c.publishAsync('spBv1.0/PlantB/NDATA/gw2', encode({ seq: 17, metrics: [{ alias: 4, doubleValue: 70 }] }), { qos: 1 });
  const cmd = await ncmd;
  expect(cmd.topic).toBe('spBv1.0/PlantB/NCMD/gw2');
  expect(decode(cmd.payload).metrics).toEqual([expect.objectContaining({ name: 'Node Control/Rebirth', datatype: Boolean_, booleanValue: true })]);
  await until(
    'unknown alias counted',
    () => rejections(gw.id),
    (r) => r.sparkplug_unknown_alias === 1,
  );
  const report = await api('GET', '/api/admin/ingest');
  expect(report.body.counters!.sparkplug!.rebirthRequests).toBeGreaterThanOrEqual(1);
  expect(await readings(d.engineId)).toEqual([]);

  // the rebirth arrives; then an alias the birth did not announce is still unknown, the announced one stored
  await c.publishAsync(
    'spBv1.0/PlantB/NBIRTH/gw2',
    encode({
      seq: 0,
      metrics: [
        { name: 'bdSeq', datatype: UInt64, longValue: 1 },
        { name: 'coolant_temp', alias: 4, datatype: Double, doubleValue: 70 },
      ],
    }),
    { qos: 1 },
  );
  await c.publishAsync(
    'spBv1.0/PlantB/NDATA/gw2',
    encode({
      seq: 1,
      metrics: [
        { alias: 4, doubleValue: 71 },
        { alias: 5, doubleValue: 1 },
      ],
    }),
    { qos: 1 },
  );
  await until(
    '2 readings',
    () => readings(d.engineId),
    (r) => r.length === 2,
  );
  await until(
    'second unknown alias counted',
    () => rejections(gw.id),
    (r) => r.sparkplug_unknown_alias === 2,
  );
});

test('hand-assembled DDATA bytes (field numbers of the specification) are stored by alias', async () => {
  const d = fleet[3];
  const gw = await register(d.engineId, { groupId: 'PlantC', edgeNodeId: 'gw3', deviceId: 'pump' });
  const c = await connect(gw);
  const t0 = Date.now() - 5000;
  await c.publishAsync('spBv1.0/PlantC/NBIRTH/gw3', encode({ timestamp: t0, seq: 0, metrics: [] }), { qos: 1 });
  await c.publishAsync(
    'spBv1.0/PlantC/DBIRTH/gw3/pump',
    encode({ timestamp: t0, seq: 1, metrics: [{ name: 'ambient_temp', alias: 7, datatype: Double, doubleValue: 21 }] }),
    { qos: 1 },
  );
  const varint = (n: number): number[] => {
    const out: number[] = [];
    while (n >= 128) {
      out.push((n % 128) + 128);
      n = Math.floor(n / 128);
    }
    out.push(n);
    return out;
  };
  const dbl = Buffer.alloc(8);
  dbl.writeDoubleLE(-12.25);
  const metric = [0x10, ...varint(7), 0x69, ...dbl]; // alias (2, varint) = 7; double_value (13, 64-bit)
  const bytes = Buffer.from([0x08, ...varint(t0 + 1000), 0x12, metric.length, ...metric, 0x18, 2]); // timestamp (1); metrics (2); seq (3) = 2
  await c.publishAsync('spBv1.0/PlantC/DDATA/gw3/pump', bytes, { qos: 1 });
  const rows = await until(
    '2 readings',
    () => readings(d.engineId),
    (r) => r.length === 2,
  );
  expect(rows[1]).toEqual({ channel: 5, ts: t0 + 1000, value: -12.25, quality: 0 });
  expect(await rejections(gw.id)).toEqual({});
});

test('metric names mapped per device with units; a bad payload is counted; an NDEATH (the will) marks the node engine lost', async () => {
  const d = fleet[4];
  const gw = await register(d.engineId, { groupId: 'PlantD', edgeNodeId: 'gw4' });
  const map = await api('PUT', `/api/devices/${gw.id}/metric-map`, {
    'Engine/Coolant/Temp': 'coolant_temp',
    'Engine/Jacket/Press': { channel: 'coolant_pressure', unit: 'bar' },
  });
  expect(map.status).toBe(200);
  expect(map.body.metricMap['Engine/Coolant/Temp']).toBe('coolant_temp');
  expect((await api('PUT', `/api/devices/${gw.id}/metric-map`, { X: 'oil_temp' })).body.field).toBe('X');
  const will = encode({ metrics: [{ name: 'bdSeq', datatype: UInt64, longValue: 3 }] });
  const c = await connect(gw, { will: { topic: 'spBv1.0/PlantD/NDEATH/gw4', payload: will, qos: 0, retain: false } });
  const t0 = Date.now() - 2000;
  await c.publishAsync(
    'spBv1.0/PlantD/NBIRTH/gw4',
    encode({
      timestamp: t0,
      seq: 0,
      metrics: [
        { name: 'bdSeq', datatype: UInt64, longValue: 3 },
        { name: 'Engine/Coolant/Temp', alias: 1, datatype: Double, doubleValue: 180.5, ...withUnit('degF') },
        { name: 'Engine/Jacket/Press', alias: 2, datatype: Double, doubleValue: 1.2 },
        { name: 'Engine/Oil/Level', alias: 3, datatype: Double, doubleValue: 0.8 },
        { name: 'engine_speed', alias: 4, datatype: Int32, intValue: 0 },
      ],
    }),
    { qos: 1 },
  );
  await c.publishAsync('spBv1.0/PlantD/NDATA/gw4', Buffer.from('{"ts":1,"values":{}}'), { qos: 1 }); // not protobuf
  const rows = await until(
    '3 readings',
    () => readings(d.engineId),
    (r) => r.length === 3,
  );
  expect(rows.map((r) => r.channel)).toEqual([1, 2, 4]);
  expect(rows[0].value).toBeCloseTo(82.5, 9); // NIST SP 811 B.9: t/°C = (t/°F - 32) / 1.8
  expect(rows[1].value).toBeCloseTo(120, 9); // NIST SP 811 B.8: 1 bar = 100 kPa
  const r = await until(
    'rejections',
    () => rejections(gw.id),
    (x) => x.sparkplug_decode === 1 && x.unknown_channel === 1,
  );
  expect(r).toEqual({ sparkplug_decode: 1, unknown_channel: 1 }); // Engine/Oil/Level has no channel
  expect((await engine(d.engineId)).runState).toBe('stopped');
  (c as unknown as { stream: { destroy(): void } }).stream.destroy(); // the gateway drops off the network: the broker sends its will
  const lost = await until(
    'engine data lost',
    () => engine(d.engineId),
    (e) => e.runState === 'no-data',
  );
  expect(lost.latest.coolant_temp).toMatchObject({ quality: 1 });
});

test('a wrong group, edge node or device for the credentials is refused and counted; nothing is stored', async () => {
  const d = fleet[5];
  const gw = await register(d.engineId, { groupId: 'PlantE', edgeNodeId: 'gw5', deviceId: 'e5' });
  const attempts = ['spBv1.0/OtherPlant/NBIRTH/gw5', 'spBv1.0/PlantE/NBIRTH/gw9', 'spBv1.0/PlantE/DDATA/gw5/e6', 'spBv1.0/PlantE/NCMD/gw5'];
  for (const topic of attempts) {
    const c = await connect(gw);
    const closed = new Promise<void>((resolve) => c.once('close', () => resolve()));
    c.publish(topic, encode({ seq: 0, metrics: [{ name: 'coolant_temp', alias: 1, datatype: Double, doubleValue: 90 }] }), { qos: 1 });
    await closed;
  }
  await until(
    'wrong_topic counted',
    () => rejections(gw.id),
    (r) => r.wrong_topic === attempts.length,
  );
  expect(await readings(d.engineId)).toEqual([]);
  // another engine's gateway subscribing to this node's commands gets nothing granted
  const other = await connect({ username: fleet[0].username, secret: fleet[0].secret, id: fleet[0].deviceId });
  await expect(other.subscribeAsync('spBv1.0/PlantE/NCMD/gw5')).rejects.toThrow(/Subscribe error/); // SUBACK 128
  // a JSON-only device may not publish Sparkplug topics either
  const closed = new Promise<void>((resolve) => other.once('close', () => resolve()));
  other.publish('spBv1.0/PlantE/NDATA/gw5', encode({ seq: 1, metrics: [] }), { qos: 1 });
  await closed;
  await until(
    'wrong_topic of the JSON device',
    () => rejections(fleet[0].deviceId),
    (r) => r.wrong_topic === 1,
  );
});

test('the simulator speaks Sparkplug B with its device credentials; killed with -9, its will (NDEATH) marks the engine lost', async () => {
  const [d] = await seedFleet(db, 1, 'spsim');
  const gw = await register(d.engineId, { groupId: 'SimPlant', edgeNodeId: 'sim-gw', deviceId: 'genset' });
  const file = path.join(server.dataDir, 'sparkplug-devices.json');
  fs.writeFileSync(
    file,
    JSON.stringify({
      devices: [
        {
          engineId: d.engineId,
          username: gw.username,
          secret: gw.secret,
          duty: 'standby',
          capacityL: 60,
          capPressureKpa: 100,
          heaterSetpointC: 40,
          sparkplug: { groupId: 'SimPlant', edgeNodeId: 'sim-gw', deviceId: 'genset' },
        },
      ],
    }),
  );
  const root = path.resolve(__dirname, '../..');
  const sim = spawn(
    process.execPath,
    [
      path.join(root, 'node_modules/tsx/dist/cli.mjs'),
      path.join(root, 'simulator/cli.ts'),
      '--protocol',
      'sparkplug',
      '--devices',
      file,
      '--mqtt-url',
      `mqtt://127.0.0.1:${server.mqttPort}`,
      '--rate',
      '5',
    ],
    { cwd: root, detached: true, stdio: 'ignore' },
  );
  try {
    // every channel arrives as a reading of the engine, by alias after the birth
    await until(
      'readings of every channel',
      () => db.all<{ channel: number }>('SELECT DISTINCT channel FROM readings WHERE engine_id = ?', [d.engineId]),
      (r) => r.length === 5,
      30_000,
    );
    await until(
      'more than one data message',
      () => readings(d.engineId),
      (r) => r.length >= 15,
      30_000,
    );
    expect(await rejections(gw.id)).toEqual({});
    expect((await engine(d.engineId)).runState).not.toBe('no-data');
  } finally {
    process.kill(-sim.pid!, 'SIGKILL'); // the simulator's own process group
  }
  await until(
    'engine data lost',
    () => engine(d.engineId),
    (e) => e.runState === 'no-data',
    30_000,
  );
});

test('a changed metric map asks the edge node for a rebirth, so the new names apply at once', async () => {
  const d = fleet[6];
  const gw = await register(d.engineId, { groupId: 'PlantE', edgeNodeId: 'gw5' });
  const c = await connect(gw);
  const ncmd = new Promise<{ topic: string; payload: Buffer }>((resolve) => c.on('message', (topic, payload) => resolve({ topic, payload })));
  await c.subscribeAsync('spBv1.0/PlantE/NCMD/gw5', { qos: 0 });
  const map = await api('PUT', `/api/devices/${gw.id}/metric-map`, { 'Engine/Coolant/Temp': 'coolant_temp' });
  expect(map.status).toBe(200);
  const cmd = await ncmd;
  expect(cmd.topic).toBe('spBv1.0/PlantE/NCMD/gw5');
  expect(decode(cmd.payload).metrics).toEqual([expect.objectContaining({ name: 'Node Control/Rebirth', datatype: Boolean_, booleanValue: true })]);
});
