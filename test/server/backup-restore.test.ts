/**
 * Backup and restore with real processes: a server on free ports ingests readings over MQTT (QoS 1) while
 * `npm run backup` copies its database; `npm run restore` puts the copy into another DATA_DIR, and a server
 * starts on it. The copy is one consistent instant: per engine and channel, every reading up to the newest
 * one in the copy is there (same rows, same checksum as the live database), and nothing is half-written.
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import mqtt, { type MqttClient } from 'mqtt';
import { telemetryTopic } from '../../shared/topics';
import { Db, seedFleet, startServerProcess, type SeededDevice, type ServerProcess } from './support/telemetry-server';
import { until as untilOf } from './support/until';
import { isPg } from './support/test-db';
import { npmRun } from './support/npm-run';

const work = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-backup-'));
let server: ServerProcess;
let db: Db;
let fleet: SeededDevice[];
let client: MqttClient | null = null;

/** `npm run <script> -- args` as its own process, with the given DATA_DIR. */
const run = (script: string, args: string[], dataDir: string) => npmRun(script, args, { DATA_DIR: dataDir, DATABASE_URL: '' });

const until = <T>(what: string, fn: () => Promise<T>, ok: (v: T) => boolean, ms = 30_000) => untilOf(what, fn, ok, ms);

interface Pair {
  engine_id: number;
  channel: number;
  newest: number;
}
/** Row count and sha256 of the readings of one engine and channel up to `upTo`, in key order. */
async function windowOf(d: Db, p: Pair): Promise<{ n: number; sha: string }> {
  const rows = await d.all<{ ts: number; value: number; quality: number }>(
    'SELECT ts, value, quality FROM readings WHERE engine_id = ? AND channel = ? AND ts <= ? ORDER BY ts, value, quality',
    [p.engine_id, p.channel, p.newest],
  );
  const h = crypto.createHash('sha256');
  for (const r of rows) h.update(`${p.engine_id}|${p.channel}|${r.ts}|${r.value}|${r.quality}\n`);
  return { n: rows.length, sha: h.digest('hex') };
}

const counts = async (d: Db) =>
  Object.fromEntries(
    await Promise.all(
      ['readings', 'rollups', 'engines', 'devices', 'sites', 'schema_migrations'].map(
        async (t) => [t, (await d.get<{ n: number }>(`SELECT COUNT(*) AS n FROM ${t}`)).n] as const,
      ),
    ),
  );

beforeAll(async () => {
  server = await startServerProcess({ dataDir: path.join(work, 'live') });
  db = new Db(server.dbFile);
  fleet = await seedFleet(db, 2, 'bk');
  // an uploaded file, as a work-order attachment leaves it
  fs.mkdirSync(path.join(server.dataDir, 'uploads'), { recursive: true });
  fs.writeFileSync(path.join(server.dataDir, 'uploads', 'photo-1.jpg'), Buffer.from([0xff, 0xd8, 0xff, 1, 2, 3]));
});

afterAll(async () => {
  await client?.endAsync(true);
  await server?.stop('SIGKILL');
  await db?.close();
  fs.rmSync(work, { recursive: true, force: true });
});

