/**
 * MQTT_URL (external broker) path with real processes: a plain broker process, the server subscribed to
 * it, a QoS 1 publisher. The server's PUBACK to the broker waits for the commit and its session is
 * persistent, so when the server is killed with SIGKILL mid-flood and restarted, the broker redelivers
 * whatever the server had not acknowledged: every reading ends up stored, none twice.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Db, freePort, seedFleet, startServerProcess, type ServerProcess } from './support/telemetry-server';

jest.setTimeout(120_000);

const ROOT = path.resolve(__dirname, '../..');
const MESSAGES = 400;
const SAMPLES = 10; // x 5 channels: 20,000 readings

let dataDir: string;
let server: ServerProcess | null = null;
const children: ChildProcess[] = [];

const waitFor = async (what: string, ok: () => boolean | Promise<boolean>, ms = 60_000, last?: () => unknown) => {
  const end = Date.now() + ms;
  while (!(await ok())) {
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}${last ? `; last ${JSON.stringify(await last())}` : ''}`);
    await new Promise((r) => setTimeout(r, 20));
  }
};

function spawnGroup(script: string, env: Record<string, string>): { child: ChildProcess; out: () => string } {
  let out = '';
  const child = spawn(process.execPath, ['--import', 'tsx', path.join(__dirname, script)], {
    cwd: ROOT,
    stdio: ['ignore', 'pipe', 'pipe'],
    detached: true,
    env: { ...process.env, ...env },
  });
  child.stdout!.on('data', (d) => {
    out += d;
  });
  child.stderr!.on('data', (d) => {
    out += d;
  });
  children.push(child);
  return { child, out: () => out };
}

afterAll(async () => {
  for (const c of children)
    if (c.pid && c.exitCode === null) {
      try {
        process.kill(-c.pid, 'SIGKILL');
      } catch {
        /* gone */
      }
    }
  await server?.stop('SIGKILL');
  if (dataDir) fs.rmSync(dataDir, { recursive: true, force: true });
});

test('external broker: SIGKILL of the server mid-flood loses nothing the broker handed over, stores nothing twice', async () => {
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-ext-'));
  const brokerPort = await freePort();
  const broker = spawnGroup('support/plain-broker.ts', { PLAIN_BROKER_PORT: String(brokerPort) });
  await waitFor('plain broker ready', () => broker.out().includes('ready\n'), 30_000, broker.out);
  const subscriptions = () =>
    broker
      .out()
      .split('\n')
      .filter((l) => l === 'subscribed jacketwatch-server' || l === 'subscribed jacketwatch-sparkplug-host').length;

  const env = { MQTT_URL: `mqtt://127.0.0.1:${brokerPort}` };
  server = await startServerProcess({ dataDir, group: true, env });
  // two subscriptions per start: telemetry (the server's own client) and Sparkplug B (the host role's client)
  await waitFor('server subscribed', () => subscriptions() === 2, 30_000, broker.out);
  const ports = server.ports;
  const seed = new Db(server.databaseUrl);
  const [device] = await seedFleet(seed, 1, 'ext');
  await seed.close();

  const baseTs = Date.now() - 3_600_000;
  const ackFile = path.join(dataDir, 'acked.txt');
  const pub = spawnGroup('support/qos1-publisher.ts', {
    JW_PUBLISHER_JOB: JSON.stringify({
      mqttPort: brokerPort,
      username: 'any',
      secret: 'any',
      engineId: device.engineId,
      messages: MESSAGES,
      samplesPerMsg: SAMPLES,
      baseTs,
      window: 16,
      ackFile,
    }),
  });
  const pubExit = new Promise<number | null>((resolve) => pub.child.once('exit', (code) => resolve(code)));

  const db = new Db(server.databaseUrl);
  const count = async () => (await db.get<{ n: number }>('SELECT COUNT(*) AS n FROM readings WHERE engine_id = ?', [device.engineId])).n;
  try {
    await waitFor('a third stored', async () => (await count()) >= (MESSAGES * SAMPLES * 5) / 3, 60_000, count);
    await server.stop('SIGKILL');
    server = await startServerProcess({ dataDir, ports, group: true, env });
    await waitFor('server subscribed again', () => subscriptions() === 4, 30_000, broker.out);
    expect(await pubExit).toBe(0); // the broker acknowledged every message to the publisher
    await waitFor('every reading stored', async () => (await count()) === MESSAGES * SAMPLES * 5, 60_000, count);
    expect(await db.all('SELECT channel, ts FROM readings WHERE engine_id = ? GROUP BY channel, ts HAVING COUNT(*) > 1', [device.engineId])).toEqual([]);
    const raw = await db.get<{ n: number }>('SELECT SUM("count" + bad_count) AS n FROM rollups WHERE engine_id = ?', [device.engineId]);
    expect(raw.n).toBe(MESSAGES * SAMPLES * 5);
  } finally {
    await db.close();
  }
});
