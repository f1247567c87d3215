/**
 * The telemetry path end to end against a real server process: MQTT on a real TCP port, a real SQLite
 * file, socket.io over loopback.
 */
import mqtt, { type MqttClient } from 'mqtt';
import { io as ioClient, type Socket } from 'socket.io-client';
import { loadJwtSecret } from '../../server/auth/jwt-secret';
import { createTokenService } from '../../server/auth/tokens';
import net from 'node:net';
import bcrypt from 'bcryptjs';
import { MAX_PAYLOAD_BYTES, MAX_SAMPLES } from '../../shared/telemetry-payload';
import { telemetryTopic } from '../../shared/topics';
import { Db, seedFleet, startServerProcess, type SeededDevice, type ServerProcess } from './support/telemetry-server';
import { until } from './support/until';
import type { IngestReport } from './support/api-answer';

let server: ServerProcess;
let db: Db;
let fleet: SeededDevice[];
const clients: MqttClient[] = [];

const connect = async (d: SeededDevice, password = d.secret): Promise<MqttClient> => {
  const c = await mqtt.connectAsync(`mqtt://127.0.0.1:${server.mqttPort}`, { username: d.username, password, reconnectPeriod: 0, connectTimeout: 5000 });
  clients.push(c);
  return c;
};

const countReadings = (engineId: number) => db.get<{ n: number }>('SELECT COUNT(*) AS n FROM readings WHERE engine_id = ?', [engineId]).then((r) => r.n);
const rejections = async (deviceId: number) =>
  Object.fromEntries(
    (await db.all<{ reason: string; count: number }>('SELECT reason, count FROM device_rejections WHERE device_id = ?', [deviceId])).map((r) => [
      r.reason,
      r.count,
    ]),
  );

beforeAll(async () => {
  server = await startServerProcess();
  db = new Db(server.databaseUrl);
  fleet = await seedFleet(db, 6, 'bt');
});

afterAll(async () => {
  for (const c of clients) c.end(true);
  await server?.stop('SIGKILL');
  await db?.close();
});

test('a good device is accepted; its readings land in readings and rollups', async () => {
  const d = fleet[0];
  const c = await connect(d);
  const ts = Date.now() - 10_000;
  await c.publishAsync(telemetryTopic(d.engineId), JSON.stringify({ ts, values: { coolant_temp: 80, coolant_pressure: { value: 15, unit: 'psi' } } }), {
    qos: 1,
  });
  await c.publishAsync(
    telemetryTopic(d.engineId),
    JSON.stringify({
      samples: [
        { ts: ts + 1000, values: { coolant_temp: 84 } },
        { ts: new Date(ts + 2000).toISOString(), values: { coolant_temp: 82 } },
      ],
    }),
    { qos: 1 },
  );
  await until(
    '4 readings',
    () => countReadings(d.engineId),
    (n) => n === 4,
  );
  const rows = await db.all('SELECT channel, ts, value, quality FROM readings WHERE engine_id = ? ORDER BY ts, channel', [d.engineId]);
  expect(rows[0]).toEqual({ channel: 1, ts, value: 80, quality: 0 });
  expect(rows[1].channel).toBe(2);
  expect(rows[1].value).toBeCloseTo(15 * 6.894757, 4); // NIST SP 811 B.8: 1 psi = 6.894 757 kPa
  // the three temperatures may straddle a minute boundary: sum the per-minute rows
  const roll = await db.get(
    'SELECT MIN("min") AS mn, MAX("max") AS mx, SUM("sum") AS s, SUM("count") AS n, SUM(bad_count) AS bad FROM rollups WHERE engine_id = ? AND channel = 1',
    [d.engineId],
  );
  expect(roll).toEqual({ mn: 80, mx: 84, s: 246, n: 3, bad: 0 });
  const minutes = await db.all('SELECT minute FROM rollups WHERE engine_id = ? AND channel = 1', [d.engineId]);
  for (const m of minutes) expect(m.minute % 60_000).toBe(0);
});

