/**
 * Integration: a real server process (broker, HTTP, mail catcher) on random ports with the demo seed,
 * and the real simulator running the overheat scenario at 30x. The coolant high-temperature alarm must be
 * raised once within 2 minutes, and its e-mail caught by the mail catcher over SMTP.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { freePort, waitFor } from './support/alarm-db';

const ROOT = path.resolve(__dirname, '../..');
const TSX = path.join(ROOT, 'node_modules/.bin/tsx');
const PASSWORD = 'jacketwatch-demo';

jest.setTimeout(330_000);

let dataDir: string;
let server: ChildProcess | null = null;
let sim: ChildProcess | null = null;
let base: string;
let env: NodeJS.ProcessEnv;

function run(args: string[], name: string): ChildProcess {
  const out = fs.openSync(path.join(dataDir, `${name}.log`), 'a');
  return spawn(TSX, args, { cwd: ROOT, env, stdio: ['ignore', out, out] });
}

async function api<T>(method: string, p: string, token?: string, body?: unknown): Promise<{ status: number; body: T }> {
  const res = await fetch(base + p, {
    method,
    headers: { 'content-type': 'application/json', ...(token ? { authorization: `Bearer ${token}` } : {}) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  return { status: res.status, body: (await res.json().catch(() => null)) as T };
}

const stopChild = (c: ChildProcess | null) =>
  new Promise<void>((resolve) => {
    if (!c || c.exitCode !== null) return resolve();
    c.once('exit', () => resolve());
    c.kill('SIGTERM');
    setTimeout(() => c.exitCode === null && c.kill('SIGKILL'), 10_000).unref();
  });

beforeAll(async () => {
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-scenario-'));
  const [port, mqttPort, smtpPort] = [await freePort(), await freePort(), await freePort()];
  base = `http://127.0.0.1:${port}`;
  env = { ...process.env, PORT: String(port), MQTT_PORT: String(mqttPort), SMTP_PORT: String(smtpPort), DATA_DIR: dataDir, LOG_LEVEL: 'info', PUBLIC_URL: base };
  const seeded = spawnSync(TSX, ['seeds/cli.ts'], { cwd: ROOT, env, encoding: 'utf8' });
  if (seeded.status !== 0) throw new Error(`seed failed: ${seeded.stderr}`);
  server = run(['server/main.ts'], 'server');
  await waitFor(async () => (await fetch(`${base}/api/health`).then((r) => r.ok).catch(() => false)) || null, 90_000, 500);
});

afterAll(async () => {
  await stopChild(sim);
  await stopChild(server);
  if (process.env.KEEP_DATA) process.stdout.write(`data kept in ${dataDir}\n`);
  else fs.rmSync(dataDir, { recursive: true, force: true });
});

interface AlarmRow { id: number; engineId: number; rule: string; state: string; value: number; unit: string }

it('overheat: the high-temperature alarm is raised once within 2 minutes and its e-mail is caught', async () => {
  const login = async (email: string) => (await api<{ token: string }>('POST', '/api/auth/login', undefined, { email, password: PASSWORD })).body.token;
  const admin = await login('admin@jacketwatch.test');
  const devices = JSON.parse(fs.readFileSync(path.join(dataDir, 'demo-devices.json'), 'utf8')) as { devices?: { engineId: number }[] } | { engineId: number }[];
  const list = Array.isArray(devices) ? devices : (devices.devices ?? []);
  const engineId = list[0].engineId;

  const started = Date.now();
  sim = run(['simulator/cli.ts', '--scenario', 'overheat', '--speed', '30', '--engines', '1', '--rate', '1', '--scenario-at', '5', '--seed', '7'], 'simulator');

  const alarm = await waitFor(async () => {
    const r = await api<AlarmRow[]>('GET', `/api/alarms?state=all&engineId=${engineId}`, admin);
    return r.body.find((a) => a.rule === 'coolant_temp_high') ?? null;
  }, 120_000, 1000);
  expect(Date.now() - started).toBeLessThan(120_000);
  expect(alarm.value).toBeGreaterThan(98);
  expect(alarm.unit).toBe('degC');

  const mail = await waitFor(async () => {
    const r = await api<{ id: number; to: string; subject: string; text: string }[]>('GET', '/api/admin/mail', admin);
    return r.body.find((m) => m.text.includes(`/alarms/${alarm.id}`)) ?? null;
  }, 30_000, 1000);
  expect(mail.to).toBe('tech@jacketwatch.test');
  expect(mail.subject).toContain('Coolant temperature high');
  expect(mail.text).toMatch(/°C \(\d+\.\d °F\)/);

  // still one alarm for the rule after a little more of the scenario
  await new Promise((r) => setTimeout(r, 10_000));
  const again = await api<AlarmRow[]>('GET', `/api/alarms?state=all&engineId=${engineId}`, admin);
  expect(again.body.filter((a) => a.rule === 'coolant_temp_high')).toHaveLength(1);
});
