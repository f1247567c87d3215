/**
 * `BENCH_SCALE=1 npm run bench`: several servers on PostgreSQL. A throwaway PostgreSQL cluster and Debian's
 * mosquitto 2 (free ports, temp folders, own process groups); BENCH_SCALE_ENGINES [2000] engines x 5 channels
 * x 1 Hz at QoS 1 for BENCH_SCALE_MS [30000], through one server and then through two (shared subscription),
 * each on a fresh database and a fresh broker. Figures side by side: published vs stored, publish -> socket.io client p50/p95
 * (a client on every server, watching the fleet), and rows and bytes per day (table and index size of the
 * stored readings and rollups per reading, times the fleet's readings per day). Asserts nothing about timing.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { io as ioClient, type Socket } from 'socket.io-client';
import { createTokenService } from '../../server/auth/tokens';
import { startPgCluster } from '../../scripts/with-postgres';
import { createTelemetryPublisher, startMosquitto } from '../server/support/mosquitto';
import { spawnInGroup, stopGroup } from '../server/support/process-group';
import { freePort } from '../server/support/telemetry-server';
import { Client, numericTypes, type PgClient } from '../server/support/test-db';

const ROOT = path.resolve(__dirname, '../..');
const ENGINES = Number(process.env.BENCH_SCALE_ENGINES ?? 2000);
const RUN_MS = Number(process.env.BENCH_SCALE_MS ?? 30_000);
const PUBLISHERS = 4;
const SECRET = 'bench-scale-secret-0123456789-abcdefghijklmnopqrstuvwxyz';
const BENCH_USER = { username: 'jw-bench', password: 'bench-device-secret-1' };

export interface ScaleFigures {
  servers: number;
  engines: number;
  seconds: number;
  published: number;
  stored: number;
  failed: number;
  p50Ms: number;
  p95Ms: number;
  pushed: number;
  rowsPerDay: number;
  bytesPerRow: number;
  bytesPerDay: number;
  /** Each server's own ingest counters (GET /api/health) after the wait: where readings stood when the run ended. */
  perServer: ServerIngest[];
}

export interface ServerIngest {
  received: number | null;
  stored: number | null;
  duplicate: number | null;
  rejected: number | null;
  buffered: number | null;
  relaySent: number | null;
  relayReceived: number | null;
}

interface HealthAnswer {
  ingest: { received: number; stored: number; duplicate: number; rejected: number; buffered: number } | null;
  cluster?: { relay: { sentReadings: number; receivedReadings: number } | null };
}

/** A server's counters, or nulls when it does not answer within 10 s (an overloaded server is a finding too). */
async function serverIngest(url: string): Promise<ServerIngest> {
  try {
    const h = (await (await fetch(`${url}/api/health`, { signal: AbortSignal.timeout(10_000) })).json()) as HealthAnswer;
    return { ...(h.ingest ?? NO_INGEST), relaySent: h.cluster?.relay?.sentReadings ?? null, relayReceived: h.cluster?.relay?.receivedReadings ?? null };
  } catch {
    return { ...NO_INGEST, relaySent: null, relayReceived: null };
  }
}
const NO_INGEST = { received: null, stored: null, duplicate: null, rejected: null, buffered: null };

const quantile = (xs: number[], p: number) => xs[Math.min(xs.length - 1, Math.floor(p * xs.length))] ?? NaN;

async function until<T>(what: string, fn: () => Promise<T>, ok: (v: T) => boolean, ms: number): Promise<T> {
  const end = Date.now() + ms;
  for (;;) {
    try {
      const v = await fn();
      if (ok(v)) return v;
      if (Date.now() > end) throw new Error(`timed out waiting for ${what}; last ${JSON.stringify(v)}`);
    } catch (err) {
      if (Date.now() > end) throw err;
    }
    await new Promise((r) => setTimeout(r, 200));
  }
}

function publisher(job: object): { child: ChildProcess; ready: Promise<void>; result: Promise<{ readings: number; failed: number }>; go(): void } {
  const child = spawn(process.execPath, ['--import', 'tsx', path.join(__dirname, 'publisher.ts')], {
    cwd: ROOT,
    stdio: ['pipe', 'pipe', 'inherit'],
    env: { ...process.env, BENCH_JOB: JSON.stringify(job) },
  });
  let buf = '';
  let onReady!: () => void;
  let onResult!: (x: { readings: number; failed: number }) => void;
  const ready = new Promise<void>((r) => {
    onReady = r;
  });
  const result = new Promise<{ readings: number; failed: number }>((r) => {
    onResult = r;
  });
  child.stdout!.on('data', (d) => {
    buf += d;
    let nl;
    while ((nl = buf.indexOf('\n')) >= 0) {
      const line = JSON.parse(buf.slice(0, nl));
      buf = buf.slice(nl + 1);
      if (line.ready) onReady();
      else onResult(line);
    }
  });
  return { child, ready, result, go: () => child.stdin!.end('go\n') };
}

