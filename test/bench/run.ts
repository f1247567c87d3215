/**
 * `npm run bench`: the ingest benchmark. Prints figures, asserts nothing about timing.
 *  1. raw ceiling: node-sqlite3 multi-row INSERTs (500 rows, one transaction per 10k) of the same rows
 *     into a fresh file with the readings schema and index, WAL + synchronous=NORMAL;
 *  2. end to end at QoS 1: publisher processes flood a real server; readings/s stored, published = stored;
 *  3. QoS 0 flood: the server's memory (VmRSS over time, VmHWM) while backpressure holds the inflow;
 *  4. latency: 500 engines x 5 channels x 1 Hz; publish -> socket.io client p50/p95.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { io as ioClient } from 'socket.io-client';
import { loadJwtSecret } from '../../server/auth/jwt-secret';
import { createTokenService } from '../../server/auth/tokens';
import { Db, freePort, seedFleet, type SeededDevice } from '../server/support/telemetry-server';

const ROOT = path.resolve(__dirname, '../..');
const FLOOD_MS = Number(process.env.BENCH_FLOOD_MS ?? 20_000);
const QOS0_MS = Number(process.env.BENCH_QOS0_MS ?? 10_000);
const LATENCY_MS = Number(process.env.BENCH_LATENCY_MS ?? 15_000);
const FLOOD_ENGINES = 100;
const LATENCY_ENGINES = 500;
const PUBLISHERS = 2;
const SAMPLES_PER_MSG = 50; // x 5 channels = 250 readings, about 7 KB

const fmt = (n: number) => Math.round(n).toLocaleString('en-US');
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const readStatus = (pid: number, key: string): number => {
  try {
    const m = new RegExp(`^${key}:\\s+(\\d+) kB`, 'm').exec(fs.readFileSync(`/proc/${pid}/status`, 'utf8'));
    return m ? Number(m[1]) / 1024 : NaN;
  } catch { return NaN; }
};

// ---------- 1. raw ceiling ----------
async function rawCeiling(rows: number): Promise<number> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-bench-raw-'));
  const db = new Db(path.join(dir, 'raw.sqlite'));
  await db.exec(`PRAGMA journal_mode=WAL; PRAGMA synchronous=NORMAL;
    CREATE TABLE readings (engine_id INTEGER NOT NULL, channel INTEGER NOT NULL, ts BIGINT NOT NULL, value DOUBLE PRECISION NOT NULL, quality INTEGER NOT NULL DEFAULT 0);
    CREATE INDEX readings_engine_channel_ts ON readings (engine_id, channel, ts);`);
  const per = 500;
  const sql = `INSERT INTO readings (engine_id, channel, ts, value, quality) VALUES ${Array(per).fill('(?,?,?,?,?)').join(',')}`;
  const base = Date.now() - 20 * 86_400_000;
  const params: number[] = [];
  let engine = 1; let ts = base;
  const started = performance.now();
  let done = 0;
  while (done < rows) {
    await db.exec('BEGIN');
    for (let s = 0; s < 10_000 / per && done < rows; s++) {
      params.length = 0;
      for (let i = 0; i < per / 5; i++) {
        for (let ch = 1; ch <= 5; ch++) params.push(engine, ch, ts, 80 + Math.sin(ts / 1000), 0);
        engine = (engine % FLOOD_ENGINES) + 1; if (engine === 1) ts += 1000;
      }
      await db.run(sql, params);
      done += per;
    }
    await db.exec('COMMIT');
  }
  const rate = done / ((performance.now() - started) / 1000);
  await db.close();
  fs.rmSync(dir, { recursive: true, force: true });
  return rate;
}

// ---------- server and publishers ----------
interface Server { child: ChildProcess; pid: number; url: string; mqttPort: number; dataDir: string; db: Db; health(): Promise<any>; stop(): Promise<void> }

async function startServer(): Promise<Server> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-bench-'));
  const [port, mqttPort, smtpPort] = [await freePort(), await freePort(), await freePort()];
  // node --import tsx (no tsx wrapper process), so the pid measured is the server's own
  const child = spawn(process.execPath, ['--import', 'tsx', path.join(ROOT, 'server/main.ts')], {
    cwd: ROOT, stdio: ['ignore', 'ignore', 'inherit'],
    env: { ...process.env, PORT: String(port), MQTT_PORT: String(mqttPort), SMTP_PORT: String(smtpPort), DATA_DIR: dataDir, LOG_LEVEL: 'warn' },
  });
  const url = `http://127.0.0.1:${port}`;
  const health = async () => (await fetch(`${url}/api/health`)).json();
  for (let i = 0; ; i++) {
    try { await health(); break; } catch { if (i > 300 || child.exitCode !== null) throw new Error('server did not start'); await sleep(200); }
  }
  const db = new Db(path.join(dataDir, 'jacketwatch.sqlite'));
  return {
    child, pid: child.pid!, url, mqttPort, dataDir, db, health,
    stop: async () => {
      const exited = new Promise((r) => child.once('exit', r));
      child.kill('SIGTERM');
      await exited;
      await db.close();
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

interface Publisher { child: ChildProcess; ready: Promise<void>; result: Promise<{ readings: number; messages: number; failed: number }>; go(): void }

function startPublisher(job: object): Publisher {
  const child = spawn(process.execPath, ['--import', 'tsx', path.join(__dirname, 'publisher.ts')], {
    cwd: ROOT, stdio: ['pipe', 'pipe', 'inherit'], env: { ...process.env, BENCH_JOB: JSON.stringify(job) },
  });
  let buf = '';
  let onReady!: () => void; let onResult!: (x: any) => void; let onFail!: (e: Error) => void;
  const ready = new Promise<void>((r) => { onReady = r; });
  const result = new Promise<any>((r, j) => { onResult = r; onFail = j; });
  child.stdout!.on('data', (d) => {
    buf += d;
    let nl;
    while ((nl = buf.indexOf('\n')) >= 0) {
      const line = JSON.parse(buf.slice(0, nl)); buf = buf.slice(nl + 1);
      if (line.ready) onReady(); else onResult(line);
    }
  });
  child.once('exit', (code) => { if (code) onFail(new Error(`publisher exited with ${code}`)); });
  return { child, ready, result, go: () => child.stdin!.end('go\n') };
}

const split = <T>(xs: T[], n: number): T[][] => Array.from({ length: n }, (_, i) => xs.filter((_, k) => k % n === i));

async function waitStored(server: Server, published: number, ms = 60_000): Promise<number> {
  const end = Date.now() + ms;
  for (;;) {
    const h = await server.health();
    if (h.ingest.stored >= published || Date.now() > end) return h.ingest.stored;
    await sleep(50);
  }
}

// ---------- main ----------
async function main(): Promise<void> {
  const t0 = Date.now();
  console.log(`Jacketwatch ingest benchmark (${os.cpus().length} cores, Node ${process.version})`);

  const progress = (m: string) => process.stderr.write(`[${((Date.now() - t0) / 1000).toFixed(1)} s] ${m}\n`);
  const server = await startServer();
  progress('server up');
  const all = await seedFleet(server.db, LATENCY_ENGINES, 'bench');
  const flood = all.slice(0, FLOOD_ENGINES);
  const base = Date.now() - 20 * 86_400_000;
  progress('fleet seeded');
  const devices = (ds: SeededDevice[]) => ds.map((d) => ({ username: d.username, secret: d.secret, engineId: d.engineId }));

  // 2. QoS 1 flood
  const memSamples: Array<{ t: number; rss: number }> = [];
  const sampleMem = (phase: string) => setInterval(() => memSamples.push({ t: Date.now() - t0, rss: readStatus(server.pid, 'VmRSS') }), 1000);
  const pubs = split(flood, PUBLISHERS).map((ds) => startPublisher({ mqttPort: server.mqttPort, devices: devices(ds), mode: 'flood', qos: 1, durationMs: FLOOD_MS, window: 4, samplesPerMsg: SAMPLES_PER_MSG, baseTs: base }));
  await Promise.all(pubs.map((p) => p.ready));
  progress('QoS 1 flood');
  const rssBefore = readStatus(server.pid, 'VmRSS');
  let sampler = sampleMem('qos1');
  const startStored = (await server.health()).ingest.stored;
  const started = performance.now();
  pubs.forEach((p) => p.go());
  const results = await Promise.all(pubs.map((p) => p.result));
  const published = results.reduce((a, r) => a + r.readings, 0);
  const stored = (await waitStored(server, startStored + published)) - startStored;
  const seconds = (performance.now() - started) / 1000;
  clearInterval(sampler);
  const rows = (await server.db.get<{ n: number }>('SELECT COUNT(*) AS n FROM readings')).n;
  const hwmQos1 = readStatus(server.pid, 'VmHWM');
  const rssQos1 = memSamples.map((m) => m.rss);
  const counters1 = await (await fetch(`${server.url}/api/health`)).json();

  // 3. QoS 0 flood (memory)
  memSamples.length = 0;
  const pubs0 = split(flood, PUBLISHERS).map((ds) => startPublisher({ mqttPort: server.mqttPort, devices: devices(ds), mode: 'flood', qos: 0, durationMs: QOS0_MS, window: 16, samplesPerMsg: SAMPLES_PER_MSG, baseTs: base + 5 * 86_400_000 }));
  await Promise.all(pubs0.map((p) => p.ready));
  progress('QoS 0 flood');
  const stored0Start = (await server.health()).ingest.stored;
  sampler = sampleMem('qos0');
  pubs0.forEach((p) => p.go());
  const results0 = await Promise.all(pubs0.map((p) => p.result));
  const published0 = results0.reduce((a, r) => a + r.readings, 0);
  const stored0 = (await waitStored(server, stored0Start + published0)) - stored0Start;
  clearInterval(sampler);
  const rssQos0 = memSamples.map((m) => m.rss);
  const hwmQos0 = readStatus(server.pid, 'VmHWM');

  // 4. latency at 500 x 5 x 1 Hz
  const token = createTokenService(loadJwtSecret(server.dataDir)).sign({ id: 1, email: 'bench@example.test', role: 'operator' });
  const sock = ioClient(server.url, { auth: { token }, transports: ['websocket'], reconnection: false });
  await new Promise<void>((resolve, reject) => { sock.once('connect', () => resolve()); sock.once('connect_error', reject); });
  await sock.emitWithAck('watch', { fleet: true });
  const latencies: number[] = [];
  let measuring = false;
  sock.on('readings', (msg: { ts: number }) => { if (measuring) latencies.push(Date.now() - msg.ts); });
  const pubsL = split(all, PUBLISHERS).map((ds) => startPublisher({ mqttPort: server.mqttPort, devices: devices(ds), mode: 'paced', qos: 1, durationMs: LATENCY_MS, window: 1, samplesPerMsg: 1, baseTs: 0 }));
  await Promise.all(pubsL.map((p) => p.ready));
  progress('latency run');
  pubsL.forEach((p) => p.go());
  setTimeout(() => { measuring = true; }, 3000); // after the first round of connections settles
  const resultsL = await Promise.all(pubsL.map((p) => p.result));
  measuring = false;
  sock.close();
  const publishedL = resultsL.reduce((a, r) => a + r.readings, 0);
  latencies.sort((a, b) => a - b);
  const q = (p: number) => latencies[Math.min(latencies.length - 1, Math.floor(p * latencies.length))] ?? NaN;

  const final = await server.health();
  await server.stop();

  progress('raw ceiling');
  const ceilingRows = Math.max(200_000, Math.min(1_000_000, published));
  const ceiling = await rawCeiling(ceilingRows);
  const rate = stored / seconds;

  const line = (k: string, v: string) => console.log(`  ${k.padEnd(44)} ${v}`);
  console.log('\nEnd to end, QoS 1 flood (' + `${FLOOD_ENGINES} engines, ${PUBLISHERS} publisher processes, ${SAMPLES_PER_MSG}-sample payloads, ${FLOOD_MS / 1000} s)`);
  line('published (acknowledged) readings', fmt(published));
  line('stored readings (counter / rows in file)', `${fmt(stored)} / ${fmt(rows)}`);
  line('lost', fmt(published - stored) + (published === stored && rows === published ? '  (none)' : '  (MISMATCH)'));
  line('stored readings/s end to end', fmt(rate) + '   (target >= 30,000)');
  line('raw sqlite3 ceiling, same rows, same schema', fmt(ceiling) + ` readings/s (${fmt(ceilingRows)} rows)`);
  line('ratio end to end / raw ceiling', `${Math.round((100 * rate) / ceiling)} %   (target >= 50 %)`);
  line('batch write ms p50 / p95 / max', `${counters1.ingest ? '' : ''}see /api/admin/ingest`);
  console.log('\nMemory (server process)');
  line('RSS before flood', `${rssBefore.toFixed(0)} MB`);
  line('RSS each second, QoS 1 flood', rssQos1.map((x) => x.toFixed(0)).join(' ') + ' MB');
  line('peak RSS (VmHWM) after QoS 1 flood', `${hwmQos1.toFixed(0)} MB`);
  line(`QoS 0 flood ${QOS0_MS / 1000} s: published / stored`, `${fmt(published0)} / ${fmt(stored0)}` + (published0 === stored0 ? '  (none lost)' : '  (MISMATCH)'));
  line('RSS each second, QoS 0 flood', rssQos0.map((x) => x.toFixed(0)).join(' ') + ' MB');
  line('peak RSS (VmHWM) after QoS 0 flood', `${hwmQos0.toFixed(0)} MB`);
  console.log(`\nLive push latency (${LATENCY_ENGINES} engines x 5 channels x 1 Hz, QoS 1, ${LATENCY_MS / 1000} s)`);
  line('published readings', fmt(publishedL));
  line('socket.io messages measured', fmt(latencies.length));
  line('publish -> browser p50 / p95 / max', `${q(0.5)} / ${q(0.95)} / ${latencies[latencies.length - 1]} ms   (target p95 < 100 ms)`);
  line('server totals received / stored / rejected', `${fmt(final.ingest.received)} / ${fmt(final.ingest.stored)} / ${fmt(final.ingest.rejected)}`);
  console.log(`\nbench took ${((Date.now() - t0) / 1000).toFixed(0)} s`);
  process.exit(0);
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
