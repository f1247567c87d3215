/**
 * Sparkplug B gateways on an external broker (MQTT_URL): the broker authenticates the gateway; the server
 * subscribes to spBv1.0/# and takes births and data for the edge nodes registered here, asks a node it
 * has no session for to rebirth (NCMD through the external broker), refuses and counts an edge node with
 * no record, and after a revoke stores nothing more for the revoked record. Real processes: a plain broker
 * process, the server, a gateway client.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import bcrypt from 'bcryptjs';
import mqtt, { type MqttClient } from 'mqtt';
import { loadJwtSecret } from '../../server/auth/jwt-secret';
import { createTokenService } from '../../server/auth/tokens';
import { Db, freePort, seedFleet, startServerProcess, type SeededDevice, type ServerProcess } from './support/telemetry-server';
import { until } from './support/until';
import { apiCall, rejectionCounts, storedReadings } from './support/device-api';
import { Boolean_, decode, Double, encode, UInt64 } from './support/sparkplug-payload';

jest.setTimeout(120_000);

let broker: ChildProcess;
let brokerOut = '';
let brokerPort: number;
let server: ServerProcess;
let db: Db;
let fleet: SeededDevice[];
let adminToken: string;
const clients: MqttClient[] = [];

const api = (method: string, p: string, body?: unknown) => apiCall(server.url, adminToken, method, p, body);
const readings = (engineId: number) => storedReadings(db, engineId);
const rejections = (deviceId: number) => rejectionCounts(db, deviceId);

/** Messages refused for their topic, by the ingest counters (an unknown edge node has no record to count them on). */
const wrongTopics = async () =>
  ((await api('GET', '/api/admin/ingest')).body as { counters: { rejected: Record<string, number> } }).counters.rejected.wrong_topic ?? 0;

