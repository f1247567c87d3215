/**
 * `npm run bench`: the ingest benchmark. Prints figures, asserts nothing about timing. Bounded: about 2-3 minutes.
 *  0. raw ceiling, BEFORE the server starts, in a separate process (raw-ceiling.ts), three runs, median:
 *     node-sqlite3 500-row prepared INSERT ... ON CONFLICT DO NOTHING, one transaction per 10k rows, into a
 *     fresh file with the readings schema and its UNIQUE (engine_id, channel, ts) index, WAL + synchronous=NORMAL;
 *  1. end to end at QoS 1: publisher processes flood a real server (MQTT -> aedes -> SQLite file). The server
 *     acknowledges a message only after the transaction holding its readings committed, so published
 *     (acknowledged) readings must all be in the file: acknowledged lost, duplicates stored, readings/s,
 *     memory (RSS growth after the first 5 s), event-loop delay, /api/health answer time;
 *  2. live push: 2,000 engines x 5 channels x 1 Hz at QoS 1 (BENCH_PUSH_ENGINES); publish -> socket.io client p50/p95
 *     on a fleet-watching socket (pushP95Ms) and an engine-page socket, socket.io messages/s on the fleet socket;
 *  3. QoS 0 flood: memory and responsiveness while TCP backpressure holds the inflow; bounded in time
 *     (publishers stop, the server gets a bounded drain time), then published (handed to TCP) vs
 *     received vs stored. QoS 0 has no acknowledgement: "nothing lost" is a QoS 1 claim only;
 *  then the retention sweep and the long-trend phase (trend.ts: trend30dMs / trend1hMs with 200 engines x 30 days),
 *  then compacted history (history.ts: bytesPerReading after a day of 1 Hz history is packed, rawBytesPerReading before).
 *  then sign-in under a burst (login-burst.ts, its own server process): a good sign-in and a good device connect
 *     timed beside 200 wrong HTTP sign-ins and 300 wrong MQTT logins (loginUnderBurstMs, deviceConnectUnderBurstMs).
 *  then the lists at fleet scale (lists.ts: first page of each long list with 2,000 engines, listP95Ms).
 * Phase lengths: BENCH_FLOOD_MS, BENCH_LATENCY_MS, BENCH_QOS0_MS, BENCH_DRAIN_MS. One phase alone: BENCH_PHASE=qos1|push|retention|trend|history|lists.
 * BENCH_SCALE=1: instead, several servers on PostgreSQL and mosquitto (scale.ts), one server vs two.
 * BENCH_SERVER_PROFILE=dir: the CPU profile of the bench's main server (node --cpu-prof), written to dir when it stops.
 * BENCH_JSON=file: the figures also as JSON (ingestPerS, rawCeilingPerS, lostAcknowledged, duplicatesStored,
 * rssGrowthPct, loginUnderBurstMs, ...), to compare runs.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import bcrypt from 'bcryptjs';
import { io as ioClient } from 'socket.io-client';
import { loadJwtSecret } from '../../server/auth/jwt-secret';
import { createTokenService } from '../../server/auth/tokens';
import { describeInitialBundle, measureInitialBundle } from './initial-bundle';
import { fleetBoardLongTasks, type FleetBoardFigures } from './fleet-board';
import { printTrend, trendPhase } from './trend';
import { historyJson, historyPhase, printHistory } from './history';
import { listsJson, listsPhase, printLists } from './lists';
import { loginUnderBurst, type LoginBurstFigures } from './login-burst';
import { printScale, runScaleBench } from './scale';
import { Db, freePort, seedFleet, type SeededDevice } from '../server/support/telemetry-server';
import type { ServerHealth } from '../server/support/telemetry-server';

const ROOT = path.resolve(__dirname, '../..');
const FLOOD_MS = Number(process.env.BENCH_FLOOD_MS ?? 15_000);
const LATENCY_MS = Number(process.env.BENCH_LATENCY_MS ?? 15_000);
const QOS0_MS = Number(process.env.BENCH_QOS0_MS ?? 10_000);
const DRAIN_MS = Number(process.env.BENCH_DRAIN_MS ?? 10_000);
const RAW_MAX_MS = 10_000;
const RAW_ROWS = 300_000;
const RAW_RUNS = 3;
const FLOOD_ENGINES = 100;
/** Live push phase: engines x 5 channels x 1 Hz (BENCH_PUSH_ENGINES). */
const PUSH_ENGINES = Number(process.env.BENCH_PUSH_ENGINES ?? 2000);
/** Engines an engine-page socket watches during the push phase (prompt per-engine messages). */
const PUSH_ENGINE_PAGE = 20;
/** The bench admin's password (a throwaway database): the fleet-board phase signs in with it in Chromium. */
const BENCH_ADMIN_PASSWORD = `bench-${process.pid}-${Date.now()}`;
const BOARD_SETTLE_MS = 4_000;
const BOARD_MEASURE_MS = 10_000;
const PUBLISHERS = 2;
const SAMPLES_PER_MSG = 50; // x 5 channels = 250 readings, about 7 KB

const fmt = (n: number) => (Number.isFinite(n) ? Math.round(n).toLocaleString('en-US') : 'n/a');
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const readStatus = (pid: number, key: string): number => {
  try {
    const m = new RegExp(`^${key}:\\s+(\\d+) kB`, 'm').exec(fs.readFileSync(`/proc/${pid}/status`, 'utf8'));
    return m ? Number(m[1]) / 1024 : NaN;
  } catch {
    return NaN;
  }
};
const quantile = (xs: number[], p: number) => {
  if (!xs.length) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(p * s.length))];
};

