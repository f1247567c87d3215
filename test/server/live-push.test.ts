/**
 * Coalesced live push against a real server process (MQTT on a real port, a real database, socket.io over
 * loopback): fleet and site watchers get `readings-batch` messages (every changed engine of their scope, each
 * once), engine pages get prompt per-engine `readings`, and a user limited to some sites only ever receives
 * engines of their sites. Plus the interval itself on a real socket.io server fed directly (one call, one batch).
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import bcrypt from 'bcryptjs';
import mqtt, { type MqttClient } from 'mqtt';
import { io as ioClient, type Socket } from 'socket.io-client';
import type { LiveReadings, LiveReadingsBatch } from '../../shared/api/live-view';
import { telemetryTopic } from '../../shared/topics';
import { createLogger } from '../../server/logger';
import { LivePush } from '../../server/realtime/live-push';
import type { AcceptedReading, AuthUser } from '../../server/telemetry/types';
import { Db, seedFleet, startServerProcess, type SeededDevice, type ServerProcess } from './support/telemetry-server';
import { until } from './support/until';
import type { ApiAnswer } from './support/api-answer';

/** What one socket received: each message as it came, `readings` as a list of one. */
interface Received {
  batches: LiveReadings[][];
  single: LiveReadings[];
  engines(): LiveReadings[];
}

function record(sock: Socket): Received {
  const got: Received = {
    batches: [],
    single: [],
    engines: () => [...got.batches.flat(), ...got.single],
  };
  sock.on('readings-batch', (b: LiveReadingsBatch) => got.batches.push(b.engines));
  sock.on('readings', (m: LiveReadings) => got.single.push(m));
  return got;
}

