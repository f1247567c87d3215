/**
 * A real Jacketwatch server in a child process (jest cannot load aedes), on random free ports with a
 * fresh DATA_DIR and its own database (SQLite file, or a fresh PostgreSQL database with JW_TEST_PG_URL),
 * plus a direct handle on that database for seeding and checking.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import bcrypt from 'bcryptjs';
import sqlite3 from 'sqlite3';
import { Client, createTestDatabase, numericTypes, type PgClient, type TestDatabase } from './test-db';
import type { BrokerState } from '../../../server/telemetry/types';
import { freePort } from '../../../scripts/free-port';
export { freePort };

const ROOT = path.resolve(__dirname, '../../..');

/** A row as the tests read it: the columns they ask for are counts, ids, times and values. */
export type Row = Record<string, number>;

/** GET /api/health of a running server (telemetry always runs there, so `ingest` is set). */
export interface ServerHealth {
  status: 'ok' | 'degraded';
  /** With an external broker (MQTT_URL) only. */
  broker?: BrokerState;
  uptimeS: number;
  version: string;
  ingest: { received: number; stored: number; duplicate: number; rejected: number; buffered: number };
}

export interface ServerProcess {
  child: ChildProcess;
  port: number;
  mqttPort: number;
  dataDir: string;
  dbFile: string;
  /** DATABASE_URL the server runs on (for `new Db(...)`). */
  databaseUrl: string;
  url: string;
  log(): string;
  health(): Promise<ServerHealth>;
  /** Sends SIGTERM (or `signal`; to the whole process group when started with `group`) and waits for the exit code. */
  stop(signal?: NodeJS.Signals): Promise<number | null>;
  ports: { port: number; mqttPort: number; smtpPort: number };
}

export interface ServerProcessOptions {
  dataDir?: string;
  env?: Record<string, string>;
  /** Reuse these ports (a restart that devices reconnect to). */
  ports?: { port: number; mqttPort: number; smtpPort: number };
  /**
   * Own process group (the default): stop() signals the group, tsx's worker included, and resolves once no
   * process of it is left. `false` signals the tsx wrapper only.
   */
  group?: boolean;
}

/** No live process left in the group (a zombie waiting for a reaper counts as gone: it runs nothing). */
const groupGone = (pgid: number): boolean => {
  try {
    process.kill(-pgid, 0);
  } catch {
    return true;
  }
  if (!fs.existsSync('/proc/self/stat')) return false;
  for (const pid of fs.readdirSync('/proc').filter((d) => /^\d+$/.test(d))) {
    try {
      const stat = fs.readFileSync(`/proc/${pid}/stat`, 'utf8');
      const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' '); // state, ppid, pgrp, ...
      if (Number(fields[2]) === pgid && fields[0] !== 'Z') return false;
    } catch {
      /* ended meanwhile */
    }
  }
  return true;
};

/** One database per DATA_DIR, so a restart on the same folder finds its data again (dropped with the test cluster). */
const databases = new Map<string, TestDatabase>();

export async function startServerProcess(opts: ServerProcessOptions = {}): Promise<ServerProcess> {
  const dataDir = opts.dataDir ?? fs.mkdtempSync(path.join(os.tmpdir(), 'jw-telemetry-'));
  let database = databases.get(dataDir);
  if (!database) databases.set(dataDir, (database = await createTestDatabase(dataDir)));
  const databaseUrl = database.url;
  const ports = opts.ports ?? { port: await freePort(), mqttPort: await freePort(), smtpPort: await freePort() };
  const { port, mqttPort, smtpPort } = ports;
  const child = spawn(process.execPath, [path.join(ROOT, 'node_modules/tsx/dist/cli.mjs'), path.join(ROOT, 'server/main.ts')], {
    cwd: ROOT,
    env: {
      ...process.env,
      PORT: String(port),
      MQTT_PORT: String(mqttPort),
      SMTP_PORT: String(smtpPort),
      DATA_DIR: dataDir,
      DATABASE_URL: databaseUrl,
      LOG_LEVEL: 'warn',
      // raw readings stay in \`readings\`, as the tests that count them there expect; compacted-history.test.ts runs the compactor itself
      COMPACT_AFTER_H: '0',
      ...opts.env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
    detached: opts.group !== false,
  });
  let output = '';
  child.stdout!.on('data', (d) => {
    output += d;
  });
  child.stderr!.on('data', (d) => {
    output += d;
  });
  const exited = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)));
  const url = `http://127.0.0.1:${port}`;
  const health = async () => (await fetch(`${url}/api/health`)).json() as Promise<ServerHealth>;
  const deadline = Date.now() + 45_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error('server exited during start:\n' + output);
    try {
      await health();
      break;
    } catch {
      /* not yet */
    }
    if (Date.now() > deadline) {
      if (opts.group !== false) process.kill(-child.pid!, 'SIGKILL');
      else child.kill('SIGKILL');
      throw new Error('server did not start:\n' + output);
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  return {
    child,
    port,
    mqttPort,
    dataDir,
    url,
    dbFile: path.join(dataDir, 'jacketwatch.sqlite'),
    databaseUrl,
    ports,
    log: () => output,
    health,
    stop: async (signal = 'SIGTERM') => {
      if (opts.group === false) {
        if (child.exitCode === null) child.kill(signal);
        return exited;
      }
      const pgid = child.pid!;
      if (!groupGone(pgid)) process.kill(-pgid, signal);
      const code = await exited;
      while (!groupGone(pgid)) await new Promise((r) => setTimeout(r, 20)); // the tsx worker too
      return code;
    },
  };
}