// `npm run backup` copies the SQLite file (VACUUM INTO); a PostgreSQL store is backed up with its own tools (pg_dump).
(isPg ? test.skip : test)(
  'a backup taken during ingest restores into an empty DATA_DIR, consistent and complete up to its instant',
  async () => {
    const d = fleet[0];
    client = await mqtt.connectAsync(`mqtt://127.0.0.1:${server.mqttPort}`, {
      username: d.username,
      password: d.secret,
      reconnectPeriod: 0,
      connectTimeout: 5000,
    });
    // QoS 1 publisher: 100 samples x 2 channels a message, unique increasing timestamps, until told to stop
    let acknowledged = 0;
    let publishing = true;
    const base = Date.now() - 2 * 86_400_000;
    let i = 0;
    const publisher = (async () => {
      while (publishing) {
        const samples = Array.from({ length: 100 }, () => {
          const k = i++;
          return { ts: base + k * 100, values: { coolant_temp: 70 + (k % 200) / 10, coolant_pressure: 90 + (k % 37) } };
        });
        await client!.publishAsync(telemetryTopic(d.engineId), JSON.stringify({ samples }), { qos: 1 });
        acknowledged += 200;
      }
    })();

    const readingCount = async () => (await db.get<{ n: number }>('SELECT COUNT(*) AS n FROM readings')).n;
    await until('readings before the backup', readingCount, (n) => n >= 10_000);

    const file = path.join(work, 'backups', 'during-ingest.sqlite');
    const made = await run('backup', ['--out', file], server.dataDir);
    expect(made.err).toBe('');
    expect(made.code).toBe(0);
    const report = JSON.parse(made.out);
    expect(report.integrity).toBe('ok');
    expect(report.uploadFiles).toBe(1);
    expect(fs.readFileSync(path.join(`${file}.uploads`, 'photo-1.jpg'))).toEqual(Buffer.from([0xff, 0xd8, 0xff, 1, 2, 3]));
    const inBackup = report.rows.readings as number;
    expect(inBackup).toBeGreaterThanOrEqual(10_000);

    // ingest went on after the backup's instant; then every acknowledged reading is stored
    await until('readings after the backup', readingCount, (n) => n > inBackup + 2_000);
    publishing = false;
    await publisher;
    await until('every acknowledged reading stored', readingCount, (n) => n === acknowledged);

    // a second backup to the same name is refused, nothing overwritten
    const again = await run('backup', ['--out', file], server.dataDir);
    expect(again.code).toBe(1);
    expect(again.err).toMatch(/exists already/);

    // restore refuses a DATA_DIR that holds anything
    const refused = await run('restore', ['--from', file], server.dataDir);
    expect(refused.code).toBe(1);
    expect(refused.err).toMatch(/is not empty/);

    const restoredDir = path.join(work, 'restored');
    const restored = await run('restore', ['--from', file], restoredDir);
    expect(restored.err).toBe('');
    expect(restored.code).toBe(0);
    expect(JSON.parse(restored.out).rows).toEqual(report.rows); // every table, row for row count
    expect(fs.readFileSync(path.join(restoredDir, 'uploads', 'photo-1.jpg'))).toEqual(Buffer.from([0xff, 0xd8, 0xff, 1, 2, 3]));

    const copy = new Db(path.join(restoredDir, 'jacketwatch.sqlite'));
    try {
      expect(await copy.all('PRAGMA integrity_check')).toEqual([{ integrity_check: 'ok' }]);
      const copyCounts = await counts(copy);
      expect(copyCounts).toEqual(Object.fromEntries(Object.keys(copyCounts).map((k) => [k, report.rows[k]]))); // what the backup reported
      expect(copyCounts.readings).toBe(inBackup);
      expect(copyCounts.engines).toBe(2);
      expect(copyCounts.devices).toBe(2);
      // rollups written in the same transactions as their readings: equal to the raw counts in the copy
      const raw = await copy.all<{ n: number }>('SELECT COUNT(*) AS n FROM readings WHERE quality = 0');
      const rolled = await copy.all<{ n: number }>('SELECT SUM("count") AS n FROM rollups');
      expect(rolled[0].n).toBe(raw[0].n);

      // per engine and channel: the copy holds exactly the live database's readings up to its newest one
      const pairs = await copy.all<Pair>('SELECT engine_id, channel, MAX(ts) AS newest FROM readings GROUP BY engine_id, channel ORDER BY engine_id, channel');
      expect(pairs.map((p) => p.channel)).toEqual([1, 2]);
      for (const p of pairs) {
        const live = await windowOf(db, p);
        const back = await windowOf(copy, p);
        expect(back).toEqual(live);
        expect(back.n).toBe((p.newest - base) / 100 + 1); // no gap: every timestamp from the first one
      }
    } finally {
      await copy.close();
    }

    // `--check` reads a backup without restoring it
    const checked = await run('restore', ['--from', file, '--check'], path.join(work, 'unused'));
    expect(checked.code).toBe(0);
    expect(JSON.parse(checked.out).integrity).toBe('ok');
    expect(fs.existsSync(path.join(work, 'unused'))).toBe(false);

    // a server starts on the restored DATA_DIR and serves its data
    const second = await startServerProcess({ dataDir: restoredDir });
    try {
      const h = await second.health();
      expect(h).toBeTruthy();
    } finally {
      expect(await second.stop()).toBe(0);
    }
  },
  180_000,
);