// ---------- raw ceiling: a separate process, before the server starts ----------
function rawCeilingOnce(): Promise<{ rate: number; rows: number }> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', path.join(__dirname, 'raw-ceiling.ts')], {
      cwd: ROOT,
      stdio: ['ignore', 'pipe', 'inherit'],
      env: { ...process.env, RAW_ROWS: String(RAW_ROWS), RAW_MAX_MS: String(RAW_MAX_MS), RAW_ENGINES: String(FLOOD_ENGINES) },
    });
    let out = '';
    child.stdout!.on('data', (d) => {
      out += d;
    });
    child.once('exit', (code) => (code === 0 ? resolve(JSON.parse(out)) : reject(new Error(`raw ceiling run exited with ${code}`))));
  });
}

// ---------- server and publishers ----------
interface Server {
  child: ChildProcess;
  pid: number;
  url: string;
  mqttPort: number;
  dataDir: string;
  db: Db;
  health(): Promise<ServerHealth>;
  stop(): Promise<void>;
}

async function startServer(): Promise<Server> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-bench-'));
  const [port, mqttPort, smtpPort] = [await freePort(), await freePort(), await freePort()];
  // node --import tsx (no tsx wrapper process), so the pid measured is the server's own
  // BENCH_SERVER_PROFILE=dir: the server's CPU profile (node --cpu-prof), written to dir when it stops
  const profileDir = process.env.BENCH_SERVER_PROFILE;
  const profile = profileDir ? ['--cpu-prof', `--cpu-prof-dir=${profileDir}`] : [];
  const child = spawn(process.execPath, [...profile, '--import', 'tsx', path.join(ROOT, 'server/main.ts')], {
    cwd: ROOT,
    stdio: ['ignore', 'ignore', 'inherit'],
    env: { ...process.env, PORT: String(port), MQTT_PORT: String(mqttPort), SMTP_PORT: String(smtpPort), DATA_DIR: dataDir, LOG_LEVEL: 'warn' },
  });
  const url = `http://127.0.0.1:${port}`;
  const health = async () => (await fetch(`${url}/api/health`, { signal: AbortSignal.timeout(10_000) })).json() as Promise<ServerHealth>;
  for (let i = 0; ; i++) {
    try {
      await health();
      break;
    } catch {
      if (i > 300 || child.exitCode !== null) throw new Error('server did not start');
      await sleep(200);
    }
  }
  const db = new Db(path.join(dataDir, 'jacketwatch.sqlite'));
  return {
    child,
    pid: child.pid!,
    url,
    mqttPort,
    dataDir,
    db,
    health,
    stop: async () => {
      const exited = new Promise((r) => child.once('exit', r));
      child.kill('SIGTERM');
      // bounded: the server flushes what it holds and exits; SIGKILL if it does not within 30 s
      const killer = setTimeout(() => child.kill('SIGKILL'), 30_000);
      await exited;
      clearTimeout(killer);
      await db.close();
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

interface PubResult {
  readings: number;
  messages: number;
  failed: number;
}
interface Publisher {
  child: ChildProcess;
  ready: Promise<void>;
  result: Promise<PubResult>;
  go(): void;
}

function startPublisher(job: object): Publisher {
  const child = spawn(process.execPath, ['--import', 'tsx', path.join(__dirname, 'publisher.ts')], {
    cwd: ROOT,
    stdio: ['pipe', 'pipe', 'inherit'],
    env: { ...process.env, BENCH_JOB: JSON.stringify(job) },
  });
  let buf = '';
  let onReady!: () => void;
  let onResult!: (x: PubResult) => void;
  let onFail!: (e: Error) => void;
  const ready = new Promise<void>((r) => {
    onReady = r;
  });
  const result = new Promise<PubResult>((r, j) => {
    onResult = r;
    onFail = j;
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
  child.once('exit', (code) => {
    if (code) onFail(new Error(`publisher exited with ${code}`));
  });
  return { child, ready, result, go: () => child.stdin!.end('go\n') };
}

const split = <T>(xs: T[], n: number): T[][] => Array.from({ length: n }, (_, i) => xs.filter((_, k) => k % n === i));

/** Once a second while a phase runs: server RSS, event-loop delay (admin counters), /api/health answer time. */
function watch(server: Server, adminToken: string) {
  const rss: number[] = [];
  const healthMs: number[] = [];
  const loopP99: number[] = [];
  const loopMax: number[] = [];
  let buffered = 0;
  let busy = false;
  let failures = 0;
  const timer = setInterval(async () => {
    rss.push(readStatus(server.pid, 'VmRSS'));
    if (busy) return; // a slow answer is measured by the one in flight
    busy = true;
    try {
      const t = performance.now();
      const h = await server.health();
      healthMs.push(performance.now() - t);
      buffered = Math.max(buffered, h.ingest.buffered);
      const a = (await (
        await fetch(`${server.url}/api/admin/ingest`, { headers: { authorization: `Bearer ${adminToken}` }, signal: AbortSignal.timeout(10_000) })
      ).json()) as { counters?: { eventLoopDelayMs?: { p99: number; max: number } } };
      const l = a.counters?.eventLoopDelayMs;
      if (l) {
        loopP99.push(l.p99);
        loopMax.push(l.max);
      }
    } catch {
      failures++;
    } finally {
      busy = false;
    }
  }, 1000);
  return {
    stop() {
      clearInterval(timer);
    },
    summary() {
      return {
        rss,
        healthP50: quantile(healthMs, 0.5),
        healthMax: Math.max(...healthMs, 0),
        loopP99: Math.max(...loopP99, 0),
        loopMax: Math.max(...loopMax, 0),
        maxBuffered: buffered,
        samples: healthMs.length,
        failures,
      };
    },
  };
}

async function waitStored(server: Server, target: number, ms: number): Promise<number> {
  const end = Date.now() + ms;
  for (;;) {
    const h = await server.health();
    if (h.ingest.stored >= target || Date.now() > end) return h.ingest.stored;
    await sleep(50);
  }
}

/** Until `received` stops growing and the buffer is empty, or the deadline. */
async function waitDrained(server: Server, ms: number): Promise<{ received: number; stored: number; buffered: number; drained: boolean }> {
  const end = Date.now() + ms;
  let last = -1;
  let stableSince = Date.now();
  for (;;) {
    const h = (await server.health()).ingest;
    if (h.received !== last) {
      last = h.received;
      stableSince = Date.now();
    }
    const quiet = Date.now() - stableSince > 1000 && h.buffered === 0 && h.stored === h.received;
    if (quiet || Date.now() > end) return { received: h.received, stored: h.stored, buffered: h.buffered, drained: quiet };
    await sleep(100);
  }
}

// ---------- live push ----------
type Tokens = ReturnType<typeof createTokenService>;

/** A fleet-board message: one engine (`readings`) or every engine that changed in one interval (`readings-batch`). */
interface PushedEngine {
  engineId: number;
  ts: number;
}

/**
 * PUSH_ENGINES x 5 channels x 1 Hz at QoS 1 from paced publishers (each device once a second, spread over the
 * second). One socket watches the fleet (as the fleet board does), one watches PUSH_ENGINE_PAGE engines (as
 * engine pages do). Latency: publish (the reading's own ts, set by the publisher just before it publishes)
 * -> the socket.io client, per engine update received; messages: socket.io events per second on the fleet socket.
 */
async function pushPhase(server: Server, all: SeededDevice[], adminId: number, tokens: Tokens, adminToken: string, progress: (m: string) => void) {
  const engines = all.slice(0, PUSH_ENGINES);
  const token = tokens.sign({ id: adminId, email: 'bench-admin@example.test', role: 'admin' });
  const open = async () => {
    const sock = ioClient(server.url, { auth: { token }, transports: ['websocket'], reconnection: false });
    await new Promise<void>((resolve, reject) => {
      sock.once('connect', () => resolve());
      sock.once('connect_error', reject);
    });
    return sock;
  };
  const fleetSock = await open();
  const engineSock = await open();
  await fleetSock.emitWithAck('watch', { fleet: true });
  await engineSock.emitWithAck('watch', { engineIds: engines.slice(0, PUSH_ENGINE_PAGE).map((d) => d.engineId) });
  const fleetLat: number[] = [];
  const engineLat: number[] = [];
  const fleetEngines = new Set<number>();
  let fleetMessages = 0;
  let measuring = false;
  const take = (into: number[], m: PushedEngine, now: number, seen?: Set<number>) => {
    into.push(now - m.ts);
    seen?.add(m.engineId);
  };
  for (const [sock, into, seen] of [
    [fleetSock, fleetLat, fleetEngines],
    [engineSock, engineLat, undefined],
  ] as const) {
    sock.on('readings', (m: PushedEngine) => {
      if (!measuring) return;
      if (sock === fleetSock) fleetMessages++;
      take(into, m, Date.now(), seen);
    });
    sock.on('readings-batch', (b: { engines: PushedEngine[] }) => {
      if (!measuring) return;
      if (sock === fleetSock) fleetMessages++;
      const now = Date.now();
      for (const m of b.engines) take(into, m, now, seen);
    });
  }
  const devices = engines.map((d) => ({ username: d.username, secret: d.secret, engineId: d.engineId }));
  const pubs = split(devices, PUBLISHERS).map((ds) =>
    startPublisher({ mqttPort: server.mqttPort, devices: ds, mode: 'paced', qos: 1, durationMs: LATENCY_MS, window: 1, samplesPerMsg: 1, baseTs: 0 }),
  );
  await Promise.all(pubs.map((p) => p.ready));
  progress(`live push run (${engines.length} engines)`);
  pubs.forEach((p) => p.go());
  let wl: ReturnType<typeof watch> | null = null;
  let measuredFrom = 0;
  setTimeout(() => {
    measuring = true;
    measuredFrom = performance.now();
    wl = watch(server, adminToken);
  }, 3000); // after the first round of connections settles
  const results = await Promise.all(pubs.map((p) => p.result));
  measuring = false;
  const measuredS = (performance.now() - measuredFrom) / 1000;
  (wl as ReturnType<typeof watch> | null)?.stop();
  const lat = (wl as ReturnType<typeof watch> | null)?.summary() ?? null;
  fleetSock.close();
  engineSock.close();
  const published = results.reduce((a, r) => a + r.readings, 0);
  const afterLatency = await waitDrained(server, 5_000);
  return {
    engines: engines.length,
    published,
    afterLatency,
    fleetP50: quantile(fleetLat, 0.5),
    fleetP95: quantile(fleetLat, 0.95),
    fleetMax: fleetLat.reduce((a, x) => Math.max(a, x), -Infinity),
    fleetUpdates: fleetLat.length,
    fleetEnginesSeen: fleetEngines.size,
    fleetMessagesPerS: fleetMessages / measuredS,
    engineP50: quantile(engineLat, 0.5),
    engineP95: quantile(engineLat, 0.95),
    engineUpdates: engineLat.length,
    measuredS,
    lat,
  };
}

function printPush(p: Awaited<ReturnType<typeof pushPhase>>): void {
  const line = (k: string, v: string) => console.log(`  ${k.padEnd(46)} ${v}`);
  console.log(`\n2. Live push (${fmt(p.engines)} engines x 5 channels x 1 Hz, QoS 1, ${LATENCY_MS / 1000} s, first 3 s not measured)`);
  line(
    'published readings / stored after the run',
    `${fmt(p.published)} / ${p.afterLatency.stored === p.afterLatency.received ? 'all received stored' : `${fmt(p.afterLatency.received - p.afterLatency.stored)} not yet stored`}`,
  );
  line('fleet socket: engine updates / engines seen', `${fmt(p.fleetUpdates)} / ${fmt(p.fleetEnginesSeen)}`);
  line('fleet socket: socket.io messages/s', `${p.fleetMessagesPerS.toFixed(1)}   (fleetMessagesPerS)`);
  line('publish -> fleet socket p50 / p95 / max', `${p.fleetP50} / ${p.fleetP95} / ${p.fleetMax} ms   (pushP95Ms; target p95 < 100 ms)`);
  line(`publish -> engine-page socket p50 / p95 (${PUSH_ENGINE_PAGE} engines)`, `${p.engineP50} / ${p.engineP95} ms (${fmt(p.engineUpdates)} updates)`);
  if (p.lat) {
    line('event-loop delay p99 / max (worst 2 s window)', `${p.lat.loopP99} / ${p.lat.loopMax} ms`);
    line(
      'GET /api/health answer p50 / max (samples)',
      `${p.lat.healthP50.toFixed(0)} / ${p.lat.healthMax.toFixed(0)} ms (${p.lat.samples} answered, ${p.lat.failures} failed or > 10 s)`,
    );
  }
}

/**
 * The fleet board of PUSH_ENGINES engines in Chromium while they all publish (1 Hz): long tasks while it updates.
 * Skipped (null) with BENCH_BROWSER=0 or without a build in dist/.
 */
async function fleetBoardPhase(server: Server, all: SeededDevice[], progress: (m: string) => void): Promise<FleetBoardFigures | null> {
  if (process.env.BENCH_BROWSER === '0' || !fs.existsSync(path.join(ROOT, 'dist/jacketwatch/browser/index.html'))) return null;
  const devices = all.slice(0, PUSH_ENGINES).map((d) => ({ username: d.username, secret: d.secret, engineId: d.engineId }));
  const pubs = split(devices, PUBLISHERS).map((ds) =>
    startPublisher({
      mqttPort: server.mqttPort,
      devices: ds,
      mode: 'paced',
      qos: 1,
      durationMs: BOARD_SETTLE_MS + BOARD_MEASURE_MS + 10_000,
      window: 1,
      samplesPerMsg: 1,
      baseTs: 0,
    }),
  );
  await Promise.all(pubs.map((p) => p.ready));
  progress(`fleet board in Chromium (${devices.length} engines publishing)`);
  try {
    return await fleetBoardLongTasks({
      url: server.url,
      email: 'bench-admin@example.test',
      password: BENCH_ADMIN_PASSWORD,
      whileUpdating: async () => pubs.forEach((p) => p.go()),
      settleMs: BOARD_SETTLE_MS,
      measureMs: BOARD_MEASURE_MS,
    });
  } catch (err) {
    console.error('fleet board phase failed:', err instanceof Error ? err.message : err);
    pubs.forEach((p) => p.go());
    return null;
  } finally {
    await Promise.all(pubs.map((p) => p.result.catch(() => null)));
  }
}

function printBoard(b: FleetBoardFigures | null): void {
  const line = (k: string, v: string) => console.log(`  ${k.padEnd(46)} ${v}`);
  if (!b) return line('fleet board in Chromium', 'not measured (BENCH_BROWSER=0, no build in dist/, or the error above)');
  line(
    `fleet board in Chromium: ${b.tiles} tiles, ${b.measuredMs / 1000} s`,
    `${b.longTasks} long tasks, longest ${b.longTaskMaxMs.toFixed(0)} ms, ${b.longTaskTotalMs.toFixed(0)} ms in all   (fleetLongTaskMaxMs; goal none over 100 ms)`,
  );
}

function boardJson(b: FleetBoardFigures | null) {
  return { fleetLongTaskMaxMs: b ? Math.round(b.longTaskMaxMs) : null, fleetLongTasks: b?.longTasks ?? null, fleetBoardTiles: b?.tiles ?? null };
}

function pushJson(p: Awaited<ReturnType<typeof pushPhase>>) {
  const r1 = (x: number) => (Number.isFinite(x) ? Math.round(x * 10) / 10 : null);
  return {
    pushEngines: p.engines,
    pushP95Ms: r1(p.fleetP95),
    pushP50Ms: r1(p.fleetP50),
    fleetMessagesPerS: r1(p.fleetMessagesPerS),
    pushEngineP95Ms: r1(p.engineP95),
    // the earlier names of the fleet socket's latency, to compare with older runs
    livePushP95Ms: r1(p.fleetP95),
    livePushP50Ms: r1(p.fleetP50),
  };
}

// ---------- retention sweep (its own server and DATA_DIR) ----------
const RETENTION_ROWS = Number(process.env.BENCH_RETENTION_ROWS ?? 600_000);
const RETENTION_MS = Number(process.env.BENCH_RETENTION_MS ?? 30_000);

/**
 * A DATA_DIR with a backlog of raw readings older than RAW_RETENTION_DAYS; the server's first sweep removes
 * it in batches while 200 engines publish at 1 Hz (QoS 1). Measures what ingest feels: event-loop delay,
 * /api/health answer time and the writer's batch latency while the sweep runs, and the sweep's rate.
 */
async function retentionPhase(progress: (m: string) => void) {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-bench-retention-'));
  const dbFile = path.join(dataDir, 'jacketwatch.sqlite');
  const spawnServer = async () => {
    const [port, mqttPort, smtpPort] = [await freePort(), await freePort(), await freePort()];
    const child = spawn(process.execPath, ['--import', 'tsx', path.join(ROOT, 'server/main.ts')], {
      cwd: ROOT,
      stdio: ['ignore', 'ignore', 'inherit'],
      env: {
        ...process.env,
        PORT: String(port),
        MQTT_PORT: String(mqttPort),
        SMTP_PORT: String(smtpPort),
        DATA_DIR: dataDir,
        LOG_LEVEL: 'warn',
        RAW_RETENTION_DAYS: '400',
        // the sweep alone: the compactor would otherwise also take the old raw rows out of \`readings\` (history.ts measures it)
        COMPACT_AFTER_H: '0',
      },
    });
    const url = `http://127.0.0.1:${port}`;
    const health = async () => (await fetch(`${url}/api/health`, { signal: AbortSignal.timeout(10_000) })).json();
    for (let i = 0; ; i++) {
      try {
        await health();
        break;
      } catch {
        if (i > 300 || child.exitCode !== null) throw new Error('server did not start');
        await sleep(200);
      }
    }
    const db = new Db(dbFile);
    const stop = async () => {
      const exited = new Promise((r) => child.once('exit', r));
      child.kill('SIGTERM');
      await exited;
      await db.close();
    };
    return { child, pid: child.pid!, url, mqttPort, dataDir, db, health, stop };
  };
  // 1. schema and fleet, then the backlog written with the server stopped
  let server = await spawnServer();
  const fleet = await seedFleet(server.db, 200, 'ret');
  const adminId = await server.db.run(
    `INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, 'admin', 0, ?, ?)`,
    ['bench-ret@example.test', 'Bench admin', bcrypt.hashSync(`bench-${Date.now()}`, 4), new Date().toISOString(), new Date().toISOString()],
  );
  await server.stop();
  const cutoff = Date.now() - 400 * 86_400_000;
  const oldStart = cutoff - 30 * 86_400_000;
  const perPair = Math.ceil(RETENTION_ROWS / (fleet.length * 5));
  const db = new Db(dbFile);
  const rows: string[] = [];
  for (const d of fleet)
    for (let ch = 1; ch <= 5; ch++) for (let k = 0; k < perPair; k++) rows.push(`(${d.engineId},${ch},${oldStart + k * 1000},${50 + (k % 40)},0)`);
  for (let i = 0; i < rows.length; i += 10_000) {
    await db.exec('BEGIN');
    for (let j = i; j < Math.min(rows.length, i + 10_000); j += 500)
      await db.exec(`INSERT INTO readings (engine_id, channel, ts, value, quality) VALUES ${rows.slice(j, j + 500).join(',')}`);
    await db.exec('COMMIT');
  }
  await db.close();
  progress(`retention: ${fmt(rows.length)} old raw readings written; server restarts and sweeps them while 200 engines publish`);

  // 2. the server sweeps at start; publishers and the watch begin at once
  server = await spawnServer();
  const sweepStart = performance.now();
  const adminToken = createTokenService(loadJwtSecret(dataDir)).sign({ id: adminId, email: 'bench-ret@example.test', role: 'admin' });
  const pubs = split(fleet, PUBLISHERS).map((ds) =>
    startPublisher({
      mqttPort: server.mqttPort,
      devices: ds.map((d) => ({ username: d.username, secret: d.secret, engineId: d.engineId })),
      mode: 'paced',
      qos: 1,
      durationMs: RETENTION_MS,
      window: 1,
      samplesPerMsg: 1,
      baseTs: 0,
    }),
  );
  await Promise.all(pubs.map((p) => p.ready));
  pubs.forEach((p) => p.go());
  const w = watch(server as unknown as Server, adminToken);
  let sweepS = NaN;
  let left = rows.length;
  const end = performance.now() + RETENTION_MS;
  while (performance.now() < end) {
    left = (await server.db.get<{ n: number }>('SELECT COUNT(*) AS n FROM readings WHERE ts < ?', [cutoff])).n;
    if (left === 0) {
      sweepS = (performance.now() - sweepStart) / 1000;
      break;
    }
    await sleep(250);
  }
  const published = (await Promise.all(pubs.map((p) => p.result))).reduce((a, r) => a + r.readings, 0);
  w.stop();
  const watched = w.summary();
  const drained = await waitDrained(server as unknown as Server, 10_000);
  const admin = (await (await fetch(`${server.url}/api/admin/ingest`, { headers: { authorization: `Bearer ${adminToken}` } })).json()) as {
    counters?: { batchLatencyMs?: { p95: number; max: number } };
  };
  await server.stop();
  fs.rmSync(dataDir, { recursive: true, force: true });
  return { backlog: rows.length, left, sweepS, published, stored: drained.stored, batchLatency: admin.counters?.batchLatencyMs ?? null, ...watched };
}

function printRetention(r: Awaited<ReturnType<typeof retentionPhase>>): void {
  const line = (k: string, v: string) => console.log(`  ${k.padEnd(46)} ${v}`);
  console.log(`\n5. Retention sweep (${fmt(r.backlog)} raw readings past RAW_RETENTION_DAYS, while 200 engines x 5 channels x 1 Hz publish at QoS 1)`);
  line(
    'sweep time / rate',
    Number.isFinite(r.sweepS) ? `${r.sweepS.toFixed(1)} s / ${fmt(r.backlog / r.sweepS)} rows/s` : `not done in ${RETENTION_MS / 1000} s (${fmt(r.left)} left)`,
  );
  line('published (acknowledged) / stored during the sweep', `${fmt(r.published)} / ${fmt(r.stored)}`);
  line('event-loop delay p99 / max (worst 2 s window)', `${r.loopP99} / ${r.loopMax} ms`);
  line(
    'GET /api/health answer p50 / max (samples)',
    `${r.healthP50.toFixed(0)} / ${r.healthMax.toFixed(0)} ms (${r.samples} answered, ${r.failures} failed or > 10 s)`,
  );
  if (r.batchLatency) line('ingest batch latency p95 / max (whole run)', `${r.batchLatency.p95} / ${r.batchLatency.max} ms`);
}

// ---------- main ----------
async function main(): Promise<void> {
  const t0 = Date.now();
  console.log(
    `Jacketwatch ingest benchmark (${os.cpus().length} cores, Node ${process.version}, load average ${os
      .loadavg()
      .map((x) => x.toFixed(1))
      .join(' ')})`,
  );

  const progress = (m: string) => process.stderr.write(`[${((Date.now() - t0) / 1000).toFixed(1)} s] ${m}\n`);
  if (process.env.BENCH_PHASE === 'retention') {
    printRetention(await retentionPhase(progress));
    process.exit(0);
  }
  if (process.env.BENCH_PHASE === 'trend') {
    printTrend(await trendPhase(progress));
    process.exit(0);
  }
  if (process.env.BENCH_PHASE === 'history') {
    const history = await historyPhase(progress);
    printHistory(history);
    if (process.env.BENCH_JSON)
      fs.writeFileSync(
        process.env.BENCH_JSON,
        JSON.stringify({ at: new Date().toISOString(), cores: os.cpus().length, node: process.version, ...historyJson(history) }, null, 2) + '\n',
      );
    process.exit(0);
  }
  if (process.env.BENCH_PHASE === 'push') {
    // the live push phase alone, on its own server (to compare push figures quickly)
    const server = await startServer();
    const all = await seedFleet(server.db, PUSH_ENGINES, 'bench');
    const adminId = await server.db.run(
      `INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, 'admin', 0, ?, ?)`,
      ['bench-admin@example.test', 'Bench admin', bcrypt.hashSync(BENCH_ADMIN_PASSWORD, 4), new Date().toISOString(), new Date().toISOString()],
    );
    const tokens = createTokenService(loadJwtSecret(server.dataDir));
    const adminToken = tokens.sign({ id: adminId, email: 'bench-admin@example.test', role: 'admin' });
    progress('fleet seeded');
    const push = await pushPhase(server, all, adminId, tokens, adminToken, progress);
    const board = await fleetBoardPhase(server, all, progress);
    await server.stop();
    printPush(push);
    printBoard(board);
    if (process.env.BENCH_JSON)
      fs.writeFileSync(
        process.env.BENCH_JSON,
        JSON.stringify({ at: new Date().toISOString(), cores: os.cpus().length, node: process.version, ...pushJson(push), ...boardJson(board) }, null, 2) +
          '\n',
      );
    process.exit(0);
  }
  if (process.env.BENCH_PHASE === 'lists') {
    const lists = await listsPhase(progress);
    printLists(lists);
    if (process.env.BENCH_JSON)
      fs.writeFileSync(
        process.env.BENCH_JSON,
        JSON.stringify({ at: new Date().toISOString(), cores: os.cpus().length, node: process.version, ...listsJson(lists) }, null, 2) + '\n',
      );
    process.exit(0);
  }
  if (process.env.BENCH_SCALE === '1') {
    // several servers: needs Debian's PostgreSQL and mosquitto, so only when asked for
    const scale = await runScaleBench(progress);
    printScale(scale);
    if (process.env.BENCH_JSON)
      fs.writeFileSync(
        process.env.BENCH_JSON,
        JSON.stringify({ at: new Date().toISOString(), cores: os.cpus().length, node: process.version, scale }, null, 2) + '\n',
      );
    process.exit(0);
  }
  progress('raw ceiling (3 runs)');
  const rawRuns: Array<{ rate: number; rows: number }> = [];
  const qos1Only = process.env.BENCH_PHASE === 'qos1'; // the QoS 1 flood alone, no ceiling (to compare memory or speed quickly)
  for (let i = 0; i < (qos1Only ? 0 : RAW_RUNS); i++) rawRuns.push(await rawCeilingOnce());
  if (qos1Only) rawRuns.push({ rate: NaN, rows: 0 });
  const raw = [...rawRuns].sort((a, b) => a.rate - b.rate)[Math.floor(RAW_RUNS / 2)];
  const server = await startServer();
  progress('server up');
  const all = await seedFleet(server.db, Math.max(PUSH_ENGINES, FLOOD_ENGINES), 'bench');
  const adminId = await server.db.run(
    `INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, 'admin', 0, ?, ?)`,
    ['bench-admin@example.test', 'Bench admin', bcrypt.hashSync(BENCH_ADMIN_PASSWORD, 4), new Date().toISOString(), new Date().toISOString()],
  );
  const tokens = createTokenService(loadJwtSecret(server.dataDir));
  const adminToken = tokens.sign({ id: adminId, email: 'bench-admin@example.test', role: 'admin' });
  const flood = all.slice(0, FLOOD_ENGINES);
  const base = Date.now() - 20 * 86_400_000;
  progress('fleet seeded');
  const devices = (ds: SeededDevice[]) => ds.map((d) => ({ username: d.username, secret: d.secret, engineId: d.engineId }));
  const rssBefore = readStatus(server.pid, 'VmRSS');

  // 1. QoS 1 flood
  const pubs = split(flood, PUBLISHERS).map((ds) =>
    startPublisher({
      mqttPort: server.mqttPort,
      devices: devices(ds),
      mode: 'flood',
      qos: 1,
      durationMs: FLOOD_MS,
      window: 4,
      samplesPerMsg: SAMPLES_PER_MSG,
      baseTs: base,
    }),
  );
  await Promise.all(pubs.map((p) => p.ready));
  progress('QoS 1 flood');
  const startStored = (await server.health()).ingest.stored;
  let w = watch(server, adminToken);
  const started = performance.now();
  pubs.forEach((p) => p.go());
  const results = await Promise.all(pubs.map((p) => p.result));
  const published = results.reduce((a, r) => a + r.readings, 0);
  const stored = (await waitStored(server, startStored + published, 20_000)) - startStored;
  const seconds = (performance.now() - started) / 1000;
  w.stop();
  const q1 = w.summary();
  const rows = (await server.db.get<{ n: number }>('SELECT COUNT(*) AS n FROM readings')).n;
  // every published reading was acknowledged after its commit and has a unique timestamp
  const lostAcknowledged = Math.max(0, published - rows);
  const duplicatesStored = (
    await server.db.get<{ n: number }>(
      'SELECT COALESCE(SUM(n - 1), 0) AS n FROM (SELECT COUNT(*) AS n FROM readings GROUP BY engine_id, channel, ts HAVING COUNT(*) > 1)',
    )
  ).n;
  const hwmQos1 = readStatus(server.pid, 'VmHWM');
  // RSS growth after the first 5 s of the flood: from the sample at 5 s to the largest one after it
  const rssAt5 = q1.rss[Math.min(4, q1.rss.length - 1)];
  const rssGrowthPct = q1.rss.length > 5 ? (100 * (Math.max(...q1.rss.slice(5)) - rssAt5)) / rssAt5 : NaN;
  if (qos1Only) {
    console.log(
      `QoS 1 flood: ${fmt(published)} acknowledged, ${fmt(rows)} in the file, ${fmt(stored / ((performance.now() - started) / 1000))} readings/s, ` +
        `lost ${lostAcknowledged}, duplicates ${duplicatesStored}; RSS ${q1.rss.map((x) => x.toFixed(0)).join(' ')} MB; growth after 5 s ${rssGrowthPct.toFixed(1)} %`,
    );
    await server.stop();
    process.exit(0);
  }

  // 2. live push at PUSH_ENGINES x 5 x 1 Hz
  const push = await pushPhase(server, all, adminId, tokens, adminToken, progress);
  const board = await fleetBoardPhase(server, all, progress);

  // 3. QoS 0 flood, bounded: QOS0_MS of publishing, then at most DRAIN_MS for the server to catch up
  const pubs0 = split(flood, PUBLISHERS).map((ds) =>
    startPublisher({
      mqttPort: server.mqttPort,
      devices: devices(ds),
      mode: 'flood',
      qos: 0,
      durationMs: QOS0_MS,
      window: 16,
      samplesPerMsg: SAMPLES_PER_MSG,
      baseTs: base + 5 * 86_400_000,
    }),
  );
  await Promise.all(pubs0.map((p) => p.ready));
  progress('QoS 0 flood');
  const h0 = (await server.health()).ingest;
  w = watch(server, adminToken);
  pubs0.forEach((p) => p.go());
  const results0 = await Promise.all(pubs0.map((p) => p.result));
  const published0 = results0.reduce((a, r) => a + r.readings, 0);
  const atStop = (await server.health()).ingest;
  progress('QoS 0 publishers stopped; bounded drain');
  const drained = await waitDrained(server, DRAIN_MS);
  w.stop();
  const q0 = w.summary();
  const received0 = drained.received - h0.received;
  const stored0 = drained.stored - h0.stored;
  const hwmQos0 = readStatus(server.pid, 'VmHWM');

  await server.stop();
  progress('server stopped');
  const rate = stored / seconds;

  const line = (k: string, v: string) => console.log(`  ${k.padEnd(46)} ${v}`);
  const mb = (xs: number[]) => xs.map((x) => x.toFixed(0)).join(' ') + ' MB';
  console.log(
    `\n1. End to end, QoS 1 flood (${FLOOD_ENGINES} engines, ${PUBLISHERS} publisher processes, ${SAMPLES_PER_MSG}-sample payloads, ${FLOOD_MS / 1000} s)`,
  );
  line('published (acknowledged) readings', fmt(published));
  line('stored readings (counter / rows in file)', `${fmt(stored)} / ${fmt(rows)}`);
  line('acknowledged lost', fmt(lostAcknowledged) + (lostAcknowledged === 0 && published === stored && rows === published ? '  (none)' : '  (MISMATCH)'));
  line('duplicates stored', fmt(duplicatesStored));
  line('stored readings/s end to end (ack after commit)', fmt(rate) + '   (target >= 30,000)');
  line('raw sqlite3 ceiling, same schema, median of 3', `${fmt(raw.rate)} readings/s (runs: ${rawRuns.map((r) => fmt(r.rate)).join(', ')})`);
  line('ratio end to end / raw ceiling', `${Math.round((100 * rate) / raw.rate)} %   (target >= 60 %)`);
  line('most readings buffered in the server', fmt(q1.maxBuffered));
  line('event-loop delay p99 / max (worst 2 s window)', `${q1.loopP99} / ${q1.loopMax} ms`);
  line(
    'GET /api/health answer p50 / max (samples)',
    `${q1.healthP50.toFixed(0)} / ${q1.healthMax.toFixed(0)} ms (${q1.samples} answered, ${q1.failures} failed or > 10 s)`,
  );
  line('RSS before / each second', `${rssBefore.toFixed(0)} MB / ${mb(q1.rss)}`);
  line('RSS growth after the first 5 s', `${Number.isFinite(rssGrowthPct) ? rssGrowthPct.toFixed(1) : 'n/a'} %   (goal < 20 %)`);
  line('peak RSS (VmHWM) after the QoS 1 flood', `${hwmQos1.toFixed(0)} MB`);

  printPush(push);
  printBoard(board);

  console.log(`\n3. QoS 0 flood (${FLOOD_ENGINES} engines, ${QOS0_MS / 1000} s of publishing, then at most ${DRAIN_MS / 1000} s to drain)`);
  line('handed to TCP by the publishers (no ack)', fmt(published0));
  line('received by the server when publishers stopped', fmt(atStop.received - h0.received));
  line(
    'received by the server at the end',
    fmt(received0) + (drained.drained ? '  (drained)' : `  (drain time over; ${fmt(drained.buffered)} still buffered)`),
  );
  line('stored at the end', fmt(stored0) + (stored0 === received0 ? '  (every received reading stored)' : ''));
  line('sent but not received (QoS 0: no redelivery)', fmt(published0 - received0) + '  (left in socket buffers when the connections were dropped)');
  line('most readings buffered in the server', fmt(q0.maxBuffered));
  line('event-loop delay p99 / max (worst 2 s window)', `${q0.loopP99} / ${q0.loopMax} ms`);
  line(
    'GET /api/health answer p50 / max (samples)',
    `${q0.healthP50.toFixed(0)} / ${q0.healthMax.toFixed(0)} ms (${q0.samples} answered, ${q0.failures} failed or > 10 s)`,
  );
  line('RSS each second', mb(q0.rss));
  line('peak RSS (VmHWM) after the QoS 0 flood', `${hwmQos0.toFixed(0)} MB`);
  const retention = await retentionPhase(progress);
  printRetention(retention);
  const trend = await trendPhase(progress);
  printTrend(trend);
  progress('compacted history');
  const history = await historyPhase(progress).catch((err) => {
    console.error('history phase failed:', err instanceof Error ? err.message : err);
    return null;
  });
  if (history) printHistory(history);
  progress('lists at fleet scale');
  const lists = await listsPhase(progress).catch((err) => {
    console.error('lists phase failed:', err instanceof Error ? err.message : err);
    return null;
  });
  if (lists) printLists(lists);
  const initialBundle = measureInitialBundle();
  console.log('\n4. App: first download (the production build in dist/, measured as the build estimates it)');
  line('initial bundle (initialTransferKb)', describeInitialBundle(initialBundle));
  progress('sign-in under a burst of wrong passwords (its own server)');
  const burst: LoginBurstFigures | null = await loginUnderBurst().catch((err) => {
    console.error('login burst failed:', err instanceof Error ? err.message : err);
    return null;
  });
  console.log('\n6. Sign-in under a burst of wrong passwords (200 wrong HTTP sign-ins from 5 addresses + 300 wrong MQTT logins)');
  if (burst) {
    line(
      'good sign-in quiet / under the burst (loginUnderBurstMs)',
      `${burst.quietMs.toFixed(0)} / ${burst.underBurstMs.toFixed(0)} ms (HTTP ${burst.status})   (goal: at most 1 s more than quiet)`,
    );
    line('good device connect quiet / under the burst', `${burst.deviceQuietMs.toFixed(0)} / ${burst.deviceUnderBurstMs.toFixed(0)} ms`);
    line('answers to the burst', JSON.stringify(burst.burstAnswers));
  } else {
    line('good sign-in under the burst', 'not measured (see the error above)');
  }
  console.log(`\nbench took ${((Date.now() - t0) / 1000).toFixed(0)} s`);
  if (process.env.BENCH_JSON) {
    const r1 = (x: number) => (Number.isFinite(x) ? Math.round(x * 10) / 10 : null);
    fs.writeFileSync(
      process.env.BENCH_JSON,
      JSON.stringify(
        {
          at: new Date().toISOString(),
          cores: os.cpus().length,
          node: process.version,
          ingestPerS: Math.round(rate),
          rawCeilingPerS: Math.round(raw.rate),
          rawCeilingRunsPerS: rawRuns.map((r) => Math.round(r.rate)),
          ratioPct: r1((100 * rate) / raw.rate),
          publishedAcknowledged: published,
          lostAcknowledged,
          duplicatesStored,
          rssGrowthPct: r1(rssGrowthPct),
          rssMb: q1.rss.map((x) => Math.round(x)),
          peakRssMb: r1(hwmQos1),
          qos1LoopP99Ms: q1.loopP99,
          ...pushJson(push),
          ...boardJson(board),
          qos0Received: received0,
          qos0Stored: stored0,
          initialTransferKb: initialBundle?.transferKb ?? null,
          retentionRowsPerS: Number.isFinite(retention.sweepS) ? Math.round(retention.backlog / retention.sweepS) : null,
          retentionLoopMaxMs: retention.loopMax,
          retentionHealthMaxMs: r1(retention.healthMax),
          retentionBatchLatencyMaxMs: retention.batchLatency?.max ?? null,
          trend30dMs: r1(trend.trend30dMs),
          trend1hMs: r1(trend.trend1hMs),
          trend30dMinuteRollupsMs: r1(trend.trend30dMinutesMs),
          trendEngines: trend.engines,
          trendDays: trend.days,
          ...(history ? historyJson(history) : { bytesPerReading: null }),
          ...(lists ? listsJson(lists) : { listP95Ms: null }),
          loginQuietMs: burst ? r1(burst.quietMs) : null,
          loginUnderBurstMs: burst ? r1(burst.underBurstMs) : null,
          deviceConnectQuietMs: burst ? r1(burst.deviceQuietMs) : null,
          deviceConnectUnderBurstMs: burst ? r1(burst.deviceUnderBurstMs) : null,
        },
        null,
        2,
      ) + '\n',
    );
    console.log(`figures written to ${process.env.BENCH_JSON}`);
  }
  process.exit(0);
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
