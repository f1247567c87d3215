/**
 * The opening check is built on the stored record: an engine that stopped days ago reads as stopped for
 * days, also right after a server restart (kill -9 and a clean stop), although the recent readings show
 * only the last few minutes (a gap in the data before them, as after a gateway or server outage).
 * Real server processes on a real SQLite file; readings and rollups written as the server's writer does.
 */
import fs from 'node:fs';
import bcrypt from 'bcryptjs';
import { CHANNELS, type ChannelKey } from '../../shared/channels';
import { Db, seedFleet, startServerProcess, type ServerProcess } from './support/telemetry-server';

jest.setTimeout(120_000);

const MIN = 60_000;
const DAY = 24 * 60 * MIN;
let server: ServerProcess;
let engineId: number;
let token: string;

/** Readings and their per-minute rollups, as the writer stores them (server/telemetry/sql.ts). */
async function store(db: Db, rows: Array<{ ts: number; channel: ChannelKey; value: number }>): Promise<void> {
  await db.exec('BEGIN');
  const minutes = new Map<string, { engine: number; channel: number; minute: number; min: number; max: number; sum: number; count: number }>();
  for (const r of rows) {
    const code = CHANNELS[r.channel].code;
    await db.run('INSERT INTO readings (engine_id, channel, ts, value, quality) VALUES (?, ?, ?, ?, 0)', [engineId, code, r.ts, r.value]);
    const minute = Math.floor(r.ts / MIN) * MIN;
    const k = `${code}:${minute}`;
    const m = minutes.get(k) ?? { engine: engineId, channel: code, minute, min: Infinity, max: -Infinity, sum: 0, count: 0 };
    m.min = Math.min(m.min, r.value);
    m.max = Math.max(m.max, r.value);
    m.sum += r.value;
    m.count++;
    minutes.set(k, m);
  }
  for (const m of minutes.values()) {
    await db.run('INSERT INTO rollups (engine_id, channel, minute, "min", "max", "sum", "count", bad_count) VALUES (?, ?, ?, ?, ?, ?, ?, 0)', [
      m.engine,
      m.channel,
      m.minute,
      m.min,
      m.max,
      m.sum,
      m.count,
    ]);
  }
  await db.exec('COMMIT');
}

async function login(url: string): Promise<string> {
  const res = await fetch(`${url}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email: 'tech@example.test', password: 'correct-horse-battery' }),
  });
  expect(res.status).toBe(200);
  return ((await res.json()) as { token: string }).token;
}

async function check(url: string): Promise<{ conditions: Array<{ name: string; met: boolean; value: number; limit: number }>; reasons: string[] }> {
  const res = await fetch(`${url}/api/engines/${engineId}/opening-check`, { headers: { Authorization: `Bearer ${token}` } });
  expect(res.status).toBe(200);
  return res.json() as never;
}

const stopCondition = (c: Awaited<ReturnType<typeof check>>) => c.conditions.find((x) => x.name.includes('stop'))!;

let stoppedAt: number;

beforeAll(async () => {
  server = await startServerProcess();
  const db = new Db(server.databaseUrl);
  try {
    [{ engineId }] = await seedFleet(db, 1, 'oc');
    const now = new Date().toISOString();
    await db.run('INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, ?, FALSE, ?, ?)', [
      'tech@example.test',
      'Test technician',
      bcrypt.hashSync('correct-horse-battery', 4),
      'technician',
      now,
      now,
    ]);
    const t = Date.now();
    stoppedAt = t - 3 * DAY;
    const rows: Array<{ ts: number; channel: ChannelKey; value: number }> = [];
    // an exercise run three days ago, then the stop
    for (let ts = stoppedAt - 30 * MIN; ts < stoppedAt; ts += 10_000)
      rows.push({ ts, channel: 'engine_speed', value: 1800 }, { ts, channel: 'coolant_temp', value: 85 });
    rows.push({ ts: stoppedAt, channel: 'engine_speed', value: 0 });
    // the last 4 minutes only (a gap before them): stopped, cold, no pressure
    for (let ts = t - 4 * MIN; ts <= t; ts += 10_000)
      rows.push(
        { ts, channel: 'engine_speed', value: 0 },
        { ts, channel: 'coolant_temp', value: 22 },
        { ts, channel: 'coolant_pressure', value: 0 },
        { ts, channel: 'ambient_temp', value: 20 },
      );
    await store(db, rows);
  } finally {
    await db.close();
  }
  token = await login(server.url);
});

afterAll(async () => {
  await server?.stop('SIGKILL');
  if (server) fs.rmSync(server.dataDir, { recursive: true, force: true });
});

describe('the stop comes from the stored readings', () => {
  it('stopped three days ago reads as stopped for three days, not for the 4 minutes of recent readings', async () => {
    const c = stopCondition(await check(server.url));
    expect(c.met).toBe(true);
    expect(c.value).toBeGreaterThan(c.limit);
    // three days, within the minute the test has taken so far
    expect(Math.abs(c.value - (3 * DAY) / 1000)).toBeLessThan(120);
  });

  it('after kill -9 and a restart on the same data, the same', async () => {
    const dataDir = server.dataDir;
    expect(await server.stop('SIGKILL')).toBeNull();
    server = await startServerProcess({ dataDir });
    const c = stopCondition(await check(server.url));
    expect(c.met).toBe(true);
    expect(Math.abs(c.value - (Date.now() - stoppedAt) / 1000)).toBeLessThan(120);
  });

  it('after a clean stop and a restart, the same', async () => {
    const dataDir = server.dataDir;
    await server.stop('SIGTERM');
    server = await startServerProcess({ dataDir });
    const res = await check(server.url);
    const c = stopCondition(res);
    expect(c.met).toBe(true);
    expect(c.value).toBeGreaterThan((2.9 * DAY) / 1000);
    expect(res.reasons.join(' ')).not.toMatch(/Engine stopped for/);
  });
});