async function oneRun(servers: number, adminUrl: string, mq: { port: number; adminUrl: string }, progress: (m: string) => void): Promise<ScaleFigures> {
  const dbName = `jw_scale_${servers}`;
  const admin = new Client({ connectionString: adminUrl });
  await admin.connect();
  await admin.query(`CREATE DATABASE ${dbName}`);
  await admin.end();
  const databaseUrl = adminUrl.replace(/\/postgres$/, `/${dbName}`);
  const children: ChildProcess[] = [];
  const dirs: string[] = [];
  const urls: string[] = [];
  let db: PgClient | null = null;
  const sockets: Socket[] = [];
  try {
    const start = async (i: number) => {
      const port = await freePort();
      const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-bench-scale-'));
      dirs.push(dir);
      const child = spawnInGroup(process.execPath, [path.join(ROOT, 'node_modules/tsx/dist/cli.mjs'), path.join(ROOT, 'server/main.ts')], {
        cwd: ROOT,
        stdio: 'ignore',
        env: {
          ...process.env,
          PORT: String(port),
          SMTP_PORT: String(await freePort()),
          MQTT_PORT: '0',
          DATA_DIR: dir,
          DATABASE_URL: databaseUrl,
          MQTT_URL: mq.adminUrl,
          MQTT_SHARED_GROUP: 'jw',
          MQTT_CLIENT_ID: `jw-bench-${servers}-${i}`,
          JWT_SECRET: SECRET,
          LOG_LEVEL: 'error',
        },
      });
      children.push(child);
      const url = `http://127.0.0.1:${port}`;
      await until(
        `server ${i} up`,
        async () => (await fetch(`${url}/api/health`)).json() as Promise<{ status: string; cluster?: { owned: number } }>,
        (h) => h.status === 'ok' && (h.cluster?.owned ?? 0) > 0,
        90_000,
      );
      urls.push(url);
    };
    await start(0); // migrations, then the fleet
    db = new Client({ connectionString: databaseUrl, types: numericTypes });
    await db.connect();
    const now = new Date().toISOString();
    await db.query(`INSERT INTO sites (name, time_zone) VALUES ('Bench site', 'UTC')`);
    await db.query(
      `INSERT INTO engines (site_id, name, duty, capacity_l, coolant_family, glycol_type, glycol_percent, cap_pressure_kpa, oil_drain_interval_h, run_hours, safe_open_temp_c, out_of_service, created_at, updated_at)
       SELECT (SELECT MIN(id) FROM sites), 'Bench engine ' || g, 'prime', 60, 'conventional', 'ethylene', 50, 100, 250, 0, 50, FALSE, $1, $1 FROM generate_series(1, $2::int) g`,
      [now, ENGINES],
    );
    const adminId = (
      await db.query<{ id: number }>(
        `INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES ('bench-scale@example.test', 'Bench', 'x', 'admin', FALSE, $1, $1) RETURNING id`,
        [now],
      )
    ).rows[0].id;
    const engineIds = (await db.query<{ id: number }>('SELECT id FROM engines ORDER BY id')).rows.map((r) => r.id);
    for (let i = 1; i < servers; i++) await start(i);
    const token = createTokenService(SECRET).sign({ id: adminId, email: 'bench-scale@example.test', role: 'admin' });
    const latencies: number[] = [];
    let measuring = false;
    for (const url of urls) {
      const s = ioClient(url, { auth: { token }, transports: ['websocket'], reconnection: false });
      sockets.push(s);
      await new Promise<void>((resolve, reject) => {
        s.once('connect', () => resolve());
        s.once('connect_error', reject);
      });
      await s.emitWithAck('watch', { fleet: true });
      s.on('readings', (m: { ts: number }) => {
        if (measuring) latencies.push(Date.now() - m.ts);
      });
      // the fleet's readings come in one batch per interval with every engine that changed
      s.on('readings-batch', (b: { engines: Array<{ ts: number }> }) => {
        const now = Date.now();
        if (measuring) for (const m of b.engines) latencies.push(now - m.ts);
      });
    }
    const devices = engineIds.map((engineId) => ({ ...BENCH_USER, secret: BENCH_USER.password, engineId }));
    const pubs = Array.from({ length: PUBLISHERS }, (_, k) =>
      publisher({
        mqttPort: mq.port,
        devices: devices.filter((_, i) => i % PUBLISHERS === k),
        mode: 'paced',
        qos: 1,
        durationMs: RUN_MS,
        window: 1,
        samplesPerMsg: 1,
        baseTs: 0,
      }),
    );
    await Promise.all(pubs.map((p) => p.ready));
    progress(`${servers} server(s): ${ENGINES} engines x 5 channels x 1 Hz for ${RUN_MS / 1000} s`);
    const sizeBefore = await sizes(db);
    pubs.forEach((p) => p.go());
    const startedAt = Date.now();
    const measureTimer = setTimeout(() => {
      measuring = true;
    }, 5000); // connections and leases settle first
    const results = await Promise.all(pubs.map((p) => p.result));
    clearTimeout(measureTimer);
    measuring = false;
    const seconds = (Date.now() - startedAt) / 1000;
    const published = results.reduce((a, r) => a + r.readings, 0);
    const failed = results.reduce((a, r) => a + r.failed, 0);
    const count = async () => Number((await db!.query<{ n: number }>('SELECT COUNT(*) AS n FROM readings')).rows[0].n);
    const stored = await until('every published reading stored', count, (n) => n >= published, 120_000).catch(async () => count());
    const sizeAfter = await sizes(db);
    const perServer = await Promise.all(urls.map(serverIngest));
    latencies.sort((a, b) => a - b);
    const rowsPerDay = ENGINES * 5 * 86_400;
    const bytesPerRow = stored > 0 ? (sizeAfter - sizeBefore) / stored : NaN;
    return {
      servers,
      engines: ENGINES,
      seconds,
      published,
      stored,
      failed,
      p50Ms: quantile(latencies, 0.5),
      p95Ms: quantile(latencies, 0.95),
      pushed: latencies.length,
      rowsPerDay,
      bytesPerRow,
      bytesPerDay: bytesPerRow * rowsPerDay,
      perServer,
    };
  } finally {
    for (const s of sockets) s.close();
    await db?.end().catch(() => undefined);
    for (const c of children) await stopGroup(c, 10_000);
    for (const d of dirs) fs.rmSync(d, { recursive: true, force: true });
  }
}