describe('live push from a real server', () => {
  let server: ServerProcess;
  let db: Db;
  let siteA: SeededDevice[];
  let siteB: SeededDevice[];
  let siteC: SeededDevice[];
  let adminToken: string;
  let limitedToken: string;
  const clients = new Map<number, MqttClient>();
  const sockets: Socket[] = [];
  const ADMIN_PASSWORD = 'gasket-meadow-lantern-17';
  const LIMITED_PASSWORD = 'copper-thistle-harbour-53';

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

  async function openSocket(token: string, watch: object): Promise<{ sock: Socket; got: Received; rooms: string[] }> {
    const sock = ioClient(server.url, { auth: { token }, transports: ['websocket'], reconnection: false });
    sockets.push(sock);
    await new Promise<void>((resolve, reject) => {
      sock.once('connect', () => resolve());
      sock.once('connect_error', reject);
    });
    const got = record(sock);
    const ack = await sock.timeout(10_000).emitWithAck('watch', watch);
    return { sock, got, rooms: ack.rooms };
  }

  /** One message from the engine's device (QoS 1: acknowledged once stored). */
  async function publish(d: SeededDevice, ts: number, coolantTemp: number): Promise<void> {
    let c = clients.get(d.engineId);
    if (!c) {
      c = await mqtt.connectAsync(`mqtt://127.0.0.1:${server.mqttPort}`, {
        username: d.username,
        password: d.secret,
        reconnectPeriod: 0,
        connectTimeout: 5000,
      });
      clients.set(d.engineId, c);
    }
    await c.publishAsync(telemetryTopic(d.engineId), JSON.stringify({ ts, values: { coolant_temp: coolantTemp, coolant_pressure: 95 } }), { qos: 1 });
  }

  const seenEngines = (got: Received) => new Set(got.engines().map((m) => m.engineId));

  beforeAll(async () => {
    server = await startServerProcess();
    db = new Db(server.databaseUrl);
    siteA = await seedFleet(db, 3, 'lpa');
    siteB = await seedFleet(db, 2, 'lpb');
    siteC = await seedFleet(db, 1, 'lpc');
    await addUser('admin-lp@example.test', 'admin', ADMIN_PASSWORD);
    adminToken = await signIn('admin-lp@example.test', ADMIN_PASSWORD);
    const limitedId = await addUser('tech-lp@example.test', 'technician', LIMITED_PASSWORD);
    expect((await api('PUT', `/api/users/${limitedId}/sites`, adminToken, { siteIds: [siteA[0].siteId, siteC[0].siteId] })).status).toBe(200);
    limitedToken = await signIn('tech-lp@example.test', LIMITED_PASSWORD);
  });

  afterAll(async () => {
    for (const c of clients.values()) c.end(true);
    for (const s of sockets) s.close();
    // SIGTERM: tsx passes it on to the server (SIGKILL would leave the server process orphaned)
    await server?.stop('SIGTERM');
    await db?.close();
  });

  test('fleet, site and engine watchers each get every engine of their scope once; a limited user only their sites', async () => {
    const all = [...siteA, ...siteB, ...siteC];
    const fleetAndEngine = await openSocket(adminToken, { fleet: true, engineIds: [siteA[0].engineId] });
    expect(fleetAndEngine.rooms.sort()).toEqual(['fleet', `engine:${siteA[0].engineId}`].sort());
    const limited = await openSocket(limitedToken, { fleet: true, engineIds: [siteB[0].engineId] });
    // the fleet becomes the user's two sites; the other site's engine is left out (internal feed rooms are not listed)
    expect(limited.rooms.sort()).toEqual([`site:${siteA[0].siteId}`, `site:${siteC[0].siteId}`].sort());
    const enginePage = await openSocket(adminToken, { engineIds: [siteB[1].engineId] });
    const siteWatcher = await openSocket(adminToken, { siteIds: [siteB[0].siteId] });

    const t0 = Date.now() - 5000;
    await Promise.all(all.map((d, i) => publish(d, t0, 70 + i)));
    await until(
      'the fleet socket saw every engine',
      async () => seenEngines(fleetAndEngine.got).size,
      (n) => n === all.length,
    );
    // a second round from one engine of each site: every socket sees it after anything the first round sent it
    // (one connection delivers in order), so what follows is all that the first round brought
    const t1 = t0 + 1000;
    await Promise.all([publish(siteA[0], t1, 90), publish(siteB[0], t1, 91), publish(siteB[1], t1, 92), publish(siteC[0], t1, 93)]);
    const sawSecond = (got: Received, engineId: number) => got.engines().some((m) => m.engineId === engineId && m.ts === t1);
    await until(
      'every socket saw the second round',
      async () => [
        sawSecond(fleetAndEngine.got, siteA[0].engineId) && sawSecond(fleetAndEngine.got, siteB[1].engineId),
        sawSecond(limited.got, siteA[0].engineId) && sawSecond(limited.got, siteC[0].engineId),
        sawSecond(enginePage.got, siteB[1].engineId),
        sawSecond(siteWatcher.got, siteB[0].engineId) && sawSecond(siteWatcher.got, siteB[1].engineId),
      ],
      (xs) => xs.every(Boolean),
    );

    const firstRound = (got: Received) => got.engines().filter((m) => m.ts === t0);
    const idsOf = (ms: LiveReadings[]) => ms.map((m) => m.engineId).sort((a, b) => a - b);
    const sorted = (ds: SeededDevice[]) => ds.map((d) => d.engineId).sort((a, b) => a - b);

    // fleet + engine page on one socket: everything in batches, each engine once, nothing twice for its engine page
    expect(fleetAndEngine.got.single).toEqual([]);
    expect(idsOf(firstRound(fleetAndEngine.got))).toEqual(sorted(all));
    const a0 = firstRound(fleetAndEngine.got).find((m) => m.engineId === siteA[0].engineId)!;
    expect(a0).toEqual({
      engineId: siteA[0].engineId,
      siteId: siteA[0].siteId,
      ts: t0,
      values: { coolant_temp: { value: 70, ts: t0, quality: 0 }, coolant_pressure: { value: 95, ts: t0, quality: 0 } },
    });

    // limited to sites A and C: their engines only, in batches (one message per interval for both sites), never site B's
    expect(idsOf(firstRound(limited.got))).toEqual(sorted([...siteA, ...siteC]));
    const siteBIds = new Set(sorted(siteB));
    expect(limited.got.engines().filter((m) => siteBIds.has(m.engineId))).toEqual([]);
    expect(limited.got.single).toEqual([]);

    // an engine page alone: prompt per-engine messages of that engine only, no batches
    expect(enginePage.got.batches).toEqual([]);
    expect(enginePage.got.single.map((m) => [m.engineId, m.ts])).toEqual([
      [siteB[1].engineId, t0],
      [siteB[1].engineId, t1],
    ]);

    // one site watched: that site's engines, in batches
    expect(idsOf(firstRound(siteWatcher.got))).toEqual(sorted(siteB));
    expect(siteWatcher.got.engines().every((m) => m.siteId === siteB[0].siteId)).toBe(true);
  });
});