test('a wrong password is refused', async () => {
  await expect(connect(fleet[1], 'not-the-secret')).rejects.toThrow(/bad username or password|not authorized/i);
  await expect(connect({ ...fleet[1], username: 'nobody-here' })).rejects.toThrow(/bad username or password|not authorized/i);
});

test("publishing to another engine's topic is refused and counted as wrong_topic", async () => {
  const d = fleet[2];
  const c = await connect(d);
  const closed = new Promise<void>((resolve) => c.once('close', () => resolve()));
  c.publish(telemetryTopic(fleet[3].engineId), JSON.stringify({ ts: Date.now(), values: { coolant_temp: 99 } }), { qos: 1 });
  await closed;
  await until(
    'wrong_topic persisted',
    () => rejections(d.deviceId),
    (r) => r.wrong_topic === 1,
  );
  expect(await countReadings(fleet[3].engineId)).toBe(0);
});

test('every bad payload kind is rejected and counted; the good readings around them are stored and the device stays connected', async () => {
  const d = fleet[4];
  const c = await connect(d);
  let closes = 0;
  c.on('close', () => closes++);
  const topic = telemetryTopic(d.engineId);
  const now = Date.now();
  const good = (i: number) => JSON.stringify({ ts: now - 60_000 + i * 1000, values: { coolant_temp: 70 + i } });
  const bad = [
    '{not json',
    JSON.stringify({ ts: now, values: { coolant_temp: 1 }, pad: 'x'.repeat(MAX_PAYLOAD_BYTES) }), // too_large
    JSON.stringify({ when: now }), // schema
    `{"ts": ${now}, "values": {"coolant_temp": 1e999}}`, // not_finite
    JSON.stringify({ ts: now + 3_600_000, values: { coolant_temp: 80 } }), // future_timestamp
    JSON.stringify({ ts: now - 40 * 86_400_000, values: { coolant_temp: 80 } }), // old_timestamp
    JSON.stringify({ ts: now, values: { oil_temp: 80 } }), // unknown_channel
    JSON.stringify({ ts: now, values: { coolant_temp: { value: 1, unit: 'psi' } } }), // bad_unit
  ];
  let i = 0;
  for (const b of bad) {
    await c.publishAsync(topic, good(i++), { qos: 1 });
    await c.publishAsync(topic, b, { qos: 1 });
  }
  // one payload mixing a good value with a bad one: the good one is kept
  await c.publishAsync(topic, JSON.stringify({ ts: now - 1000, values: { coolant_temp: 90, coolant_pressure: { value: 2, unit: 'degF' } } }), { qos: 1 });
  await until(
    '9 good readings',
    () => countReadings(d.engineId),
    (n) => n === 9,
  );
  const r = await until(
    'rejections persisted',
    () => rejections(d.deviceId),
    // the counts are written every 2 s: wait for the second bad unit (the mixed payload's) too
    (x) => Object.keys(x).length >= 8 && x.bad_unit === 2,
  );
  expect(r).toEqual({ not_json: 1, too_large: 1, schema: 1, not_finite: 1, future_timestamp: 1, old_timestamp: 1, unknown_channel: 1, bad_unit: 2 });
  const detail = await db.get('SELECT last_detail FROM device_rejections WHERE device_id = ? AND reason = ?', [d.deviceId, 'unknown_channel']);
  expect(detail.last_detail).toContain('oil_temp');
  expect(c.connected).toBe(true);
  expect(closes).toBe(0);
  const health = await server.health();
  expect(health.ingest.rejected).toBeGreaterThanOrEqual(10); // 9 here + the wrong_topic above
});