/** A gateway on the external broker: any credentials, the broker lets it in. */
async function gateway(): Promise<{ c: MqttClient; commands: string[] }> {
  const c = await mqtt.connectAsync(`mqtt://127.0.0.1:${brokerPort}`, { reconnectPeriod: 0, connectTimeout: 5000 });
  clients.push(c);
  const commands: string[] = [];
  c.on('message', (topic, payload) => {
    if (/\/[ND]CMD\//.test(topic)) commands.push(`${topic} ${JSON.stringify(decode(payload).metrics.map((m) => [m.name, m.booleanValue]))}`);
  });
  return { c, commands };
}

const births = async (c: MqttClient, group: string, node: string, device: string, base: number) => {
  await c.publishAsync(
    `spBv1.0/${group}/NBIRTH/${node}`,
    encode({
      timestamp: base,
      seq: 0,
      metrics: [
        { name: 'bdSeq', datatype: UInt64, longValue: 0 },
        { name: 'Node Control/Rebirth', datatype: Boolean_, booleanValue: false },
      ],
    }),
  );
  await c.publishAsync(
    `spBv1.0/${group}/DBIRTH/${node}/${device}`,
    encode({ timestamp: base, seq: 1, metrics: [{ name: 'coolant_temp', alias: 1, datatype: Double, doubleValue: 80 }] }),
  );
};

beforeAll(async () => {
  brokerPort = await freePort();
  broker = spawn(process.execPath, ['--import', 'tsx', path.join(__dirname, 'support/plain-broker.ts')], {
    cwd: path.resolve(__dirname, '../..'),
    stdio: ['ignore', 'pipe', 'pipe'],
    detached: true,
    env: { ...process.env, PLAIN_BROKER_PORT: String(brokerPort) },
  });
  broker.stdout!.on('data', (d) => (brokerOut += d));
  await until(
    'plain broker ready',
    async () => brokerOut,
    (o) => o.includes('ready\n'),
  );
  server = await startServerProcess({ env: { MQTT_URL: `mqtt://127.0.0.1:${brokerPort}` } });
  // telemetry on the server's own client; Sparkplug on the host role's client (one server: it holds the role)
  await until(
    'server subscribed to telemetry and Sparkplug',
    async () => brokerOut.split('\n'),
    (lines) => lines.includes('subscribed jacketwatch-server') && lines.includes('subscribed jacketwatch-sparkplug-host'),
  );
  db = new Db(server.databaseUrl);
  fleet = await seedFleet(db, 2, 'spx');
  const now = new Date().toISOString();
  const adminId = await db.run(
    `INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, 'admin', FALSE, ?, ?)`,
    ['spx-admin@example.test', 'Test admin', bcrypt.hashSync('not-used-here', 4), now, now],
  );
  adminToken = createTokenService(loadJwtSecret(server.dataDir)).sign({ id: adminId, email: 'spx-admin@example.test', role: 'admin' });
});

afterAll(async () => {
  await Promise.all(clients.map((c) => c.endAsync(true).catch(() => undefined)));
  await server?.stop('SIGTERM');
  await db?.close();
  if (broker?.pid) process.kill(-broker.pid, 'SIGKILL');
});

test('births and data of a registered edge node are stored; data before a birth asks the node to rebirth', async () => {
  const d = fleet[0];
  const reg = await api('POST', '/api/devices', { engineId: d.engineId, sparkplug: { groupId: 'Works', edgeNodeId: 'gwx', deviceId: 'pump1' } });
  expect(reg.status).toBe(201);
  const { c, commands } = await gateway();
  await c.subscribeAsync('spBv1.0/Works/NCMD/gwx');
  const base = Date.now() - 20_000;
  // data with no session on the server (as after its restart): counted, and a rebirth asked through the broker
  await c.publishAsync('spBv1.0/Works/DDATA/gwx/pump1', encode({ timestamp: base, seq: 5, metrics: [{ alias: 1, doubleValue: 70 }] }));
  await until(
    'rebirth requested',
    async () => commands,
    (xs) => xs.some((x) => x.startsWith('spBv1.0/Works/NCMD/gwx') && x.includes('"Node Control/Rebirth",true')),
  );
  await births(c, 'Works', 'gwx', 'pump1', base + 1000);
  await c.publishAsync('spBv1.0/Works/DDATA/gwx/pump1', encode({ timestamp: base + 2000, seq: 2, metrics: [{ alias: 1, doubleValue: 81.5 }] }));
  const rows = await until(
    'birth and data stored',
    () => readings(d.engineId),
    (r) => r.length === 2,
  );
  expect(rows).toEqual([
    { channel: 1, ts: base + 1000, value: 80, quality: 0 },
    { channel: 1, ts: base + 2000, value: 81.5, quality: 0 },
  ]);
  await until(
    'the data before the birth counted on the record',
    () => rejections(reg.body.id),
    (r) => r.sparkplug_unknown_alias === 1,
  );
  const refusedBefore = await wrongTopics();

  // revoked: the broker still lets the gateway in, but nothing more is stored for the record
  expect((await api('POST', `/api/devices/${reg.body.id}/revoke`)).status).toBe(200);
  await c.publishAsync('spBv1.0/Works/DDATA/gwx/pump1', encode({ timestamp: base + 3000, seq: 3, metrics: [{ alias: 1, doubleValue: 90 }] }));
  await births(c, 'Works', 'gwx', 'pump1', base + 4000);
  await c.publishAsync('spBv1.0/Works/DDATA/gwx/pump1', encode({ timestamp: base + 5000, seq: 2, metrics: [{ alias: 1, doubleValue: 91 }] }));
  await until(
    'the births after the revoke refused: no record for the node',
    () => wrongTopics(),
    (n) => n >= refusedBefore + 2,
  );
  expect(await readings(d.engineId)).toHaveLength(2);
});

test('the host publishes its STATE (retained, online, JSON) for the edge nodes to watch', async () => {
  const { c } = await gateway();
  const states: string[] = [];
  c.on('message', (topic, payload) => topic === 'spBv1.0/STATE/jacketwatch' && states.push(payload.toString()));
  await c.subscribeAsync('spBv1.0/STATE/+');
  const [state] = await until(
    'the retained STATE',
    async () => states,
    (xs) => xs.length > 0,
  );
  const parsed = JSON.parse(state) as { online: boolean; timestamp: number };
  expect(parsed.online).toBe(true);
  expect(Number.isInteger(parsed.timestamp) && parsed.timestamp <= Date.now()).toBe(true);
  const health = (await (await fetch(`${server.url}/api/health`)).json()) as { broker: { sparkplugHost: unknown } };
  expect(health.broker.sparkplugHost).toEqual({ hostId: 'jacketwatch', holder: true, online: true });
});

test('an edge node with no record here is refused and counted; nothing is stored', async () => {
  const { c } = await gateway();
  const before = await wrongTopics();
  await births(c, 'Works', 'stranger', 'x1', Date.now() - 5000);
  await until(
    'refusals counted',
    () => wrongTopics(),
    (n) => n >= before + 2,
  );
  expect(await readings(fleet[1].engineId)).toHaveLength(0);
});
