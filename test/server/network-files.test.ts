/**
 * Reachable on a real network, and files for the service's user only, on a real server process:
 * MQTT over TLS with a certificate made here by openssl (right CA connects, another CA is refused),
 * owner-only modes of the database, its WAL and the uploads, and a process that survives an
 * unhandled promise rejection.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import mqtt, { type MqttClient } from 'mqtt';
import { telemetryTopic } from '../../shared/topics';
import { Db, freePort, seedFleet, startServerProcess, type SeededDevice, type ServerProcess } from './support/telemetry-server';
import { isPg } from './support/test-db';

const ROOT = path.resolve(__dirname, '../..');
let server: ServerProcess;
let db: Db;
let fleet: SeededDevice[];
let tlsPort: number;
const certs = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-certs-'));
const clients: MqttClient[] = [];

function openssl(...args: string[]): void {
  execFileSync('openssl', args, { cwd: certs, stdio: 'pipe' });
}

/** A CA, a server certificate for 127.0.0.1 signed by it, and an unrelated second CA. */
function makeCertificates(): void {
  openssl('req', '-x509', '-newkey', 'rsa:2048', '-nodes', '-keyout', 'ca.key', '-out', 'ca.pem', '-days', '2', '-subj', '/CN=Test plant CA');
  openssl('req', '-newkey', 'rsa:2048', '-nodes', '-keyout', 'server.key', '-out', 'server.csr', '-subj', '/CN=127.0.0.1');
  fs.writeFileSync(path.join(certs, 'san.ext'), 'subjectAltName=IP:127.0.0.1\n');
  openssl(
    'x509',
    '-req',
    '-in',
    'server.csr',
    '-CA',
    'ca.pem',
    '-CAkey',
    'ca.key',
    '-CAcreateserial',
    '-out',
    'server.pem',
    '-days',
    '2',
    '-extfile',
    'san.ext',
  );
  openssl('req', '-x509', '-newkey', 'rsa:2048', '-nodes', '-keyout', 'other.key', '-out', 'other.pem', '-days', '2', '-subj', '/CN=Someone else CA');
}

const connectTls = async (d: SeededDevice, caFile: string): Promise<MqttClient> => {
  const c = await mqtt.connectAsync(`mqtts://127.0.0.1:${tlsPort}`, {
    username: d.username,
    password: d.secret,
    ca: fs.readFileSync(path.join(certs, caFile)),
    reconnectPeriod: 0,
    connectTimeout: 5000,
  });
  clients.push(c);
  return c;
};

beforeAll(async () => {
  makeCertificates();
  tlsPort = await freePort();
  server = await startServerProcess({
    env: { MQTT_TLS_CERT: path.join(certs, 'server.pem'), MQTT_TLS_KEY: path.join(certs, 'server.key'), MQTT_TLS_PORT: String(tlsPort) },
  });
  db = new Db(server.databaseUrl);
  fleet = await seedFleet(db, 2, 'tls');
});

afterAll(async () => {
  for (const c of clients) c.end(true);
  // SIGTERM: tsx passes it on to the server (SIGKILL would leave the server process orphaned)
  await server?.stop('SIGTERM');
  await db?.close();
  fs.rmSync(certs, { recursive: true, force: true });
});

describe('MQTT over TLS', () => {
  test('a device trusting the right CA connects and its readings are stored', async () => {
    const d = fleet[0];
    const c = await connectTls(d, 'ca.pem');
    await c.publishAsync(telemetryTopic(d.engineId), JSON.stringify({ ts: Date.now() - 1000, values: { coolant_temp: 66 } }), { qos: 1 });
    const end = Date.now() + 10_000;
    let n = 0;
    while ((n = (await db.get<{ n: number }>('SELECT COUNT(*) AS n FROM readings WHERE engine_id = ?', [d.engineId])).n) < 1 && Date.now() < end)
      await new Promise((r) => setTimeout(r, 50));
    expect(n).toBe(1);
  });

  test('a device trusting another CA refuses the server certificate', async () => {
    await expect(connectTls(fleet[1], 'other.pem')).rejects.toThrow(/self.signed|unable to verify|certificate/i);
  });
});

// The database's own files exist only with SQLite (on PostgreSQL the cluster owns them): SQLite-only by nature.
const sqliteOnly = isPg ? test.skip : test;

describe('files of the service', () => {
  sqliteOnly('the data folder, the database, its WAL and the JWT secret are owner-only', () => {
    const mode = (f: string) => fs.statSync(f).mode & 0o777;
    expect(mode(server.dataDir)).toBe(0o700);
    expect(mode(server.dbFile)).toBe(0o600);
    expect(fs.existsSync(`${server.dbFile}-wal`)).toBe(true);
    expect(mode(`${server.dbFile}-wal`)).toBe(0o600);
    expect(mode(path.join(server.dataDir, 'jwt-secret'))).toBe(0o600);
  });

  sqliteOnly('files left readable by an older version are tightened at start; uploads too', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-modes-'));
    fs.chmodSync(dir, 0o755);
    fs.mkdirSync(path.join(dir, 'uploads'), { mode: 0o755 });
    fs.writeFileSync(path.join(dir, 'uploads', 'old.jpg'), 'x', { mode: 0o644 });
    const other = await startServerProcess({ dataDir: dir });
    try {
      const mode = (f: string) => fs.statSync(path.join(dir, f)).mode & 0o777;
      expect(mode('.')).toBe(0o700);
      expect(mode('jacketwatch.sqlite')).toBe(0o600);
      expect(mode('uploads')).toBe(0o700);
      expect(mode('uploads/old.jpg')).toBe(0o600);
    } finally {
      await other.stop('SIGTERM');
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});

test('an unhandled promise rejection is logged and the process keeps running', () => {
  const script = [
    "const { createLogger } = require('./server/logger');",
    "const { installProcessGuards } = require('./server/process-guards');",
    "installProcessGuards(createLogger('error'));",
    "Promise.reject(new Error('nobody listened'));",
    "setTimeout(() => { process.stdout.write('still running'); }, 200);",
  ].join('\n');
  const res = spawnSync(process.execPath, [path.join(ROOT, 'node_modules/tsx/dist/cli.mjs'), '-e', script], { cwd: ROOT, encoding: 'utf8', timeout: 60_000 });
  // one JSON log line (pino) naming the event and the error
  const line = res.stderr.split('\n').find((l) => l.includes('unhandled promise rejection'));
  expect(JSON.parse(line!)).toMatchObject({ level: 50, msg: 'unhandled promise rejection (kept running)', err: { message: 'nobody listened' } });
  expect(res.stdout).toBe('still running');
  expect(res.status).toBe(0);
});
