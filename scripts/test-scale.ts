/**
 * `npm run test:scale`: several servers, one system, with real processes. A throwaway PostgreSQL cluster and
 * Debian's mosquitto 2 (dynamic security) on free ports in temp folders, two Jacketwatch servers (each its own
 * process group) sharing them (MQTT_SHARED_GROUP, one JWT_SECRET), QoS 1 devices, and socket.io clients on
 * both servers. Checks:
 *   1. N published readings give N rows, each MQTT message taken by one server; every socket sees every engine;
 *   2. one alarm gives one e-mail (in the mail catcher) and reaches the sockets of both servers, no event twice;
 *   3. an acknowledgement made on one server reaches the other server's sockets;
 *   4. a device publishing on another engine's topic is refused by the broker (nothing stored);
 *   5. SIGKILL of one server: the other takes all its engines within 30 s; an alarm active on a moved engine
 *      clears on the new owner (rule state moved), a new alarm there is raised and e-mailed once; the killed
 *      server restarted collects what waited in its session: every reading stored once, nothing doubled.
 *   6. Sparkplug B (one Primary Host among the servers): a registered edge node's births and data are stored once
 *      by the server holding the host role while both run (the other takes no Sparkplug message); SIGKILL of the
 *      holder (step 5): the other takes the role within 30 s and asks the node to rebirth; everything the node
 *      sends from its answer on (with what it kept while the host's STATE said offline) is stored once; a revoke
 *      made on the server without the role ends storage for the revoked record on the holder.
 * Prints what it ran and its figures. Exit code 0 when every check held.
 */