/**
 * A small promise wrapper over the server's own database: node-sqlite3 on its file (a path or a `sqlite:` URL),
 * or one pg connection for a `postgres://` URL. SQL is written with `?` placeholders; on PostgreSQL they become
 * $1..$n and an INSERT returns its row so `run` can give the new id, as sqlite's lastID does.
 */
export class Db {
  private readonly db: sqlite3.Database | null = null;
  private readonly pg: PgClient | null = null;
  private readonly pgReady: Promise<void> = Promise.resolve();
  constructor(target: string) {
    if (/^postgres(ql)?:/.test(target)) {
      this.pg = new Client({ connectionString: target, types: numericTypes });
      this.pgReady = this.pg.connect();
      this.pgReady.catch(() => undefined);
      return;
    }
    this.db = new sqlite3.Database(target.replace(/^sqlite:(\/\/)?/, ''));
    this.db.configure('busyTimeout', 10_000);
  }
  private async pgQuery<T>(sql: string, params: unknown[]): Promise<T[]> {
    await this.pgReady;
    let n = 0;
    const text = sql.replace(/\?/g, () => `$${++n}`);
    const insert = /^\s*INSERT\b/i.test(text) && !/\bRETURNING\b/i.test(text);
    return (await this.pg!.query<T>(insert ? `${text} RETURNING *` : text, params)).rows;
  }
  all<T = Row>(sql: string, params: unknown[] = []): Promise<T[]> {
    if (this.pg) return this.pgQuery<T>(sql, params);
    return new Promise((resolve, reject) => this.db!.all(sql, params, (err, rows) => (err ? reject(err) : resolve(rows as T[]))));
  }
  async get<T = Row>(sql: string, params: unknown[] = []): Promise<T> {
    return (await this.all<T>(sql, params))[0];
  }
  async run(sql: string, params: unknown[] = []): Promise<number> {
    if (this.pg) return (await this.pgQuery<Row>(sql, params)).at(-1)?.id ?? 0;
    return new Promise((resolve, reject) =>
      this.db!.run(sql, params, function (err) {
        if (err) reject(err);
        else resolve(this.lastID);
      }),
    );
  }
  private readonly prepared = new Map<string, sqlite3.Statement>();
  /** Runs `sql` as a statement prepared once and reused, the way the server's writer does for full batches. */
  async runPrepared(sql: string, params: unknown[]): Promise<void> {
    if (this.pg) return void (await this.pgQuery(sql, params));
    let stmt = this.prepared.get(sql);
    if (!stmt) this.prepared.set(sql, (stmt = this.db!.prepare(sql)));
    return new Promise((resolve, reject) => stmt!.run(params, (err) => (err ? reject(err) : resolve())));
  }
  async exec(sql: string): Promise<void> {
    if (this.pg) return void (await this.pgQuery(sql, []));
    return new Promise((resolve, reject) => this.db!.exec(sql, (err) => (err ? reject(err) : resolve())));
  }
  async close(): Promise<void> {
    if (this.pg)
      return void (await this.pgReady.then(
        () => this.pg!.end(),
        () => undefined,
      ));
    for (const stmt of this.prepared.values()) await new Promise<void>((resolve) => stmt.finalize(() => resolve()));
    this.prepared.clear();
    return new Promise((resolve) => this.db!.close(() => resolve()));
  }
}

export interface SeededDevice {
  engineId: number;
  deviceId: number;
  siteId: number;
  username: string;
  secret: string;
}

/**
 * Invented test fleet: `count` engines on one site, one device each. bcrypt cost 4 keeps hundreds of
 * logins cheap (the cost is stored in the hash, so the server's compare is the real one).
 */
export async function seedFleet(db: Db, count: number, prefix = 'gw'): Promise<SeededDevice[]> {
  const now = new Date().toISOString();
  const siteId = await db.run(`INSERT INTO sites (name, time_zone) VALUES (?, 'UTC')`, [`Test site ${prefix}`]);
  const out: SeededDevice[] = [];
  await db.exec('BEGIN');
  for (let i = 0; i < count; i++) {
    const engineId = await db.run(
      `INSERT INTO engines (site_id, name, duty, capacity_l, coolant_family, glycol_type, glycol_percent, cap_pressure_kpa, oil_drain_interval_h, run_hours, safe_open_temp_c, out_of_service, created_at, updated_at)
       VALUES (?, ?, 'standby', 60, 'conventional', 'ethylene', 50, 100, 250, 0, 50, FALSE, ?, ?)`,
      [siteId, `Test engine ${prefix}-${i}`, now, now],
    );
    const username = `${prefix}-${engineId}`;
    const secret = `secret-${prefix}-${i}-x7`;
    const deviceId = await db.run(`INSERT INTO devices (engine_id, username, secret_hash, created_at, updated_at) VALUES (?, ?, ?, ?, ?)`, [
      engineId,
      username,
      bcrypt.hashSync(secret, 4),
      now,
      now,
    ]);
    out.push({ engineId, deviceId, siteId, username, secret });
  }
  await db.exec('COMMIT');
  return out;
}