describe('the interval, on a real socket.io server fed directly', () => {
  let httpServer: http.Server;
  let push: LivePush;
  const sockets: Socket[] = [];
  const SITE_OF = new Map([
    [1, 10],
    [2, 10],
    [3, 20],
    [4, 20],
  ]);

  beforeAll(async () => {
    httpServer = http.createServer();
    push = new LivePush({
      httpServer,
      verifyToken: (token) => (token === 'admin' ? ({ id: 1, email: 'admin@example.test', role: 'admin' } as AuthUser) : null),
      siteOfEngine: async (id) => SITE_OF.get(id) ?? null,
      log: createLogger('error'),
    });
    await new Promise<void>((resolve) => httpServer.listen(0, '127.0.0.1', resolve));
  });
  afterAll(async () => {
    for (const s of sockets) s.disconnect();
    await push.close();
    await new Promise<void>((resolve) => httpServer.close(() => resolve()));
  });

  const reading = (engineId: number, ts: number, value: number): AcceptedReading => ({ engineId, channel: 'coolant_temp', ts, value, quality: 0 });

  test('readings of many engines in one interval go out as one batch, each engine once with its latest value', async () => {
    const sock = ioClient(`http://127.0.0.1:${(httpServer.address() as AddressInfo).port}`, {
      auth: { token: 'admin' },
      transports: ['websocket'],
      reconnection: false,
    });
    sockets.push(sock);
    await new Promise<void>((resolve, reject) => {
      sock.once('connect', () => resolve());
      sock.once('connect_error', reject);
    });
    const got = record(sock);
    expect((await sock.timeout(5000).emitWithAck('watch', { fleet: true, siteIds: [10], engineIds: [1] })).rooms).toEqual(['fleet', 'site:10', 'engine:1']);
    // warm the site lookups, so the first call below goes out whole at the interval's leading edge
    push.push([1, 2, 3, 4].map((id) => reading(id, 1000, 50)));
    await until(
      'warm-up seen',
      async () => new Set(got.engines().map((m) => m.engineId)).size,
      (n) => n === 4,
    );
    got.batches.length = 0;
    got.single.length = 0;

    // all four engines in one call, then two more values of engines 1 and 3 while that interval is open
    push.push([1, 2, 3, 4].map((id) => reading(id, 2000, 60 + id)));
    push.push([reading(1, 3000, 71), reading(3, 3000, 73)]);
    push.push([reading(1, 4000, 81), reading(3, 2500, 99)]); // engine 3's is older than its newest: not sent
    await until(
      'the later values seen',
      async () => got.engines().filter((m) => m.ts === 4000 || m.ts === 3000).length,
      (n) => n === 2,
    );
    expect(got.single).toEqual([]); // engine 1's page: in the batches already
    // the first call goes out whole (at once, or with the others when the warm-up's interval was still open)
    const layout = got.batches.map((b) => b.map((m) => [m.engineId, m.values.coolant_temp?.value]));
    expect(layout[0].map(([id]) => id)).toEqual([1, 2, 3, 4]);
    expect(layout.length).toBeLessThanOrEqual(2);
    for (const b of got.batches) expect(new Set(b.map((m) => m.engineId)).size).toBe(b.length); // each engine once a message
    if (layout.length === 2) {
      expect(layout[0]).toEqual([
        [1, 61],
        [2, 62],
        [3, 63],
        [4, 64],
      ]);
      expect(layout[1]).toEqual([
        [1, 81],
        [3, 73],
      ]);
    } else
      expect(layout[0]).toEqual([
        [1, 81],
        [2, 62],
        [3, 73],
        [4, 64],
      ]);
  });
});
