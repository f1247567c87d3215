/**
 * Integration: ONE real server process (broker, HTTP, mail catcher) on random ports with the demo seed,
 * and ONE real simulator process at 30x driving all eight demo engines. Through the simulator's control
 * endpoint five engines each get one fault scenario at once; three stay in normal running (the continuous-duty
 * engine runs all the time, two standby sets wait on their heaters). Each fault must raise its matching alarm
 * (rule key) on its own engine once within 2 minutes, with its e-mail caught over SMTP and its event pushed
 * to a browser socket in the `alarms` room; an unacknowledged alarm must escalate (ESCALATE_AFTER_S is short
 * here); the normal engines must raise nothing over 3 minutes (90 simulated minutes).
 *
 * No cold start among the normal engines: --speed 30 makes a warm-up 30 times steeper per wall-clock minute,
 * which the rate rule (per minute of reading time) rightly calls fast. Warm-ups at physical speed are
 * covered by test/server/alarms-normal-running.test.ts.
 *
 * Test-only settings, and why:
 * - NOTIFY_MIN_PRIORITY=low: kept so that every rule e-mails here whatever its priority.
 * - The stuck-sensor rule's duration is 600 s of readings' (wall-clock) time; --speed shortens physics, not
 *   the rule clocks, so the test sets a per-engine override of 60 s on the stuck engine, as an administrator
 *   would through the rules API. Every other rule runs with its default parameters.
 */
import { spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { io as ioClient, type Socket } from 'socket.io-client';
import { freePort, waitFor } from './support/alarm-db';
import { spawnInGroup, stopGroup } from './support/process-group';
import { createTestDatabase, type TestDatabase } from './support/test-db';

const ROOT = path.resolve(__dirname, '../..');
const TSX = path.join(ROOT, 'node_modules/.bin/tsx');
const PASSWORD = 'jacketwatch-demo';
const ESCALATE_AFTER_S = 15;
const NORMAL_RUN_MS = 180_000;

jest.setTimeout(300_000);

let dataDir: string;
let server: ChildProcess | null = null;
let sim: ChildProcess | null = null;
let base: string;
let controlBase: string;
let env: NodeJS.ProcessEnv;
let database: TestDatabase | null = null;

function run(args: string[], name: string): ChildProcess {
  const out = fs.openSync(path.join(dataDir, `${name}.log`), 'a');
  return spawnInGroup(TSX, args, { cwd: ROOT, env, stdio: ['ignore', out, out] });
}

async function api<T>(method: string, p: string, token?: string, body?: unknown): Promise<{ status: number; body: T }> {
  const res = await fetch(base + p, {
    method,
    headers: { 'content-type': 'application/json', ...(token ? { authorization: `Bearer ${token}` } : {}) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  return { status: res.status, body: (await res.json().catch(() => null)) as T };
}

async function control(p: string, body: unknown = {}): Promise<void> {
  const res = await fetch(controlBase + p, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) });
  if (!res.ok) throw new Error(`simulator control ${p}: ${res.status} ${await res.text()}`);
}

const stopChild = (c: ChildProcess | null) => stopGroup(c);

interface AlarmRow {
  id: number;
  engineId: number;
  rule: string;
  state: string;
  priority: string;
  value: number | null;
  unit: string | null;
  escalationLevel: number;
  raisedAt: string;
}
interface Mail {
  id: number;
  to: string;
  subject: string;
  text: string;
}

/** Scenario -> the rule that must answer it. Engines are the seed's order (ids from the devices file). */
const FAULTS = [
  { scenario: 'overheat', rule: 'coolant_temp_high', index: 0 },
  { scenario: 'contamination', rule: 'conductivity_high', index: 1 },
  { scenario: 'lost-comms', rule: 'no_data', index: 2 },
  { scenario: 'leak', rule: 'coolant_pressure_low_running', index: 3 },
  { scenario: 'stuck-sensor', rule: 'coolant_temp_stuck', index: 4 },
] as const;
/** Index 5 is the continuous-duty engine (always running); 6 and 7 are standby sets. */
const NORMAL = [5, 6, 7];
const NORMAL_RUNNING = 5;

let admin: string;
let engineIds: number[];
let socket: Socket | null = null;

beforeAll(async () => {
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-scenario-'));
  const [port, mqttPort, smtpPort, controlPort] = [await freePort(), await freePort(), await freePort(), await freePort()];
  base = `http://127.0.0.1:${port}`;
  controlBase = `http://127.0.0.1:${controlPort}`;
  database = await createTestDatabase(dataDir);
  env = {
    ...process.env,
    PORT: String(port),
    MQTT_PORT: String(mqttPort),
    SMTP_PORT: String(smtpPort),
    DATA_DIR: dataDir,
    DATABASE_URL: database.url,
    LOG_LEVEL: 'info',
    PUBLIC_URL: base,
    ESCALATE_AFTER_S: String(ESCALATE_AFTER_S),
    NOTIFY_MIN_PRIORITY: 'low',
  };
  const seeded = spawnSync(TSX, ['seeds/cli.ts'], { cwd: ROOT, env, encoding: 'utf8' });
  if (seeded.status !== 0) throw new Error(`seed failed: ${seeded.stderr}`);
  server = run(['server/main.ts'], 'server');
  await waitFor(
    async () =>
      (await fetch(`${base}/api/health`)
        .then((r) => r.ok)
        .catch(() => false)) || null,
    90_000,
    500,
  );
  admin = (await api<{ token: string }>('POST', '/api/auth/login', undefined, { email: 'admin@jacketwatch.test', password: PASSWORD })).body.token;
  const devices = JSON.parse(fs.readFileSync(path.join(dataDir, 'demo-devices.json'), 'utf8')) as { devices: { engineId: number }[] };
  engineIds = devices.devices.map((d) => d.engineId);
  expect(engineIds).toHaveLength(8);
}, 120_000);

afterAll(async () => {
  socket?.close();
  await stopChild(sim);
  await stopChild(server);
  if (!process.env.KEEP_DATA) await database?.drop();
  if (process.env.KEEP_DATA) process.stdout.write(`data kept in ${dataDir}\n`);
  else fs.rmSync(dataDir, { recursive: true, force: true });
});

it('five faults on five engines: each raises its own alarm once, e-mails it, escalates; normal engines stay quiet', async () => {
  const stuckEngine = engineIds[FAULTS.find((f) => f.scenario === 'stuck-sensor')!.index];
  const override = await api('PUT', `/api/rules/engines/${stuckEngine}`, admin, {
    rules: [{ rule: 'coolant_temp_stuck', enabled: true, params: { durationS: 60 } }],
  });
  expect(override.status).toBe(200);

  sim = run(['simulator/cli.ts', '--speed', '30', '--rate', '1', '--seed', '7', '--control-port', String(new URL(controlBase).port)], 'simulator');
  await waitFor(
    async () =>
      (await fetch(`${controlBase}/engines`)
        .then((r) => r.ok)
        .catch(() => false)) || null,
    60_000,
    250,
  );
  // every engine's data stored before the faults begin: a gateway that never spoke is not a lost one
  await waitFor(
    async () => {
      const engines = (await api<{ id: number; lastSeenAt: string | null }[]>('GET', '/api/engines', admin)).body;
      return engineIds.every((id) => engines.find((e) => e.id === id)?.lastSeenAt) || null;
    },
    60_000,
    250,
  );

  // a browser's socket in the alarms room only: alarm events, no readings
  const pushed: { alarms: AlarmRow[]; readings: number } = { alarms: [], readings: 0 };
  socket = ioClient(base, { auth: { token: admin }, transports: ['websocket'], reconnection: false });
  socket.on('alarm', (a: AlarmRow) => pushed.alarms.push(a));
  socket.on('readings', () => (pushed.readings += 1));
  socket.on('readings-batch', () => (pushed.readings += 1));
  expect(await socket.timeout(10_000).emitWithAck('watch', { alarms: true })).toEqual({ rooms: ['alarms'] });

  const started = Date.now();
  for (const f of FAULTS) await control(`/engines/${engineIds[f.index]}/scenario`, { name: f.scenario });

  const alarmsOf = async (engineId: number) => (await api<AlarmRow[]>('GET', `/api/alarms?state=all&engineId=${engineId}`, admin)).body;
  const mails = async () => (await api<Mail[]>('GET', '/api/admin/mail', admin)).body;

  // each fault: its alarm within 2 minutes of the fault starting, and its e-mail to the technician on call
  const raised = new Map<string, AlarmRow>();
  await waitFor(
    async () => {
      for (const f of FAULTS) {
        if (raised.has(f.scenario)) continue;
        const hit = (await alarmsOf(engineIds[f.index])).find((a) => a.rule === f.rule);
        if (hit) raised.set(f.scenario, hit);
      }
      return raised.size === FAULTS.length || null;
    },
    120_000,
    1000,
  ).catch(() => {
    throw new Error(`within 2 minutes only ${[...raised.keys()].join(', ') || 'none'} raised their alarm`);
  });

  const overheat = raised.get('overheat')!;
  expect(overheat.value).toBeGreaterThan(98);
  expect(overheat.unit).toBe('degC');
  const leak = raised.get('leak')!;
  expect(leak.value).toBeLessThan(30);

  const all = await waitFor(
    async () => {
      const m = await mails();
      return [...raised.values()].every((a) => m.some((x) => x.to === 'tech@jacketwatch.test' && x.text.includes(`/alarms/${a.id}`))) && m;
    },
    30_000,
    1000,
  );
  const overheatMail = all.find((m) => m.to === 'tech@jacketwatch.test' && m.text.includes(`/alarms/${overheat.id}`))!;
  expect(overheatMail.subject).toContain('Coolant temperature high');
  expect(overheatMail.text).toMatch(/°C \(\d+\.\d °F\)/);

  // nobody acknowledges: after ESCALATE_AFTER_S the backup on call is told, then the planners
  // (in the demo rota the planner is the backup, so the planner gets both)
  const escalated = await waitFor(
    async () => {
      const m = (await mails()).filter((x) => x.to === 'planner@jacketwatch.test' && x.text.includes(`/alarms/${overheat.id}`));
      const backup = m.find((x) => x.text.includes('backup on call'));
      const planners = m.find((x) => x.text.includes('as the planner'));
      return backup && planners ? [backup, planners] : null;
    },
    (2 * ESCALATE_AFTER_S + 30) * 1000,
    1000,
  );
  for (const m of escalated) expect(m.subject).toMatch(/^Not yet acknowledged:/);
  // (the mail can be caught before the level is written: wait for the level itself)
  const detail = await waitFor(async () => {
    const d = (await api<{ escalationLevel: number; history: { event: string }[] }>('GET', `/api/alarms/${overheat.id}`, admin)).body;
    return d.escalationLevel === 2 && d;
  }, 10_000);
  expect(detail.history.map((h) => h.event)).toEqual(expect.arrayContaining(['notified', 'escalated', 'escalated']));

  // run on to 3 minutes (90 simulated minutes): the normal engines raise nothing, each fault's alarm stays one
  await new Promise((r) => setTimeout(r, Math.max(0, started + NORMAL_RUN_MS - Date.now())));
  for (const i of NORMAL) {
    const list = await alarmsOf(engineIds[i]);
    expect({ engine: engineIds[i], alarms: list.map((a) => `${a.rule} ${a.raisedAt}`) }).toEqual({ engine: engineIds[i], alarms: [] });
  }
  const engines = (await (await fetch(`${controlBase}/engines`)).json()) as { engineId: number; running: boolean }[];
  expect(engines.find((e) => e.engineId === engineIds[NORMAL_RUNNING])!.running).toBe(true);

  // the alarms room carried every raised alarm, and none of the readings
  for (const a of raised.values()) expect(pushed.alarms.some((p) => p.id === a.id && p.rule === a.rule)).toBe(true);
  expect(pushed.readings).toBe(0);
  for (const f of FAULTS) {
    const list = (await alarmsOf(engineIds[f.index])).filter((a) => a.rule === f.rule);
    expect({ scenario: f.scenario, count: list.length }).toEqual({ scenario: f.scenario, count: 1 });
  }
});
