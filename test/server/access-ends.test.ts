/**
 * Access ends when it should, against a real server process: revoke and rotate cut a connected
 * device off at once (MQTT on a real port), and disabling a user, a password reset or new sites
 * end their HTTP sessions and close their open sockets (socket.io over loopback).
 */
import bcrypt from 'bcryptjs';
import mqtt, { type MqttClient } from 'mqtt';
import { io as ioClient, type Socket } from 'socket.io-client';
import { telemetryTopic } from '../../shared/topics';
import { Db, seedFleet, startServerProcess, type SeededDevice, type ServerProcess } from './support/telemetry-server';
import { until } from './support/until';
import type { ApiAnswer } from './support/api-answer';

let server: ServerProcess;
let db: Db;
let fleet: SeededDevice[];
let adminToken: string;
const clients: MqttClient[] = [];
const sockets: Socket[] = [];
const ADMIN_PASSWORD = 'kettle-lantern-orchard-42';

const connect = async (username: string, password: string): Promise<MqttClient> => {
  const c = await mqtt.connectAsync(`mqtt://127.0.0.1:${server.mqttPort}`, { username, password, reconnectPeriod: 0, connectTimeout: 5000 });
  clients.push(c);
  return c;
};

async function api(method: string, path: string, token: string | null, body?: unknown): Promise<{ status: number; body: ApiAnswer }> {
  const res = await fetch(server.url + path, {
    method,
    headers: { 'content-type': 'application/json', ...(token ? { authorization: `Bearer ${token}` } : {}) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await res.text();
  return { status: res.status, body: text ? JSON.parse(text) : null };
}

async function addUser(email: string, role: string, password: string): Promise<number> {
  const now = new Date().toISOString();
  return db.run(`INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, ?, FALSE, ?, ?)`, [
    email,
    `Test ${role}`,
    bcrypt.hashSync(password, 4),
    role,
    now,
    now,
  ]);
}

async function signIn(email: string, password: string): Promise<string> {
  const res = await api('POST', '/api/auth/login', null, { email, password });
  expect(res.status).toBe(200);
  return res.body.token;
}

async function openSocket(token: string): Promise<Socket> {
  const sock = ioClient(server.url, { auth: { token }, transports: ['websocket'], reconnection: false });
  sockets.push(sock);
  await new Promise<void>((resolve, reject) => {
    sock.once('connect', () => resolve());
    sock.once('connect_error', reject);
  });
  return sock;
}

const refusedSocket = (token: string) =>
  new Promise<Error>((resolve, reject) => {
    const sock = ioClient(server.url, { auth: { token }, transports: ['websocket'], reconnection: false });
    sockets.push(sock);
    sock.once('connect', () => reject(new Error('socket connected with an ended session')));
    sock.once('connect_error', resolve);
  });

const serverClosed = (sock: Socket) => new Promise<string>((resolve) => sock.once('disconnect', (reason) => resolve(reason)));
const mqttClosed = (c: MqttClient) => new Promise<void>((resolve) => c.once('close', () => resolve()));
const countReadings = (engineId: number) => db.get<{ n: number }>('SELECT COUNT(*) AS n FROM readings WHERE engine_id = ?', [engineId]).then((r) => r.n);

beforeAll(async () => {
  server = await startServerProcess();
  db = new Db(server.databaseUrl);
  fleet = await seedFleet(db, 4, 'ae');
  await addUser('admin@example.test', 'admin', ADMIN_PASSWORD);
  adminToken = await signIn('admin@example.test', ADMIN_PASSWORD);
});

afterAll(async () => {
  for (const c of clients) c.end(true);
  for (const s of sockets) s.close();
  // SIGTERM: tsx passes it on to the server (SIGKILL would leave the server process orphaned)
  await server?.stop('SIGTERM');
  await db?.close();
});

describe('devices', () => {
  test('revoke closes the live connection at once and refuses the secret from then on, cached or not', async () => {
    const d = fleet[0];
    const first = await connect(d.username, d.secret);
    // a second login with the same secret comes from the broker's login cache
    const cachedLogin = await connect(d.username, d.secret);
    await first.publishAsync(telemetryTopic(d.engineId), JSON.stringify({ ts: Date.now() - 1000, values: { coolant_temp: 70 } }), { qos: 1 });
    await until(
      'reading stored',
      () => countReadings(d.engineId),
      (n) => n === 1,
    );

    const closed = Promise.all([mqttClosed(first), mqttClosed(cachedLogin)]);
    expect((await api('POST', `/api/devices/${d.deviceId}/revoke`, adminToken)).status).toBe(200);
    await closed;
    await expect(connect(d.username, d.secret)).rejects.toThrow(/bad username or password|not authorized/i);
    expect(await countReadings(d.engineId)).toBe(1);
  });

  test('rotate closes the connection; the old secret is refused at once, the new one connects', async () => {
    const d = fleet[1];
    const live = await connect(d.username, d.secret);
    await connect(d.username, d.secret); // now in the login cache
    const closed = mqttClosed(live);
    const res = await api('POST', `/api/devices/${d.deviceId}/rotate`, adminToken);
    expect(res.status).toBe(200);
    await closed;
    await expect(connect(d.username, d.secret)).rejects.toThrow(/bad username or password|not authorized/i);
    const fresh = await connect(d.username, res.body.secret);
    await fresh.publishAsync(telemetryTopic(d.engineId), JSON.stringify({ ts: Date.now() - 1000, values: { coolant_temp: 71 } }), { qos: 1 });
    await until(
      'reading with the new secret stored',
      () => countReadings(d.engineId),
      (n) => n === 1,
    );
  });

  test('failed device logins are counted per device and shown to the admin', async () => {
    const d = fleet[2];
    for (let i = 0; i < 3; i++) await expect(connect(d.username, 'wrong-secret')).rejects.toThrow();
    const report = await until(
      'login_failed persisted',
      () => api('GET', '/api/admin/ingest', adminToken),
      (r) => r.body.rejections!.some((x) => x.deviceId === d.deviceId && x.reason === 'login_failed' && x.count === 3),
    );
    const row = report.body.rejections!.find((x) => x.deviceId === d.deviceId && x.reason === 'login_failed');
    expect(row).toMatchObject({ username: d.username, engineId: d.engineId });
    expect(row!.lastDetail).toMatch(/wrong secret/);
  });
});

describe('people', () => {
  test('disabling a user closes their open socket, refuses a new handshake and HTTP with the old token', async () => {
    const id = await addUser('operator1@example.test', 'operator', 'pumphouse-window-7731');
    const token = await signIn('operator1@example.test', 'pumphouse-window-7731');
    const sock = await openSocket(token);
    expect((await sock.emitWithAck('watch', { fleet: true, alarms: true })).rooms).toEqual(['fleet', 'alarms']);
    const gone = serverClosed(sock);
    expect((await api('PATCH', `/api/users/${id}`, adminToken, { disabled: true })).status).toBe(200);
    expect(await gone).toBe('io server disconnect');
    expect((await refusedSocket(token)).message).toMatch(/unauthorized/);
    expect((await api('GET', '/api/auth/me', token)).status).toBe(401);
  });

  test('a password reset ends the old sessions (HTTP and socket); the new password starts a new one', async () => {
    const id = await addUser('planner1@example.test', 'planner', 'first-password-for-planner');
    const token = await signIn('planner1@example.test', 'first-password-for-planner');
    const sock = await openSocket(token);
    const gone = serverClosed(sock);
    expect((await api('PATCH', `/api/users/${id}`, adminToken, { password: 'second-password-for-planner' })).status).toBe(200);
    expect(await gone).toBe('io server disconnect');
    expect((await api('GET', '/api/auth/me', token)).status).toBe(401);
    expect((await refusedSocket(token)).message).toMatch(/unauthorized/);
    const fresh = await signIn('planner1@example.test', 'second-password-for-planner');
    expect((await api('GET', '/api/auth/me', fresh)).status).toBe(200);
    await openSocket(fresh);
  });

  test('new sites re-scope the open socket at once (HTTP reads the new sites); a new role ends the sessions', async () => {
    const other = (await seedFleet(db, 1, 'ae-other'))[0];
    const id = await addUser('tech1@example.test', 'technician', 'valve-gasket-sprocket');
    let token = await signIn('tech1@example.test', 'valve-gasket-sprocket');
    let sock = await openSocket(token);
    expect((await sock.emitWithAck('watch', { fleet: true, alarms: true })).rooms).toEqual(['fleet', 'alarms']);
    expect((await api('GET', `/api/engines/${other.engineId}`, token)).status).toBe(200);
    const rescoped = new Promise<{ rooms: string[] }>((resolve) => sock.once('rooms', resolve));
    expect((await api('PUT', `/api/users/${id}/sites`, adminToken, { siteIds: [fleet[0].siteId] })).status).toBe(200);
    expect((await rescoped).rooms).toEqual([`site:${fleet[0].siteId}`, `alarms:site:${fleet[0].siteId}`]);
    expect(sock.connected).toBe(true);
    expect((await api('GET', `/api/engines/${other.engineId}`, token)).status).toBe(404);
    // readings of the other site no longer reach the socket; its own site's still do
    const seen: number[] = [];
    sock.on('readings', (m: { engineId: number }) => seen.push(m.engineId));
    sock.on('readings-batch', (b: { engines: Array<{ engineId: number }> }) => seen.push(...b.engines.map((m) => m.engineId)));
    const own = fleet[3];
    const otherClient = await connect(other.username, other.secret);
    await otherClient.publishAsync(telemetryTopic(other.engineId), JSON.stringify({ ts: Date.now() - 1000, values: { coolant_temp: 60 } }), { qos: 1 });
    await until(
      'other reading stored',
      () => countReadings(other.engineId),
      (n) => n === 1,
    );
    const ownClient = await connect(own.username, own.secret);
    await ownClient.publishAsync(telemetryTopic(own.engineId), JSON.stringify({ ts: Date.now() - 1000, values: { coolant_temp: 61 } }), { qos: 1 });
    await until(
      'own site reading pushed',
      async () => seen,
      (s) => s.includes(own.engineId),
    );
    expect(seen).not.toContain(other.engineId);

    token = await signIn('tech1@example.test', 'valve-gasket-sprocket');
    sock = await openSocket(token);
    const gone = serverClosed(sock);
    expect((await api('PATCH', `/api/users/${id}`, adminToken, { role: 'operator' })).status).toBe(200);
    expect(await gone).toBe('io server disconnect');
    expect((await refusedSocket(token)).message).toMatch(/unauthorized/);
    expect((await api('GET', '/api/auth/me', token)).status).toBe(401);
    // other changes (the name) keep sessions
    token = await signIn('tech1@example.test', 'valve-gasket-sprocket');
    expect((await api('PATCH', `/api/users/${id}`, adminToken, { name: 'Renamed technician' })).status).toBe(200);
    expect((await api('GET', '/api/auth/me', token)).status).toBe(200);
  });
});
