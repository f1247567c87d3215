/**
 * Acknowledged means stored, with real processes: a QoS 1 publisher process floods a real server process;
 * the server's process group is killed with SIGKILL three times mid-flood (after different shares of the
 * messages were acknowledged) and restarted on the same DATA_DIR and ports. After each kill, every
 * message whose PUBACK the publisher had received is in the file; at the end every message is stored
 * exactly once, the file passes integrity_check and the rollups equal the raw counts.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expectIntact, rawAndRollupCounts } from './support/consistency';
import { Db, seedFleet, startServerProcess, type ServerProcess } from './support/telemetry-server';

jest.setTimeout(120_000);

const ROOT = path.resolve(__dirname, '../..');
const MESSAGES = 1200;
const SAMPLES = 10; // x 5 channels: 60,000 readings
const CHANNELS = 5;
const KILL_AT = [0.15, 0.45, 0.75]; // share of messages acknowledged when the server is killed

let dataDir: string;
let server: ServerProcess | null = null;
let publisher: ChildProcess | null = null;
let ackFile: string;

const waitFor = async (what: string, ok: () => boolean | Promise<boolean>, ms = 60_000) => {
  const end = Date.now() + ms;
  while (!(await ok())) {
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 10));
  }
};
const ackedMessages = (): number[] => {
  const text = fs.existsSync(ackFile) ? fs.readFileSync(ackFile, 'utf8') : '';
  return text
    .split('\n')
    .filter((l) => l !== '')
    .map(Number);
};

/** Stored readings per message of the engine, read from the file itself. */
async function storedPerMessage(dbFile: string, engineId: number, baseTs: number): Promise<Map<number, number>> {
  const db = new Db(dbFile);
  try {
    const rows = await db.all<{ m: number; n: number }>(
      `SELECT (ts - CAST(? AS BIGINT)) / CAST(? AS BIGINT) AS m, COUNT(*) AS n FROM readings WHERE engine_id = ? GROUP BY m`,
      [baseTs, SAMPLES, engineId],
    );
    return new Map(rows.map((r) => [r.m, r.n]));
  } finally {
    await db.close();
  }
}

afterAll(async () => {
  if (publisher?.pid && publisher.exitCode === null) {
    try {
      process.kill(-publisher.pid, 'SIGKILL');
    } catch {
      /* gone */
    }
  }
  await server?.stop('SIGKILL');
  if (dataDir) fs.rmSync(dataDir, { recursive: true, force: true });
});

test('SIGKILL mid-flood, three times: every acknowledged reading is stored, none twice, rollups match raw', async () => {
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-crash-'));
  ackFile = path.join(dataDir, 'acked.txt');
  server = await startServerProcess({ dataDir, group: true });
  const ports = server.ports;
  const seedDb = new Db(server.databaseUrl);
  const [device] = await seedFleet(seedDb, 1, 'crash');
  await seedDb.close();

  const baseTs = Date.now() - 2 * 3_600_000;
  const job = {
    mqttPort: ports.mqttPort,
    username: device.username,
    secret: device.secret,
    engineId: device.engineId,
    messages: MESSAGES,
    samplesPerMsg: SAMPLES,
    baseTs,
    window: 32,
    ackFile,
  };
  let publisherErr = '';
  publisher = spawn(process.execPath, ['--import', 'tsx', path.join(__dirname, 'support/qos1-publisher.ts')], {
    cwd: ROOT,
    stdio: ['ignore', 'ignore', 'pipe'],
    detached: true,
    env: { ...process.env, JW_PUBLISHER_JOB: JSON.stringify(job) },
  });
  publisher.stderr!.on('data', (d) => {
    publisherErr += d;
  });
  const publisherExit = new Promise<number | null>((resolve) => publisher!.once('exit', (code) => resolve(code)));

  const figures: string[] = [];
  for (const share of KILL_AT) {
    await waitFor(`${share * 100} % acknowledged`, () => ackedMessages().length >= share * MESSAGES || publisher!.exitCode !== null);
    expect(publisher.exitCode).toBeNull(); // still mid-flood
    await server.stop('SIGKILL'); // the whole group, no clean flush
    // the server is gone: whatever the publisher recorded as acknowledged must be in the file now
    const acked = ackedMessages();
    const stored = await storedPerMessage(server.databaseUrl, device.engineId, baseTs);
    const missing = acked.filter((m) => stored.get(m) !== SAMPLES * CHANNELS);
    expect({ killedAfter: share, acked: acked.length, missing }).toEqual({ killedAfter: share, acked: acked.length, missing: [] });
    figures.push(
      `kill ${figures.length + 1}: ${acked.length * SAMPLES * CHANNELS} readings acknowledged, all stored (${[...stored.values()].reduce((a, b) => a + b, 0)} in the file)`,
    );
    server = await startServerProcess({ dataDir, ports, group: true });
  }

  expect(await publisherExit).toBe(0);
  expect(publisherErr).toBe('');
  const acked = new Set(ackedMessages());
  expect(acked.size).toBe(MESSAGES);
  // one more SIGKILL after the last ack: nothing may depend on a clean shutdown
  await server.stop('SIGKILL');

  const db = new Db(server.databaseUrl);
  try {
    await expectIntact(db);
    const total = await db.get<{ n: number }>('SELECT COUNT(*) AS n FROM readings WHERE engine_id = ?', [device.engineId]);
    expect(total.n).toBe(MESSAGES * SAMPLES * CHANNELS);
    expect(await db.all('SELECT engine_id, channel, ts, COUNT(*) AS n FROM readings GROUP BY engine_id, channel, ts HAVING COUNT(*) > 1')).toEqual([]);
    const stored = await storedPerMessage(server.databaseUrl, device.engineId, baseTs);
    expect([...acked].filter((m) => stored.get(m) !== SAMPLES * CHANNELS)).toEqual([]);
    // rollups of the window equal the raw counts, minute by minute
    const counts = await rawAndRollupCounts(db, device.engineId);
    expect(counts.rollups).toEqual(counts.raw);
    expect(counts.hourly).toEqual(counts.rawHours);
    console.log(
      `ingest crash test: ${figures.join('; ')}; end: ${total.n} readings stored once, 0 acknowledged lost, 0 duplicates, integrity ok, rollups = raw`,
    );
  } finally {
    await db.close();
  }
  server = null;
});