import assert from 'node:assert/strict';
import { execFileSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import bcrypt from 'bcryptjs';
import mqtt, { type MqttClient } from 'mqtt';
import { io as connectSocket, type Socket } from 'socket.io-client';
import { createTokenService } from '../server/auth/tokens';
import { telemetryTopic } from '../shared/topics';
import { mosquittoInstalled, startMosquitto, type Mosquitto } from '../test/server/support/mosquitto';
import { spawnInGroup, stopGroup } from '../test/server/support/process-group';
import { Db, freePort } from '../test/server/support/telemetry-server';
import { Client } from '../test/server/support/test-db';
import { TestEdgeNode, type SentValue } from '../test/server/support/sparkplug-edge-node';
import { startPgCluster, type PgCluster } from './with-postgres';

const ROOT = path.resolve(__dirname, '..');
const ENGINES = 8;
const MESSAGES_PER_ENGINE = 25;
const SAMPLES_PER_MESSAGE = 2;
const CHANNELS_PER_SAMPLE = 5;
const PARTITIONS = 64;
const JWT_SECRET = 'scale-test-secret-0123456789-abcdefghijklmnopqrstuvwxyz';
const started = Date.now();

interface Instance {
  name: string;
  child: ChildProcess;
  url: string;
  port: number;
  smtpPort: number;
  dataDir: string;
  output(): string;
}
interface AlarmEvent {
  id: number;
  state: string;
  lastNotifiedAt: string | null;
}
interface Seen {
  readings: Map<number, number>;
  alarms: AlarmEvent[];
}
interface Health {
  status: string;
  broker?: { connected: boolean; sparkplugHost?: { hostId: string; holder: boolean; online: boolean } };
  ingest: { received: number; duplicate: number };
  cluster: { connected: boolean; members: number; owned: number; ownedPartitions: number[]; relay: { sentReadings: number; receivedReadings: number } | null };
}

let pg: PgCluster | null = null;
let mq: Mosquitto | null = null;
const instances: Instance[] = [];
const sockets: Socket[] = [];
const clients: MqttClient[] = [];
let edgeNode: TestEdgeNode | null = null;
let db: Db | null = null;
const figures: Record<string, string | number> = {};

const say = (line: string) => process.stdout.write(`[scale ${((Date.now() - started) / 1000).toFixed(1).padStart(5)} s] ${line}\n`);

async function waitFor<T>(what: string, fn: () => Promise<T> | T, ok: (v: T) => boolean, ms = 30_000): Promise<T> {
  const end = Date.now() + ms;
  let last: T | undefined;
  for (;;) {
    try {
      last = await fn();
      if (ok(last)) return last;
    } catch (err) {
      if (Date.now() > end) throw err;
    }
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}; last ${JSON.stringify(last)?.slice(0, 2000)}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

async function health(s: Instance): Promise<Health> {
  return (await fetch(`${s.url}/api/health`)).json() as Promise<Health>;
}

async function startInstance(name: string, env: Record<string, string>, reuse?: Instance): Promise<Instance> {
  const port = reuse?.port ?? (await freePort());
  const smtpPort = reuse?.smtpPort ?? (await freePort());
  const dataDir = reuse?.dataDir ?? fs.mkdtempSync(path.join(os.tmpdir(), `jw-scale-${name}-`));
  const child = spawnInGroup(process.execPath, [path.join(ROOT, 'node_modules/tsx/dist/cli.mjs'), path.join(ROOT, 'server/main.ts')], {
    cwd: ROOT,
    env: {
      ...process.env,
      ...env,
      PORT: String(port),
      SMTP_PORT: String(smtpPort),
      MQTT_PORT: '0',
      DATA_DIR: dataDir,
      MQTT_CLIENT_ID: `jw-scale-${name}`,
      LOG_LEVEL: process.env.SCALE_LOG_LEVEL ?? 'warn',
      PUBLIC_URL: `http://127.0.0.1:${port}`,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let out = '';
  child.stdout!.on('data', (d) => {
    out += d;
  });
  child.stderr!.on('data', (d) => {
    out += d;
  });
  const s: Instance = { name, child, url: `http://127.0.0.1:${port}`, port, smtpPort, dataDir, output: () => out };
  await waitFor(
    `server ${name} up, connected to the broker and the lease connection`,
    async () => {
      if (child.exitCode !== null) throw new Error(`server ${name} exited:\n${out}`);
      return health(s);
    },
    (h) => h.status === 'ok' && h.broker?.connected === true && h.cluster?.connected === true,
    90_000,
  );
  return s;
}

function killGroup(s: Instance): Promise<void> {
  const exited = new Promise<void>((r) => (s.child.exitCode !== null || s.child.signalCode !== null ? r() : s.child.once('exit', () => r())));
  try {
    process.kill(-s.child.pid!, 'SIGKILL');
  } catch {
    /* gone */
  }
  return exited;
}

function watch(s: Instance, token: string): Promise<Seen> {
  const seen: Seen = { readings: new Map(), alarms: [] };
  const sock = connectSocket(s.url, { auth: { token }, transports: ['websocket'], reconnection: false });
  sockets.push(sock);
  const note = (m: { engineId: number; values: Record<string, unknown> }) =>
    seen.readings.set(m.engineId, (seen.readings.get(m.engineId) ?? 0) + Object.keys(m.values).length);
  sock.on('readings', note);
  // the fleet's readings come in one batch per interval with every engine that changed
  sock.on('readings-batch', (b: { engines: Array<{ engineId: number; values: Record<string, unknown> }> }) => b.engines.forEach(note));
  sock.on('alarm', (a: AlarmEvent) => seen.alarms.push(a));
  return new Promise((resolve, reject) => {
    sock.once('connect_error', reject);
    sock.once('connect', () =>
      sock.emit('watch', { fleet: true, alarms: true }, (r: { rooms?: string[]; error?: string }) => (r.rooms ? resolve(seen) : reject(new Error(r.error)))),
    );
  });
}

/**
 * One message of `samples` samples, 1 s apart from `ts0`; coolant temperature `temp` (or a normal wobble). The
 * engines stand still (speed 0, duty prime): rules for running engines and standby heaters stay out of the way.
 */
function payload(ts0: number, samples: number, temp?: number): string {
  const out = [];
  for (let k = 0; k < samples; k++) {
    const ts = ts0 + k * 1000;
    const wobble = Math.floor(ts / 1000) % 5;
    out.push({
      ts,
      values: {
        coolant_temp: temp ?? 84 + wobble * 0.4,
        coolant_pressure: 95 + wobble * 0.3,
        coolant_conductivity: 2400 + wobble,
        engine_speed: 0,
        ambient_temp: 20 + wobble * 0.1,
      },
    });
  }
  return JSON.stringify({ samples: out });
}

async function main(): Promise<void> {
  if (!mosquittoInstalled) throw new Error('Debian mosquitto 2 is needed (apt-get install -y mosquitto mosquitto-clients)');
  pg = await startPgCluster();
  const cluster = pg;
  // the port answers before the cluster accepts sessions ("the database system is starting up")
  const admin = await waitFor(
    'PostgreSQL accepting sessions',
    async () => {
      const c = new Client({ connectionString: cluster.url });
      await c.connect();
      return c;
    },
    Boolean,
  );
  await admin.query('CREATE DATABASE jacketwatch');
  const pgVersion = (await admin.query<{ v: string }>("SELECT current_setting('server_version') AS v")).rows[0].v;
  await admin.end();
  const databaseUrl = pg.url.replace(/\/postgres$/, '/jacketwatch');
  mq = await startMosquitto();
  const mqVersion = execFileSync('dpkg-query', ['-W', '-f', '${Version}', 'mosquitto'], { encoding: 'utf8' }).trim() || '?';
  say(`PostgreSQL ${pgVersion} at ${databaseUrl}; mosquitto ${mqVersion} (dynamic security) on port ${mq.port}`);
  const env = {
    DATABASE_URL: databaseUrl,
    MQTT_URL: mq.adminUrl,
    MQTT_DEVICE_ACCOUNTS: 'dynsec',
    MQTT_SHARED_GROUP: 'jw',
    JWT_SECRET,
    ESCALATE_AFTER_S: '3600',
  };

  // A first (it applies the migrations), the fleet, then B: the leases split between them
  const a = await startInstance('a', env);
  instances.push(a);
  db = new Db(databaseUrl);
  const now = new Date().toISOString();
  const siteId = await db.run(`INSERT INTO sites (name, time_zone) VALUES ('Scale test pumping station', 'UTC')`);
  const engineIds: number[] = [];
  for (let i = 0; i < ENGINES; i++) {
    engineIds.push(
      await db.run(
        `INSERT INTO engines (site_id, name, duty, capacity_l, coolant_family, glycol_type, glycol_percent, cap_pressure_kpa, oil_drain_interval_h, run_hours, safe_open_temp_c, out_of_service, created_at, updated_at)
       VALUES (?, ?, 'prime', 60, 'conventional', 'ethylene', 50, 100, 250, 0, 50, FALSE, ?, ?)`,
        [siteId, `Scale engine ${i + 1}`, now, now],
      ),
    );
  }
  const adminId = await db.run(
    `INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES ('scale-admin@example.test', 'Scale admin', ?, 'admin', FALSE, ?, ?)`,
    [bcrypt.hashSync('unused-1', 4), now, now],
  );
  const plannerId = await db.run(
    `INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES ('scale-planner@example.test', 'Scale planner', ?, 'planner', FALSE, ?, ?)`,
    [bcrypt.hashSync('unused-2', 4), now, now],
  );
  const token = createTokenService(JWT_SECRET).sign({ id: adminId, email: 'scale-admin@example.test', role: 'admin' });
  const b = await startInstance('b', env);
  instances.push(b);
  say(`two servers: a on ${a.url}, b on ${b.url} (pids ${a.child.pid}, ${b.child.pid}), one database, shared subscription group "jw"`);
  const split = await waitFor(
    'leases split between the two servers',
    async () => [await health(a), await health(b)],
    ([ha, hb]) => ha.cluster.owned + hb.cluster.owned === PARTITIONS && ha.cluster.owned > 0 && hb.cluster.owned > 0 && ha.cluster.members === 2,
  );
  say(`leases: a owns ${split[0].cluster.owned}, b owns ${split[1].cluster.owned} of ${PARTITIONS} partitions`);

  // devices: accounts in the broker (made through b's API: the same database and broker)
  const devices: { engineId: number; username: string; secret: string }[] = [];
  for (const engineId of engineIds) {
    const res = await fetch(`${b.url}/api/devices`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', authorization: `Bearer ${token}` },
      body: JSON.stringify({ engineId, username: `scale-dev-${engineId}` }),
    });
    assert.equal(res.status, 201, `device for engine ${engineId}`);
    const body = (await res.json()) as { username: string; secret: string };
    devices.push({ engineId, username: body.username, secret: body.secret });
  }
  const [seenA, seenB] = [await watch(a, token), await watch(b, token)];
  const deviceClient = async (d: { username: string; secret: string }) => {
    const c = await mqtt.connectAsync(`mqtt://127.0.0.1:${mq!.port}`, {
      username: d.username,
      password: d.secret,
      clientId: `dev-${d.username}`,
      clean: true,
      reconnectPeriod: 200,
    });
    clients.push(c);
    return c;
  };
  const conns = await Promise.all(devices.map(deviceClient));
  const stored = async (ids = engineIds) =>
    Number((await db!.get<{ n: number }>(`SELECT COUNT(*) AS n FROM readings WHERE engine_id IN (${ids.join(',')})`)).n);
  const alarmRows = () =>
    db!.all<{ id: number; engine_id: number; rule: string; state: string; closed_at: unknown }>(
      'SELECT id, engine_id, rule, state, closed_at FROM alarms ORDER BY id',
    );
  const mails = () => db!.all<{ id: number; subject: string }>('SELECT id, subject FROM caught_mail ORDER BY id');
  let published = 0;

  // 1. N readings, each message to one server, every reading stored once; every engine on both servers' sockets
  const t0 = Date.now() - (MESSAGES_PER_ENGINE * SAMPLES_PER_MESSAGE + 2) * 1000;
  const ingestStart = Date.now();
  await Promise.all(
    conns.map(async (c, i) => {
      for (let m = 0; m < MESSAGES_PER_ENGINE; m++) {
        await c.publishAsync(telemetryTopic(devices[i].engineId), payload(t0 + m * SAMPLES_PER_MESSAGE * 1000, SAMPLES_PER_MESSAGE), { qos: 1 });
        published += SAMPLES_PER_MESSAGE * CHANNELS_PER_SAMPLE;
      }
    }),
  );
  const n1 = ENGINES * MESSAGES_PER_ENGINE * SAMPLES_PER_MESSAGE * CHANNELS_PER_SAMPLE;
  assert.equal(published, n1);
  await waitFor(
    `${n1} rows`,
    () => stored(),
    (n) => n === n1,
  );
  figures['1. readings published / rows stored'] = `${n1} / ${await stored()} (${((Date.now() - ingestStart) / 1000).toFixed(1)} s)`;
  const [ha1, hb1] = [await health(a), await health(b)];
  assert.equal(ha1.ingest.received + hb1.ingest.received, n1, 'each message taken by one server');
  assert.equal(ha1.ingest.duplicate + hb1.ingest.duplicate, 0);
  assert.ok(ha1.ingest.received > 0 && hb1.ingest.received > 0, 'both servers took a share');
  figures['1. readings taken by a / b'] = `${ha1.ingest.received} / ${hb1.ingest.received}`;
  for (const [name, seen] of [
    ['a', seenA],
    ['b', seenB],
  ] as const) {
    await waitFor(
      `every engine on ${name}'s socket`,
      () => engineIds.filter((id) => seen.readings.has(id)).length,
      (k) => k === ENGINES,
    );
  }
  say(
    `1. ok: ${n1} readings published, ${n1} rows, taken ${ha1.ingest.received} by a and ${hb1.ingest.received} by b; both sockets saw all ${ENGINES} engines`,
  );

  // 1b. an administrator limits the planner to another site through a: the planner's socket on b is re-scoped too
  const otherSite = await db.run(`INSERT INTO sites (name, time_zone) VALUES ('Scale test reservoir', 'UTC')`);
  const plannerToken = createTokenService(JWT_SECRET).sign({ id: plannerId, email: 'scale-planner@example.test', role: 'planner' });
  const plannerSock = connectSocket(b.url, { auth: { token: plannerToken }, transports: ['websocket'], reconnection: false });
  sockets.push(plannerSock);
  const rescopes: string[][] = [];
  plannerSock.on('rooms', (m: { rooms: string[] }) => rescopes.push(m.rooms));
  const firstRooms = await new Promise<string[]>((resolve, reject) => {
    plannerSock.once('connect_error', reject);
    plannerSock.once('connect', () =>
      plannerSock.emit('watch', { fleet: true, alarms: true }, (r: { rooms?: string[]; error?: string }) =>
        r.rooms ? resolve(r.rooms) : reject(new Error(r.error)),
      ),
    );
  });
  assert.ok(firstRooms.includes('fleet'), `the planner watches the whole fleet first: ${firstRooms.join(', ')}`);
  const limited = await fetch(`${a.url}/api/users/${plannerId}/sites`, {
    method: 'PUT',
    headers: { 'content-type': 'application/json', authorization: `Bearer ${token}` },
    body: JSON.stringify({ siteIds: [otherSite] }),
  });
  assert.equal(limited.status, 200, 'sites set through a');
  const rescoped = await waitFor(
    "the planner's socket on b re-scoped",
    () => rescopes.at(-1) ?? [],
    (r) => r.includes(`site:${otherSite}`),
  );
  assert.ok(!rescoped.includes('fleet') && !rescoped.includes(`site:${siteId}`), `only the other site: ${rescoped.join(', ')}`);
  figures["1b. planner's rooms on b after a site change made on a"] = `${firstRooms.join(', ')} -> ${rescoped.join(', ')}`;
  say(`1b. ok: a site change made on a re-scoped the planner's socket on b (${rescoped.join(', ')})`);

  // 1c. the administrator disables the planner through a: the planner's socket on b is told why, then closed
  const told = new Promise<string>((resolve) => plannerSock.once('session-ended', (m: { reason: string }) => resolve(m.reason)));
  const closed = new Promise<string>((resolve) => plannerSock.once('disconnect', resolve));
  const events: string[] = [];
  void told.then(() => events.push('told'));
  void closed.then(() => events.push('closed'));
  const disabled = await fetch(`${a.url}/api/users/${plannerId}`, {
    method: 'PATCH',
    headers: { 'content-type': 'application/json', authorization: `Bearer ${token}` },
    body: JSON.stringify({ disabled: true }),
  });
  assert.equal(disabled.status, 200, 'planner disabled through a');
  const closeReason = await waitFor("the planner's socket on b closed", () => (events.includes('closed') ? closed : null), Boolean);
  assert.equal(closeReason, 'io server disconnect');
  assert.deepEqual(events, ['told', 'closed'], 'the reason arrives before the socket closes');
  figures["1c. planner's socket on b after a disable made on a"] = `${events.join(', then ')} (${await told})`;
  say(`1c. ok: a disable made on a told and closed the planner's socket on b`);
  // the planner is on the alarm e-mails below: enabled again
  const enabled = await fetch(`${a.url}/api/users/${plannerId}`, {
    method: 'PATCH',
    headers: { 'content-type': 'application/json', authorization: `Bearer ${token}` },
    body: JSON.stringify({ disabled: false }),
  });
  assert.equal(enabled.status, 200, 'planner enabled again');

  // from here on every device publishes every FLOW_MS (ts = wall clock, rising), so no engine falls silent;
  // an engine in `hot` sends 101 °C (coolant_temp_high: 98 °C for 10 s)
  const hot = new Set<number>();
  const lastTs = new Map<number, number>();
  let flowing = true;
  const FLOW_MS = 200;
  const flow = (async () => {
    while (flowing) {
      await Promise.all(
        conns.map(async (c, i) => {
          const id = devices[i].engineId;
          const ts = Math.max(Date.now(), (lastTs.get(id) ?? 0) + FLOW_MS);
          lastTs.set(id, ts);
          await c.publishAsync(telemetryTopic(id), payload(ts, 1, hot.has(id) ? 101 : undefined), { qos: 1 });
          published += CHANNELS_PER_SAMPLE;
        }),
      );
      await new Promise((r) => setTimeout(r, FLOW_MS));
    }
  })();
  flow.catch((err) => say(`flow failed: ${err}`));

  // 2. one alarm -> one e-mail, and the same events once on each server's sockets
  const ownerOf = (engineId: number, h: Health) => h.cluster.ownedPartitions.includes(engineId % PARTITIONS);
  const engineOnA = engineIds.find((id) => ownerOf(id, ha1))!;
  const engineOnA2 = engineIds.find((id) => id !== engineOnA && ownerOf(id, ha1));
  assert.ok(engineOnA && engineOnA2, 'a owns at least two test engines');
  hot.add(engineOnA);
  const [alarm] = await waitFor('one alarm', alarmRows, (r) => r.length >= 1);
  assert.equal(alarm.engine_id, engineOnA);
  assert.equal(alarm.rule, 'coolant_temp_high');
  await waitFor('one e-mail in the catcher', mails, (m) => m.length >= 1);
  const notified = (seen: Seen) => seen.alarms.some((v) => v.id === alarm.id && v.lastNotifiedAt);
  await waitFor("the alarm (notified) on both servers' sockets", () => notified(seenA) && notified(seenB), Boolean);
  const noTwice = (list: AlarmEvent[]) => list.every((v, i) => i === 0 || JSON.stringify(v) !== JSON.stringify(list[i - 1]));
  const ofAlarm = (seen: Seen) => seen.alarms.filter((v) => v.id === alarm.id);
  assert.ok(noTwice(ofAlarm(seenA)) && noTwice(ofAlarm(seenB)), 'no alarm event delivered twice');
  assert.deepEqual(
    ofAlarm(seenA).map((v) => [v.state, v.lastNotifiedAt]),
    ofAlarm(seenB).map((v) => [v.state, v.lastNotifiedAt]),
    "both servers' sockets got the same events",
  );
  assert.equal((await alarmRows()).length, 1, 'one alarm');
  assert.equal((await mails()).length, 1, 'one e-mail');
  figures['2. events of the alarm on a / b sockets'] = `${ofAlarm(seenA).length} / ${ofAlarm(seenB).length}`;
  say(
    `2. ok: alarm ${alarm.id} (${alarm.rule}) on engine ${engineOnA} (lease on a): 1 alarm, 1 e-mail ("${(await mails())[0].subject}"), ${ofAlarm(seenA).length} events on each server's sockets, none twice`,
  );

  // 3. acknowledged on b: a's sockets see it
  const ack = await fetch(`${b.url}/api/alarms/${alarm.id}/acknowledge`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', authorization: `Bearer ${token}` },
    body: JSON.stringify({ note: 'scale test' }),
  });
  assert.equal(ack.status, 200);
  await waitFor("the acknowledgement on a's socket", () => seenA.alarms.some((v) => v.id === alarm.id && v.state === 'acknowledged'), Boolean);
  await waitFor("the acknowledgement on b's socket", () => seenB.alarms.some((v) => v.id === alarm.id && v.state === 'acknowledged'), Boolean);
  say('3. ok: acknowledged through b, seen on the sockets of a and b');

  // 4. a device on another engine's topic is refused by the broker
  const [d0, d1] = [devices[0], devices[1]];
  const oddTs = t0 - 7_777; // a time no other message uses
  const at = async (engineId: number, ts: number) =>
    Number((await db!.get<{ n: number }>('SELECT COUNT(*) AS n FROM readings WHERE engine_id = ? AND ts = ?', [engineId, ts])).n);
  await conns[0].publishAsync(telemetryTopic(d1.engineId), payload(oddTs, 1), { qos: 1 }).catch(() => undefined);
  await conns[0].publishAsync(telemetryTopic(d0.engineId), payload(oddTs, 1), { qos: 1 }); // a fence behind it
  published += CHANNELS_PER_SAMPLE;
  await waitFor(
    'the fence stored',
    () => at(d0.engineId, oddTs),
    (n) => n === CHANNELS_PER_SAMPLE,
  );
  assert.equal(await at(d1.engineId, oddTs), 0, "nothing stored from the other engine's topic");
  assert.match(mq.log(), new RegExp(`Denied PUBLISH from dev-${d0.username}`));
  say(`4. ok: ${d0.username} publishing on engine ${d1.engineId}'s topic denied by the broker, nothing stored`);

  // 6a. Sparkplug B: a holds the host role (it started first); an edge node registered through b, its births and
  // data stored once by a alone
  const [haRole, hbRole] = [await health(a), await health(b)];
  assert.equal(haRole.broker?.sparkplugHost?.holder, true, 'a, started first, holds the Sparkplug host role');
  assert.equal(hbRole.broker?.sparkplugHost?.holder, false, 'b does not');
  const spEngines: number[] = [];
  for (const name of ['Scale edge node engine', 'Scale edge device engine'])
    spEngines.push(
      await db.run(
        `INSERT INTO engines (site_id, name, duty, capacity_l, coolant_family, glycol_type, glycol_percent, cap_pressure_kpa, oil_drain_interval_h, run_hours, safe_open_temp_c, out_of_service, created_at, updated_at)
         VALUES (?, ?, 'prime', 60, 'conventional', 'ethylene', 50, 100, 250, 0, 50, FALSE, ?, ?)`,
        [siteId, name, now, now],
      ),
    );
  const register = async (engineId: number, sparkplug: Record<string, string>) => {
    const res = await fetch(`${b.url}/api/devices`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', authorization: `Bearer ${token}` },
      body: JSON.stringify({ engineId, sparkplug }),
    });
    assert.equal(res.status, 201, `Sparkplug record for engine ${engineId}`);
    return (await res.json()) as { id: number; username: string; secret: string };
  };
  const nodeRecord = await register(spEngines[0], { groupId: 'Scale', edgeNodeId: 'gw1' });
  const pumpRecord = await register(spEngines[1], { groupId: 'Scale', edgeNodeId: 'gw1', deviceId: 'pump1' });
  const node = new TestEdgeNode({
    url: `mqtt://127.0.0.1:${mq.port}`,
    username: nodeRecord.username,
    password: nodeRecord.secret,
    groupId: 'Scale',
    edgeNodeId: 'gw1',
    deviceId: 'pump1',
    hostId: 'jacketwatch',
    everyMs: FLOW_MS,
  });
  edgeNode = node;
  await node.start();
  const spRows = async () =>
    db!.all<{ engine_id: number; ts: number }>(`SELECT engine_id, ts FROM readings WHERE engine_id IN (${spEngines.join(',')}) ORDER BY ts`);
  const keyOf = (v: SentValue) => `${v.of === 'node' ? spEngines[0] : spEngines[1]}/${v.ts}`;
  const rowKeys = async () => new Set((await spRows()).map((r) => `${Number(r.engine_id)}/${Number(r.ts)}`));
  const ingestReport = async (s: Instance) =>
    (
      (await (await fetch(`${s.url}/api/admin/ingest`, { headers: { authorization: `Bearer ${token}` } })).json()) as {
        counters: { sparkplug?: { births: number; rebirthRequests: number; sessionsEndedByRecord: number } };
      }
    ).counters.sparkplug;
  await waitFor(
    'the edge node born and sending',
    () => node.sent.length,
    (n) => n >= 20,
  );
  await node.pause(true);
  const before = [...node.sent];
  await waitFor(
    `the node's ${before.length} values stored`,
    () => spRows(),
    (r) => r.length === before.length,
  );
  const keys0 = await rowKeys();
  assert.ok(
    before.every((v) => keys0.has(keyOf(v))),
    'every value the node sent is a row',
  );
  const [spA, spB] = [await ingestReport(a), await ingestReport(b)];
  assert.ok((spA?.births ?? 0) >= 2 && spB?.births === 0, `births taken by the holder only: a ${spA?.births}, b ${spB?.births}`);
  await node.pause(false);
  figures['6a. Sparkplug values sent / rows while both servers run (births on a / b)'] = `${before.length} / ${keys0.size} (${spA?.births} / ${spB?.births})`;
  say(`6a. ok: a holds the Sparkplug host role; the edge node's ${before.length} values (births and data) stored once, by a only`);

  // 5. SIGKILL a while devices keep publishing: b takes every engine within 30 s. a is started again at once, as its
  // process supervisor would: the broker keeps a's share of the messages in a's persistent session meanwhile
  // (mosquitto 2.0 goes on handing a dead member of a shared group its share), and a collects them when back.
  const killedAt = Date.now();
  await killGroup(a);
  say(`5. a killed (SIGKILL to its process group) while ${ENGINES} devices publish every ${FLOW_MS} ms`);
  const hb2 = await waitFor(
    'b owns every partition',
    () => health(b),
    (h) => h.cluster.owned === PARTITIONS,
    30_000,
  );
  const takeoverS = (Date.now() - killedAt) / 1000;
  figures['5. engines moved to b after SIGKILL of a (s)'] = takeoverS.toFixed(1);
  assert.ok(takeoverS < 30, `take-over in ${takeoverS} s`);
  say(`   b owns ${hb2.cluster.owned} of ${PARTITIONS} partitions ${takeoverS.toFixed(1)} s after the kill (${hb2.cluster.members} server left)`);
  // 6b. the Sparkplug host role moves to b, which asks the node to rebirth
  const askedAt = await waitFor(
    'b asks the edge node to rebirth',
    () => node.rebirthsAsked.find((t) => t > killedAt) ?? 0,
    (t) => t > 0,
    30_000,
  );
  const roleS = (askedAt - killedAt) / 1000;
  assert.ok(roleS < 30, `Sparkplug host role taken over in ${roleS} s`);
  const hbRole2 = await health(b);
  assert.equal(hbRole2.broker?.sparkplugHost?.holder, true, 'b holds the Sparkplug host role');
  const answeredAt = await waitFor(
    'the node answers with its births',
    () => node.rebirthsAnswered.find((t) => t >= askedAt) ?? 0,
    (t) => t > 0,
  );
  const offlineSeen = node.hostOffline.find((t) => t >= killedAt);
  figures['6b. Sparkplug host role on b, rebirth asked, after SIGKILL of a (s)'] = roleS.toFixed(1);
  figures["6b. the host's STATE offline seen by the node after the kill (s)"] = offlineSeen ? ((offlineSeen - killedAt) / 1000).toFixed(2) : 'not seen';
  say(`6b. b took the Sparkplug host role and asked the node to rebirth ${roleS.toFixed(1)} s after the kill; a restarting`);
  const restarting = startInstance('a', env, a);
  // the moved engine cools down: its owner clears and closes the acknowledged alarm, so the rule's state came along
  hot.delete(engineOnA);
  const restarted = await restarting;
  instances[0] = restarted;
  const backS = (Date.now() - killedAt) / 1000;
  figures['5. a back (restarted, connected) after the kill (s)'] = backS.toFixed(1);
  await waitFor(
    'leases split again',
    async () => [await health(restarted), await health(b)],
    ([x, y]) => x.cluster.owned > 0 && y.cluster.owned > 0 && x.cluster.owned + y.cluster.owned === PARTITIONS,
  );
  // 6c. everything the node sent from its answer on (the values it kept while the host was offline, flagged
  // historical, then new data) is stored once
  await waitFor(
    'the node sending on after its rebirth',
    () => node.sent.filter((v) => v.at >= answeredAt && v.kind === 'data').length,
    (n) => n >= 10,
  );
  const after = node.sent.filter((v) => v.at >= answeredAt);
  await waitFor(`the ${after.length} values sent from the rebirth on stored`, rowKeys, (k) => after.every((v) => k.has(keyOf(v))));
  const gap = node.sent.filter((v) => v.at >= killedAt && v.at < answeredAt);
  const keys1 = await rowKeys();
  const sentKeys = new Set(node.sent.map(keyOf));
  assert.ok(
    [...keys1].every((k) => sentKeys.has(k)),
    'no row the node did not send',
  );
  const lostBefore = node.sent.filter((v) => v.at < answeredAt && !keys1.has(keyOf(v)));
  figures['6c. Sparkplug values sent from the rebirth on / stored (of them kept while offline)'] =
    `${after.length} / ${after.filter((v) => keys1.has(keyOf(v))).length} (${after.filter((v) => v.kind === 'historical').length})`;
  figures['6c. Sparkplug values sent between the kill and the rebirth (births) / not stored (sent to the dead holder)'] =
    `${gap.length} (${gap.filter((v) => v.kind === 'birth').length}) / ${lostBefore.length}`;
  say(
    `6c. ok: ${after.length} values sent from the rebirth on all stored once (${after.filter((v) => v.kind === 'historical').length} kept while the host was offline)`,
  );

  // 6d. a revoke made on a (no host role now) ends storage for the revoked record on b (the holder)
  const [haRole3, hbRole3] = [await health(restarted), await health(b)];
  assert.ok(haRole3.broker?.sparkplugHost?.holder === false && hbRole3.broker?.sparkplugHost?.holder === true, 'b holds the role, restarted a not');
  const endedBefore = (await ingestReport(b))?.sessionsEndedByRecord ?? 0;
  const revoked = await fetch(`${restarted.url}/api/devices/${pumpRecord.id}/revoke`, { method: 'POST', headers: { authorization: `Bearer ${token}` } });
  assert.equal(revoked.status, 200, 'pump record revoked through a');
  await waitFor(
    "the node's session ended on b",
    async () => (await ingestReport(b))?.sessionsEndedByRecord ?? 0,
    (n) => n > endedBefore,
  );
  const cutTs = Math.max(...node.sent.filter((v) => v.of === 'device').map((v) => v.ts));
  const effectAt = Date.now();
  // the node goes on sending; b asks it to rebirth, and the pump's DBIRTH finds no record
  await waitFor(
    'a rebirth answered after the revoke, and the pump sending on',
    () => node.sent.filter((v) => v.of === 'device' && v.kind === 'data' && v.at > (node.rebirthsAnswered.find((t) => t > effectAt) ?? Infinity)).length,
    (n) => n >= 5,
  );
  const fence = node.sent.filter((v) => v.of === 'node').at(-1)!;
  await waitFor('a node value sent after those stored', rowKeys, (k) => k.has(keyOf(fence)));
  const pumpAfter = (await spRows()).filter((r) => Number(r.engine_id) === spEngines[1] && Number(r.ts) > cutTs);
  assert.equal(pumpAfter.length, 0, 'nothing stored for the revoked record after the revoke reached the holder');
  const pumpSentAfter = node.sent.filter((v) => v.of === 'device' && v.ts > cutTs).length;
  figures['6d. pump values sent after the revoke reached b / stored'] = `${pumpSentAfter} / 0`;
  say(`6d. ok: a revoke made on a reached b (the holder): ${pumpSentAfter} pump values sent since, none stored`);
  await node.stop();

  await waitFor(
    'the acknowledged alarm cleared and closed',
    alarmRows,
    (r) => r.find((x) => x.id === alarm.id)?.state === 'normal' && r.find((x) => x.id === alarm.id)?.closed_at !== null,
    90_000,
  );
  await waitFor("the close on b's socket", () => seenB.alarms.some((v) => v.id === alarm.id && v.state === 'normal'), Boolean);
  // a new alarm on another engine that moved: raised and e-mailed once
  hot.add(engineOnA2!);
  const hot2 = await waitFor('a second coolant_temp_high alarm, on the other moved engine', alarmRows, (r) =>
    r.some((x) => x.engine_id === engineOnA2 && x.rule === 'coolant_temp_high'),
  );
  const alarm2 = hot2.find((x) => x.engine_id === engineOnA2 && x.rule === 'coolant_temp_high')!;
  const mailsOf = (id: number) => db!.all<{ id: number; sent_at: unknown }>('SELECT id, sent_at FROM outbox WHERE alarm_id = ?', [id]);
  await waitFor(
    'its e-mail sent',
    () => mailsOf(alarm2.id),
    (m) => m.length === 1 && m[0].sent_at !== null,
  );
  say(`   alarm ${alarm.id} cleared and closed after the moves (rule state came along); alarm ${alarm2.id} on engine ${engineOnA2} raised, e-mailed once`);

  // every reading stored once; nothing doubled
  flowing = false;
  await flow;
  const total = await waitFor(
    `all ${published} readings stored`,
    () => stored(),
    (n) => n === published,
    60_000,
  );
  const [ha3, hb3] = [await health(restarted), await health(b)];
  figures['5. readings published / rows stored (whole run)'] = `${published} / ${total}`;
  figures['5. redelivered after the kill, already stored (a restarted / b)'] = `${ha3.ingest.duplicate} / ${hb3.ingest.duplicate}`;
  figures['relay: readings b sent to a / received from a'] = `${hb3.cluster.relay?.sentReadings} / ${hb3.cluster.relay?.receivedReadings}`;
  const outbox = await db.all<{ alarm_id: number; n: number }>('SELECT alarm_id, COUNT(*) AS n FROM outbox GROUP BY alarm_id');
  const all = await alarmRows();
  const byRule = new Map<string, number>();
  for (const r of all) byRule.set(`${r.engine_id}/${r.rule}`, (byRule.get(`${r.engine_id}/${r.rule}`) ?? 0) + 1);
  assert.equal(all.filter((r) => r.rule === 'coolant_temp_high').length, 2, 'two coolant_temp_high alarms, none doubled');
  assert.ok(
    outbox.every((o) => Number(o.n) === 1),
    `one e-mail per alarm: ${JSON.stringify(outbox)}`,
  );
  assert.equal((await mails()).length, outbox.length, 'every e-mail caught once');
  figures['alarms (of them no_data) / e-mails'] = `${all.length} (${all.filter((r) => r.rule === 'no_data').length}) / ${(await mails()).length}`;
  say(`   leases ${ha3.cluster.owned} / ${hb3.cluster.owned}; ${total} of ${published} readings stored once; ${all.length} alarms, one e-mail each`);
}

async function cleanup(): Promise<void> {
  await edgeNode?.stop();
  for (const s of sockets) s.disconnect();
  for (const c of clients) c.end(true);
  await db?.close().catch(() => undefined);
  for (const s of instances) await stopGroup(s.child, 5000);
  await mq?.remove().catch(() => undefined);
  await pg?.stop().catch(() => undefined);
  for (const s of instances) fs.rmSync(s.dataDir, { recursive: true, force: true });
}

let interrupted = false;
for (const sig of ['SIGINT', 'SIGTERM'] as const) {
  process.on(sig, () => {
    if (interrupted) return;
    interrupted = true;
    void cleanup().finally(() => process.exit(130));
  });
}

main().then(
  async () => {
    await cleanup();
    say(
      'ran: PostgreSQL (throwaway cluster), mosquitto 2 (dynamic security, shared subscription), two server processes, QoS 1 devices, a Sparkplug B edge node, socket.io clients on both servers',
    );
    for (const [k, v] of Object.entries(figures)) process.stdout.write(`  ${k}: ${v}\n`);
    say(`test:scale passed in ${((Date.now() - started) / 1000).toFixed(1)} s`);
  },
  async (err) => {
    process.stderr.write(`test:scale FAILED: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}\n`);
    for (const s of instances) process.stderr.write(`--- server ${s.name} output (last 4000 chars) ---\n${s.output().slice(-4000)}\n`);
    for (const s of instances) {
      const h = await health(s).catch(() => null);
      if (h) process.stderr.write(`--- server ${s.name} health ---\n${JSON.stringify(h)}\n`);
    }
    const rows = await db?.all('SELECT id, engine_id, rule, state, raised_at, cleared_at, closed_at FROM alarms ORDER BY id').catch(() => []);
    if (rows?.length) process.stderr.write(`--- alarms ---\n${rows.map((r) => JSON.stringify(r)).join('\n')}\n`);
    await cleanup();
    process.exit(1);
  },
);