test('an out-of-range value is stored with quality 1 and counted as bad in the rollup', async () => {
  const d = fleet[5];
  const c = await connect(d);
  const ts = Date.now() - 5000;
  await c.publishAsync(telemetryTopic(d.engineId), JSON.stringify({ ts, values: { coolant_temp: 400, engine_speed: 1500 } }), { qos: 1 });
  await until(
    '2 readings',
    () => countReadings(d.engineId),
    (n) => n === 2,
  );
  expect(await db.get('SELECT value, quality FROM readings WHERE engine_id = ? AND channel = 1', [d.engineId])).toEqual({ value: 400, quality: 1 });
  expect(await db.get('SELECT "min", "max", "count", bad_count FROM rollups WHERE engine_id = ? AND channel = 1', [d.engineId])).toEqual({
    min: null,
    max: null,
    count: 0,
    bad_count: 1,
  });
  await until(
    'out_of_range persisted',
    () => rejections(d.deviceId),
    (x) => x.out_of_range === 1,
  );
});

test('socket.io: a bad token is refused at the handshake; a good token receives readings', async () => {
  const url = server.url;
  const bad = ioClient(url, { auth: { token: 'forged.token.value' }, transports: ['websocket'], reconnection: false });
  const err = await new Promise<Error>((resolve) => bad.once('connect_error', resolve));
  expect(err.message).toMatch(/unauthorized/);
  bad.close();

  // the handshake checks the session against the users table: the user must exist and be enabled
  const now = new Date().toISOString();
  const userId = await db.run(
    `INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES ('operator@example.test', 'Test operator', 'x', 'operator', FALSE, ?, ?)`,
    [now, now],
  );
  const tokens = createTokenService(loadJwtSecret(server.dataDir));
  const token = tokens.sign({ id: userId, email: 'operator@example.test', role: 'operator' });
  const sock: Socket = ioClient(url, { auth: { token }, transports: ['websocket'], reconnection: false });
  await new Promise<void>((resolve, reject) => {
    sock.once('connect', () => resolve());
    sock.once('connect_error', reject);
  });
  const d = fleet[0];
  const joined = await sock.emitWithAck('watch', { engineIds: [d.engineId] });
  expect(joined.rooms).toEqual([`engine:${d.engineId}`]);
  const got = new Promise<unknown>((resolve) => sock.once('readings', resolve));
  const c = await connect(d);
  const ts = Date.now();
  await c.publishAsync(telemetryTopic(d.engineId), JSON.stringify({ ts, values: { coolant_temp: 77.5 } }), { qos: 1 });
  const msg = await got;
  expect(msg).toMatchObject({ engineId: d.engineId, siteId: d.siteId, ts, values: { coolant_temp: { value: 77.5, ts, quality: 0 } } });
  sock.close();
});

test('a redelivered or repeated reading is stored once, counted once in the rollup, and counted as duplicate', async () => {
  const d = fleet[1];
  const c = await connect(d);
  const ts = Date.now() - 30_000;
  const before = (await server.health()).ingest.duplicate;
  const payload = JSON.stringify({
    samples: [
      { ts, values: { coolant_temp: 70, engine_speed: 1500 } },
      { ts: ts + 1, values: { coolant_temp: 72 } },
    ],
  });
  await c.publishAsync(telemetryTopic(d.engineId), payload, { qos: 1 });
  // the PUBACK means stored: the rows are in the file once publishAsync resolves
  expect(await countReadings(d.engineId)).toBe(3);
  await c.publishAsync(telemetryTopic(d.engineId), payload, { qos: 1 }); // as a QoS 1 redelivery would
  // one message repeating a reading of its own, next to a new one
  await c.publishAsync(
    telemetryTopic(d.engineId),
    JSON.stringify({
      samples: [
        { ts: ts + 2, values: { coolant_temp: 74 } },
        { ts: ts + 2, values: { coolant_temp: 74 } },
      ],
    }),
    { qos: 1 },
  );
  expect(await countReadings(d.engineId)).toBe(4);
  expect((await server.health()).ingest.duplicate - before).toBe(4);
  const roll = await db.get('SELECT SUM("count") AS n, SUM("sum") AS s FROM rollups WHERE engine_id = ? AND channel = 1', [d.engineId]);
  expect(roll).toEqual({ n: 3, s: 216 });
});