/** Bytes of the stored readings (every partition, with indexes) and the per-minute rollups. */
async function sizes(db: PgClient): Promise<number> {
  const r = await db.query<{ b: number }>(
    `SELECT COALESCE(SUM(pg_total_relation_size(inhrelid)), 0) + pg_total_relation_size('rollups') AS b FROM pg_inherits WHERE inhparent = 'readings'::regclass`,
  );
  return Number(r.rows[0].b);
}

export async function runScaleBench(progress: (m: string) => void): Promise<ScaleFigures[]> {
  const pg = await startPgCluster();
  try {
    await until(
      'PostgreSQL accepting sessions',
      async () => {
        const c = new Client({ connectionString: pg.url });
        await c.connect();
        await c.end();
        return true;
      },
      Boolean,
      30_000,
    );
    const out: ScaleFigures[] = [];
    // a fresh broker per configuration: the one-server run's persistent session would otherwise stay in the
    // shared subscription group and be dealt its share of every later message (queued for it, never stored)
    for (const servers of [1, 2]) out.push(await withBenchBroker((mq) => oneRun(servers, pg.url, mq, progress)));
    return out;
  } finally {
    await pg.stop();
  }
}

async function withBenchBroker<T>(job: (mq: { port: number; adminUrl: string }) => Promise<T>): Promise<T> {
  // the server acknowledges a message once its readings are committed: the broker's default window of 20
  // unacknowledged messages per client would cap ingest at 20 messages per commit (see the README)
  const mq = await startMosquitto([`max_inflight_messages ${process.env.BENCH_SCALE_INFLIGHT ?? 1000}`]);
  try {
    // one device account for every publisher connection, allowed on every engine's topic (the bench measures the servers)
    createTelemetryPublisher(mq, BENCH_USER);
    return await job(mq);
  } finally {
    await mq.remove();
  }
}

export function printScale(figures: ScaleFigures[]): void {
  const fmt = (x: number) => (Number.isFinite(x) ? Math.round(x).toLocaleString('en-US') : 'n/a');
  console.log(`\nSeveral servers on PostgreSQL (${figures[0]?.engines} engines x 5 channels x 1 Hz, QoS 1, mosquitto 2, shared subscription)`);
  const row = (label: string, f: (x: ScaleFigures) => string) => console.log(`  ${label.padEnd(44)}${figures.map((x) => f(x).padStart(18)).join('')}`);
  row('servers', (x) => String(x.servers));
  row('published (acknowledged by the broker)', (x) => fmt(x.published));
  row('stored (within 120 s of the end)', (x) => fmt(x.stored) + (x.stored === x.published ? ' (all)' : ' (behind)'));
  row('publish -> browser p50 / p95 (ms)', (x) => `${fmt(x.p50Ms)} / ${fmt(x.p95Ms)}`);
  row('pushed messages measured', (x) => fmt(x.pushed));
  row('rows per day (fleet)', (x) => fmt(x.rowsPerDay));
  row('bytes per stored reading (rows, indexes, rollups)', (x) => x.bytesPerRow.toFixed(1));
  row('bytes per day (GB)', (x) => (x.bytesPerDay / 1e9).toFixed(1));
  const n = (v: number | null) => (v === null ? 'no answer' : fmt(v));
  for (const x of figures)
    x.perServer.forEach((s, i) =>
      console.log(
        `  ${x.servers} server(s), server ${i + 1}: received ${n(s.received)}, stored ${n(s.stored)}, duplicate ${n(s.duplicate)}, ` +
          `rejected ${n(s.rejected)}, buffered ${n(s.buffered)}, relay sent ${n(s.relaySent)} / received ${n(s.relayReceived)} readings`,
      ),
    );
}
