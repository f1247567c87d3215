/**
 * Integration: history does not page anyone. ONE real server process (broker, HTTP, mail catcher) on random
 * ports with the demo seed and NOTIFY_MIN_PRIORITY=low (every alarm would be e-mailed), and ONE real simulator
 * process doing what `npm start` does on a fresh DATA_DIR (seed 1, history every 300 s), here 7 days of history (BACKFILL_DAYS)
 * and then 60 s of live data at 1 Hz for all eight demo engines. Afterwards nothing is annunciated, no e-mail
 * was queued or caught, and whatever the rules found in the history is recorded as closed.
 */
import { spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { freePort, waitFor } from './support/alarm-db';
import { spawnInGroup, stopGroup } from './support/process-group';

const ROOT = path.resolve(__dirname, '../..');
const TSX = path.join(ROOT, 'node_modules/.bin/tsx');
const PASSWORD = 'jacketwatch-demo';
const LIVE_S = 60;
// BACKFILL_DAYS=30 runs exactly what a fresh `npm start` publishes (slower)
const DAYS = Number(process.env.BACKFILL_DAYS ?? 7);

jest.setTimeout(400_000);

let dataDir: string;
let server: ChildProcess | null = null;
let sim: ChildProcess | null = null;
let base: string;
let env: NodeJS.ProcessEnv;

function run(args: string[], name: string): ChildProcess {
  const out = fs.openSync(path.join(dataDir, `${name}.log`), 'a');
  return spawnInGroup(TSX, args, { cwd: ROOT, env, stdio: ['ignore', out, out] });
}

const stopChild = (c: ChildProcess | null) => stopGroup(c);

async function get<T>(p: string, token: string): Promise<T> {
  const res = await fetch(base + p, { headers: { authorization: `Bearer ${token}` } });
  if (!res.ok) throw new Error(`GET ${p}: ${res.status}`);
  return (await res.json()) as T;
}

beforeAll(async () => {
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-backfill-'));
  const [port, mqttPort, smtpPort] = [await freePort(), await freePort(), await freePort()];
  base = `http://127.0.0.1:${port}`;
  env = {
    ...process.env,
    PORT: String(port),
    MQTT_PORT: String(mqttPort),
    SMTP_PORT: String(smtpPort),
    DATA_DIR: dataDir,
    LOG_LEVEL: 'info',
    PUBLIC_URL: base,
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
}, 120_000);

afterAll(async () => {
  await stopChild(sim);
  await stopChild(server);
  if (process.env.KEEP_DATA) process.stdout.write(`data kept in ${dataDir}\n`);
  else fs.rmSync(dataDir, { recursive: true, force: true });
});

interface AlarmRow {
  id: number;
  engineId: number;
  rule: string;
  state: string;
  active: boolean;
  closedAt: string | null;
  raisedAt: string;
}

it(`${DAYS} days of history then live data: nothing annunciated, no e-mail, history alarms recorded as closed`, async () => {
  const admin = (
    (await (
      await fetch(`${base}/api/auth/login`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ email: 'admin@jacketwatch.test', password: PASSWORD }),
      })
    ).json()) as { token: string }
  ).token;
  const started = Date.now();
  sim = run(
    ['simulator/cli.ts', '--rate', '1', '--seed', '1', '--backfill-days', String(DAYS), '--backfill-step', '300', '--duration', String(LIVE_S)],
    'simulator',
  );
  const code = await new Promise<number | null>((resolve) => sim!.once('exit', (c) => resolve(c)));
  expect(code).toBe(0);
  // every engine's live data stored (the simulator exits after LIVE_S s of live running)
  const engines = await waitFor(
    async () => {
      const list = await get<{ id: number; lastSeenAt: string | null; duty: string; readiness?: { ready: boolean; reasons: string[] } }[]>(
        '/api/engines',
        admin,
      );
      return list.length === 8 && list.every((e) => e.lastSeenAt && new Date(e.lastSeenAt).getTime() > started) && list;
    },
    30_000,
    500,
  );
  expect(engines).toHaveLength(8);
  // the seven standby sets sit warm on their heaters with fresh data and no alarm: Ready; the continuous engine has no readiness
  for (const e of engines) {
    if (e.duty === 'standby') expect({ id: e.id, readiness: e.readiness }).toEqual({ id: e.id, readiness: { ready: true, reasons: [] } });
    else expect(e.readiness).toBeUndefined();
  }
  // every rule has seen the last batch: ask through the health endpoint's writer counters and then the alarm list
  const all = await get<AlarmRow[]>('/api/alarms?state=all', admin);
  const active = await get<AlarmRow[]>('/api/alarms?state=active', admin);
  const open = await get<AlarmRow[]>('/api/alarms?state=open', admin);
  const mails = await get<unknown[]>('/api/admin/mail', admin);
  const outbox = await get<unknown[] | { messages: unknown[] }>('/api/admin/outbox', admin);
  process.stdout.write(`history alarms recorded (closed): ${all.length} [${all.map((a) => `${a.rule}@${a.raisedAt}`).join(', ')}]\n`);
  expect(active.map((a) => `${a.rule} on ${a.engineId} at ${a.raisedAt}`)).toEqual([]);
  expect(open.map((a) => `${a.rule} on ${a.engineId} at ${a.raisedAt}`)).toEqual([]);
  for (const a of all) expect(a.closedAt).not.toBeNull();
  expect(mails).toEqual([]);
  expect(Array.isArray(outbox) ? outbox : outbox.messages).toEqual([]);
});