test('values and times are stored bit for bit, also values the fast insert cannot carry (the writer binds those)', async () => {
  const d = fleet[1];
  const c = await connect(d);
  const ts = Date.now() - 50_000;
  // many digits (SQLite's own text-to-double conversion is 1 ulp off for some), whole numbers, a half, a tiny and a huge one
  const exact = [124.412543754923, -7.044591068315047, 82.13, 85, 82.5, -25.72243193261159, 0.0001, 93.00000000000001];
  // no exact integer / power-of-two form (subnormal, huge): the statement of that message binds its numbers instead
  const fallback = [5e-324, 1e300, 77.25];
  const send = (values: number[], t0: number) =>
    c.publishAsync(
      telemetryTopic(d.engineId),
      JSON.stringify({ samples: values.map((v, i) => ({ ts: t0 + i, values: { coolant_temp: v } })) }), // a number's JSON text is exact
      { qos: 1 },
    );
  await send(exact, ts);
  await send(fallback, ts + 100);
  const rows = await db.all<{ ts: number | string; value: number | string }>(
    'SELECT ts, value FROM readings WHERE engine_id = ? AND channel = 1 AND ts >= ? AND ts < ? ORDER BY ts',
    [d.engineId, ts, ts + 200],
  );
  expect(rows.map((r) => [Number(r.ts), Number(r.value)])).toEqual([...exact.map((v, i) => [ts + i, v]), ...fallback.map((v, i) => [ts + 100 + i, v])]);
  for (const [i, r] of rows.entries()) expect(Object.is(Number(r.value), [...exact, ...fallback][i])).toBe(true);
});

test('QoS 2: the PUBREC waits for the commit too (the handshake completes with the readings in the file)', async () => {
  const d = fleet[2];
  const c = await connect(d);
  const before = await countReadings(d.engineId);
  const ts = Date.now() - 20_000;
  await c.publishAsync(telemetryTopic(d.engineId), JSON.stringify({ ts, values: { coolant_temp: 71, coolant_pressure: 90 } }), { qos: 2 });
  expect(await countReadings(d.engineId)).toBe(before + 2);
});

test('payload limits agree: the largest batch the contract allows is accepted; one byte over the byte limit is refused as too_large', async () => {
  const d = fleet[3];
  const c = await connect(d);
  const base = Date.now() - 3_600_000;
  // MAX_SAMPLES samples, all five channels in the { value, unit } form, 17-digit numbers, ISO timestamps with an offset
  const v = (x: number, unit: string) => ({ value: x + 0.1234567890123, unit });
  const samples = Array.from({ length: MAX_SAMPLES }, (_, i) => ({
    ts: new Date(base + i * 1000).toISOString().replace('Z', '000000+00:00'),
    values: {
      coolant_temp: v(80, 'degC'),
      coolant_pressure: v(95, 'kPa'),
      coolant_conductivity: v(2400, 'uS/cm'),
      engine_speed: v(1800, 'rpm'),
      ambient_temp: v(20, 'degC'),
    },
  }));
  const largest = JSON.stringify({ samples });
  expect(Buffer.byteLength(largest)).toBeLessThanOrEqual(MAX_PAYLOAD_BYTES);
  await c.publishAsync(telemetryTopic(d.engineId), largest, { qos: 1 });
  expect(await countReadings(d.engineId)).toBe(MAX_SAMPLES * 5);
  // exactly at the byte limit: accepted; one byte more: too_large, and the connection stays
  const one = (pad: number) => JSON.stringify({ ts: base - 1000, values: { coolant_temp: 81 }, pad: 'x'.repeat(pad) });
  const atLimit = one(MAX_PAYLOAD_BYTES - Buffer.byteLength(one(0)));
  expect(Buffer.byteLength(atLimit)).toBe(MAX_PAYLOAD_BYTES);
  const before = (await rejections(d.deviceId)).too_large ?? 0;
  await c.publishAsync(telemetryTopic(d.engineId), atLimit, { qos: 1 });
  expect(await countReadings(d.engineId)).toBe(MAX_SAMPLES * 5 + 1);
  await c.publishAsync(telemetryTopic(d.engineId), atLimit.replace('"pad":"', '"pad":"x'), { qos: 1 });
  await until(
    'too_large persisted',
    () => rejections(d.deviceId),
    (r) => r.too_large === before + 1,
  );
  expect(c.connected).toBe(true);
});

test('a CONNECT declaring a 200 MB packet is closed at once, before authentication, and counted', async () => {
  const now = new Date().toISOString();
  const adminId = await db.run(
    `INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, 'admin', FALSE, ?, ?)`,
    ['broker-admin@example.test', 'Broker admin', bcrypt.hashSync('unused-secret-1', 4), now, now],
  );
  const token = createTokenService(loadJwtSecret(server.dataDir)).sign({ id: adminId, email: 'broker-admin@example.test', role: 'admin' });
  const counters = async () =>
    ((await (await fetch(`${server.url}/api/admin/ingest`, { headers: { authorization: `Bearer ${token}` } })).json()) as IngestReport).counters!;
  const before = (await counters()).oversizePacketsClosed;
  // fixed header of a CONNECT (type 1) with remaining length 200 MiB (4-byte variable length), then the
  // start of a body; a broker that buffers would wait here for the rest
  const declared = 200 * 1024 * 1024;
  const len: number[] = [];
  for (let x = declared; ;) {
    let b = x % 128;
    x = Math.floor(x / 128);
    if (x > 0) b |= 0x80;
    len.push(b);
    if (x === 0) break;
  }
  const sockets = await Promise.all(
    [0, 1, 2, 3].map(
      () =>
        new Promise<net.Socket>((resolve, reject) => {
          const s = net.connect(server.mqttPort, '127.0.0.1', () => resolve(s));
          s.once('error', reject);
        }),
    ),
  );
  const closed = sockets.map((s) => new Promise<void>((resolve) => s.once('close', () => resolve())));
  for (const s of sockets) {
    s.on('error', () => undefined); // a reset while writing is the expected end
    s.write(Buffer.concat([Buffer.from([0x10, ...len]), Buffer.alloc(64 * 1024, 0x41)]));
  }
  await Promise.all(closed);
  await until('4 oversize connections counted', counters, (c) => c.oversizePacketsClosed === before + 4);
  // the broker still serves good devices
  const c = await connect(fleet[5]);
  await c.publishAsync(telemetryTopic(fleet[5].engineId), JSON.stringify({ ts: Date.now() - 1000, values: { coolant_temp: 60 } }), { qos: 1 });
});

// last: it stops the server
test('SIGTERM flushes: every reading acknowledged at QoS 1 is in the file after exit', async () => {
  const d = fleet[0];
  await until(
    'earlier readings written',
    () => server.health(),
    (h) => h.ingest.buffered === 0 && h.ingest.stored + h.ingest.duplicate === h.ingest.received,
  );
  const before = await countReadings(d.engineId);
  const c = await connect(d);
  const base = Date.now() - 120_000;
  const sends: Promise<unknown>[] = [];
  for (let i = 0; i < 200; i++) {
    const samples = Array.from({ length: 10 }, (_, k) => ({ ts: base + i * 10 + k, values: { coolant_temp: 60 + k, engine_speed: 1800 } }));
    sends.push(c.publishAsync(telemetryTopic(d.engineId), JSON.stringify({ samples }), { qos: 1 }));
  }
  await Promise.all(sends); // every PUBACK received
  const code = await server.stop('SIGTERM');
  expect(code).toBe(0);
  expect(await countReadings(d.engineId)).toBe(before + 200 * 10 * 2);
});
